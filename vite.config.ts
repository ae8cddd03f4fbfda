import { defineConfig } from 'vite'

// The workbench is a static site: `base: './'` lets `npm run build` output work from any host.
export default defineConfig({
  base: './',
  root: '.',
  worker: { format: 'es' },
  build: { outDir: 'dist', target: 'es2022' },
})
