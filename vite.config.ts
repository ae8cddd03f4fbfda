import { defineConfig } from 'vite'

// Cross-origin isolation lets the page share a stop flag with the busy kernel worker
// (SharedArrayBuffer); without these headers the workbench still works and stops a check by
// ending its worker instead.
const isolation = {
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Cross-Origin-Embedder-Policy': 'require-corp',
}

// The workbench is a static site: `base: './'` lets `npm run build` output work from any host.
export default defineConfig({
  base: './',
  root: '.',
  worker: { format: 'es' },
  build: { outDir: 'dist', target: 'es2022' },
  server: { headers: isolation },
  preview: { headers: isolation },
})
