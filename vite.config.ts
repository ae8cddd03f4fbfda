import { defineConfig } from 'vite'
import { VitePWA } from 'vite-plugin-pwa'

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
  // Offline after one visit: a service worker precaches the build (page, kernel worker, styles,
  // fonts), so the workbench reopens and runs checks with no network. The SMT solver (35 MB of
  // WebAssembly) is loaded only by a proof by induction, so it is not precached; once fetched it is
  // kept in a runtime cache, so proofs work offline after the first one.
  plugins: [
    VitePWA({
      registerType: 'autoUpdate',
      injectRegister: 'script',
      manifest: false,
      workbox: {
        globPatterns: ['**/*.{html,js,css,woff2,woff,ttf,svg,wasm}'],
        globIgnores: ['**/z3-built*'],
        maximumFileSizeToCacheInBytes: 16 * 1024 * 1024,
        runtimeCaching: [{ urlPattern: /z3-built/, handler: 'CacheFirst', options: { cacheName: 'twofold-solver' } }],
        cleanupOutdatedCaches: true,
        navigateFallback: 'index.html',
      },
    }),
  ],
  worker: { format: 'es' },
  build: { outDir: 'dist', target: 'es2022' },
  server: { headers: isolation },
  preview: { headers: isolation },
})
