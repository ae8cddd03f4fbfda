// The browser test harness: build the workbench with Vite's JS API into a temporary folder, serve
// it from a tiny HTTP server on 127.0.0.1 (a random port), and drive Debian's Chromium through
// playwright-core. No browser is downloaded: /usr/bin/chromium must exist.
import { mkdirSync, mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs'
import { createServer, type Server } from 'node:http'
import { tmpdir } from 'node:os'
import { extname, join, normalize } from 'node:path'
import { fileURLToPath } from 'node:url'
import { chromium, type Browser, type BrowserContext, type Page } from 'playwright-core'
import { build } from 'vite'

/** The repository root (the Vite root). */
export const ROOT = fileURLToPath(new URL('../..', import.meta.url)).replace(/\/$/, '')

/** Where screenshots go (gitignored). */
export const ARTIFACTS = join(ROOT, 'test-artifacts')

/** Builds the site into a fresh temporary folder and returns it. */
export async function buildSite(): Promise<string> {
  const outDir = mkdtempSync(join(tmpdir(), 'twofold-site-'))
  await build({
    root: ROOT,
    configFile: join(ROOT, 'vite.config.ts'),
    logLevel: 'error',
    build: { outDir, emptyOutDir: true, chunkSizeWarningLimit: 4096 },
  })
  return outDir
}

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8', '.js': 'text/javascript; charset=utf-8', '.css': 'text/css; charset=utf-8',
  '.woff2': 'font/woff2', '.woff': 'font/woff', '.ttf': 'font/ttf', '.svg': 'image/svg+xml', '.json': 'application/json', '.wasm': 'application/wasm',
}

/** A static server for `dir`, cross-origin isolated like `vite preview` (see vite.config.ts). */
export async function serve(dir: string): Promise<{ url: string; close: () => Promise<void> }> {
  const server: Server = createServer((req, res) => {
    const path = decodeURIComponent(new URL(req.url ?? '/', 'http://x').pathname)
    let file = normalize(join(dir, path))
    if (!file.startsWith(dir)) { res.writeHead(403).end(); return }
    try { if (statSync(file).isDirectory()) file = join(file, 'index.html') } catch { res.writeHead(404).end(); return }
    let body: Buffer
    try { body = readFileSync(file) } catch { res.writeHead(404).end(); return }
    res.writeHead(200, {
      'Content-Type': TYPES[extname(file)] ?? 'application/octet-stream',
      'Cross-Origin-Opener-Policy': 'same-origin',
      'Cross-Origin-Embedder-Policy': 'require-corp',
      'Cross-Origin-Resource-Policy': 'same-origin',
      'Cache-Control': 'no-store',
    })
    res.end(body)
  })
  await new Promise<void>((ok) => server.listen(0, '127.0.0.1', ok))
  const address = server.address()
  const port = typeof address === 'object' && address ? address.port : 0
  return {
    url: `http://127.0.0.1:${port}/`,
    close: () => new Promise<void>((ok) => { server.closeAllConnections(); server.close(() => ok()) }),
  }
}

/** Launches Debian's Chromium headless. */
export function launch(): Promise<Browser> {
  return chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  })
}

/** Collects console errors and page errors of a page. */
export function watchErrors(page: Page): string[] {
  const errors: string[] = []
  page.on('console', (m) => { if (m.type() === 'error') errors.push(m.text()) })
  page.on('pageerror', (e) => errors.push(String(e)))
  return errors
}

/** Removes a built site. */
export function removeSite(dir: string): void {
  rmSync(dir, { recursive: true, force: true })
}

/** A built, served workbench and a browser pointed at it. */
export interface Workbench {
  url: string
  browser: Browser
  close(): Promise<void>
}

/** Builds, serves and launches: call in `beforeAll`, and `close` in `afterAll`. */
export async function startWorkbench(): Promise<Workbench> {
  const site = await buildSite()
  const server = await serve(site)
  const browser = await launch()
  mkdirSync(ARTIFACTS, { recursive: true })
  return {
    url: server.url,
    browser,
    close: async () => { await browser.close(); await server.close(); removeSite(site) },
  }
}

/** A fresh browser profile (empty IndexedDB) on the workbench, once its editors and checks are up. */
export async function openPage(w: Workbench, search = ''): Promise<{ context: BrowserContext; page: Page; errors: string[] }> {
  const context = await w.browser.newContext({ viewport: { width: 1400, height: 1000 }, acceptDownloads: true })
  const page = await context.newPage()
  const errors = watchErrors(page)
  await page.goto(w.url + search)
  await page.waitForSelector('.cm-editor')
  await page.waitForSelector('.check-line')
  return { context, page, errors }
}

/** Imports a notebook through the page's file input, as a user choosing a file would. */
export async function importText(page: Page, name: string, text: string | Buffer): Promise<void> {
  await page.setInputFiles('input.file-input', { name, mimeType: 'text/markdown', buffer: Buffer.isBuffer(text) ? text : Buffer.from(text) })
}
