// `vite preview` as a production host (vite.config.ts): it must serve the solver's WebAssembly as
// application/wasm, or the browser cannot compile it while it streams and fetches the 35 MB file
// a second time (the WebAssembly.instantiateStreaming rule: the response's MIME type must be
// application/wasm), and it must send the cross-origin isolation headers the page relies on for
// SharedArrayBuffer. Oracle: the response headers of the built site, served by Vite's own preview.
import { readdirSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, test } from 'vitest'
import { preview, type PreviewServer } from 'vite'
import { ROOT, buildSite, removeSite } from './harness'

let site = ''
let server: PreviewServer
let base = ''

beforeAll(async () => {
  site = await buildSite()
  server = await preview({
    root: ROOT, configFile: join(ROOT, 'vite.config.ts'), logLevel: 'error',
    build: { outDir: site }, preview: { port: 0, host: '127.0.0.1', open: false },
  })
  base = server.resolvedUrls!.local[0]
}, 120_000)

afterAll(async () => {
  await server?.close()
  if (site) removeSite(site)
})

describe('vite preview serves the build as the workbench needs', () => {
  test('the solver\'s .wasm comes as application/wasm, cross-origin isolated', async () => {
    const wasm = readdirSync(join(site, 'assets')).filter((f) => f.endsWith('.wasm'))
    expect(wasm.length).toBeGreaterThan(0)
    for (const f of wasm) {
      const res = await fetch(new URL(`assets/${f}`, base), { method: 'HEAD' })
      expect(res.status, f).toBe(200)
      expect(res.headers.get('content-type'), f).toBe('application/wasm')
      expect(res.headers.get('cross-origin-embedder-policy'), f).toBe('require-corp')
    }
  })

  test('the page is cross-origin isolated', async () => {
    const res = await fetch(base)
    expect(res.status).toBe(200)
    expect(res.headers.get('content-type')).toMatch(/^text\/html/)
    expect(res.headers.get('cross-origin-opener-policy')).toBe('same-origin')
    expect(res.headers.get('cross-origin-embedder-policy')).toBe('require-corp')
  })
})
