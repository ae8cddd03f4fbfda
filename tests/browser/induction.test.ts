// Proofs by induction in the built workbench in Chromium (issue 15): the kernel worker loads Z3
// (the page is cross-origin isolated), rows say `induction`, a counterexample to induction is
// drawn as a one-tick diagram from s to s' with the failing conjunct highlighted, Stop interrupts
// the solver, and a page that proves nothing never downloads the solver. Oracles: the kernel run
// directly in Node on the same notebook text (verdicts), and the server's own log of every request
// (what was downloaded, whoever asked: the page, a worker or the service worker).
import { mkdirSync } from 'node:fs'
import { createServer, request as httpRequest, type Server } from 'node:http'
import { join } from 'node:path'
import type { Browser, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { runNotebook } from '../../kernels/api'
import { CALM, FRESH, LEDGER, lanternsNotebook } from '../induction/fixtures'
import { ARTIFACTS, buildSite, importText, launch, removeSite, serve, watchErrors } from './harness'

let site = ''
let close: () => Promise<void> = async () => {}
let browser: Browser
let url = ''
/** Every path the server was asked for, in order. */
const requests: string[] = []

/** A logging proxy in front of the harness's static server, so that the log sees every download. */
async function loggingProxy(target: string): Promise<{ url: string; close: () => Promise<void> }> {
  const to = new URL(target)
  const server: Server = createServer((req, res) => {
    requests.push(new URL(req.url ?? '/', 'http://x').pathname)
    const out = httpRequest({ host: to.hostname, port: to.port, path: req.url, method: req.method, headers: req.headers }, (back) => {
      res.writeHead(back.statusCode ?? 502, back.headers)
      back.pipe(res)
    })
    out.on('error', () => res.writeHead(502).end())
    req.pipe(out)
  })
  await new Promise<void>((ok) => server.listen(0, '127.0.0.1', ok))
  const address = server.address()
  const port = typeof address === 'object' && address ? address.port : 0
  return { url: `http://127.0.0.1:${port}/`, close: () => new Promise<void>((ok) => { server.closeAllConnections(); server.close(() => ok()) }) }
}

beforeAll(async () => {
  site = await buildSite()
  const server = await serve(site)
  const proxy = await loggingProxy(server.url)
  url = proxy.url
  browser = await launch()
  mkdirSync(ARTIFACTS, { recursive: true })
  close = async () => { await browser.close(); await proxy.close(); await server.close(); removeSite(site) }
}, 300_000)
afterAll(async () => { await close() })

const solverFiles = () => requests.filter((p) => /z3-built/.test(p))

async function openWith(name: string, text: string, title: string): Promise<{ page: Page; errors: string[]; done: () => Promise<void> }> {
  const context = await browser.newContext({ viewport: { width: 1400, height: 1000 } })
  const page = await context.newPage()
  const errors = watchErrors(page)
  await page.goto(url)
  await page.waitForSelector('.check-line')
  await importText(page, name, text)
  await page.locator('.doc-title', { hasText: title }).waitFor()
  await page.waitForSelector('.check-line button.run:not([disabled])')
  return { page, errors, done: () => context.close() }
}

async function runAll(page: Page, timeout = 240_000): Promise<void> {
  await page.getByRole('button', { name: 'run every check in the notebook again' }).click()
  await page.waitForFunction(() => [...document.querySelectorAll('.check-line')].every((l) => l.classList.contains('fresh')), null, { timeout })
}

/** Harbour lanterns: `calm` alone is true but not inductive; with `fresh` the conjunction is inductive. */
const lanterns = lanternsNotebook([CALM, FRESH], ['check lanterns: calm at N = 2 by induction'])
  .replace('# Lanterns', '# Harbour lanterns by induction') + '\n```check\ncheck lanterns: calm, fresh at N = 2..3 by induction\n```\n'

/** Explored only: the same lanterns without `by induction`. */
const explored = lanternsNotebook([CALM, FRESH], ['check lanterns: calm, fresh at N = 2']).replace('# Lanterns', '# Harbour lanterns explored')

describe('proof by induction in the workbench', () => {
  it('a page that only explores never downloads the solver', async () => {
    requests.length = 0
    const { page, errors, done } = await openWith('explored.md', explored, 'Harbour lanterns explored')
    expect(await page.evaluate(() => crossOriginIsolated)).toBe(true)
    await runAll(page, 120_000)
    expect(await page.locator('td.verdict .word').allTextContents()).toEqual(['holds', 'holds'])
    // The service worker has precached the site by now (it is active only once its install has).
    await page.evaluate(() => navigator.serviceWorker.ready.then(() => true))
    await page.waitForTimeout(1000)
    expect(requests.length).toBeGreaterThan(3)
    expect(solverFiles()).toEqual([])
    expect(errors).toEqual([])
    await done()
  }, 300_000)

  it('proves in the kernel worker: rows say induction, a counterexample to induction is drawn from s to s\'', async () => {
    const report = await runNotebook(lanterns, 'lanterns.md', {})
    requests.length = 0
    const { page, errors, done } = await openWith('lanterns.md', lanterns, 'Harbour lanterns by induction')
    // The solver's threads need SharedArrayBuffer, which only a cross-origin isolated page has.
    expect(await page.evaluate(() => crossOriginIsolated)).toBe(true)
    expect(solverFiles()).toEqual([])
    await runAll(page)
    // The worker fetched Z3's WebAssembly once (streamed: the server says application/wasm), and
    // its script (evaluated in the worker, and the start of the solver's own threads).
    expect(solverFiles().filter((p) => p.endsWith('.wasm'))).toHaveLength(1)
    expect(solverFiles().filter((p) => p.endsWith('.js')).length).toBeGreaterThan(0)
    // Oracle: the kernel in Node. Check 1 is calm at 2; check 2 is calm and fresh at 2 and 3.
    expect(report.checks.map((r) => [r.check, r.property, r.processes, r.verdict])).toEqual([
      [0, 'calm', 2, 'inconclusive'], [1, 'calm', 2, 'holds'], [1, 'calm', 3, 'holds'], [1, 'fresh', 2, 'holds'], [1, 'fresh', 3, 'holds'],
    ])
    const blocks = page.locator('.block-check')
    const words = async (i: number) => blocks.nth(i).locator('td.verdict .word').allTextContents()
    expect(await words(0)).toEqual(['inconclusive'])
    // The table is processes x properties: row 2 is calm, fresh; row 3 likewise.
    expect(await words(1)).toEqual(['holds', 'holds', 'holds', 'holds'])
    const methods = await page.locator('td.verdict .counts').allTextContents()
    expect(methods.filter((m) => /^induction, /.test(m))).toHaveLength(5)
    await blocks.nth(1).screenshot({ path: join(ARTIFACTS, 'induction-holds.png') })

    // The counterexample to induction of check 1: one tick from s to s', calm's conjunct highlighted.
    const cti = report.checks[0].counterexample!
    expect(cti.kind).toBe('induction')
    const witness = blocks.nth(0).locator('.witness')
    expect(await witness.count()).toBe(1)
    expect(await witness.locator('.witness-message').textContent()).toBe(cti.message.replace(/`/g, ''))
    const svg = witness.locator('svg').first()
    expect(await svg.locator('text.state-label').allTextContents()).toEqual(['s', "s'"])
    // The failing conjunct as a band: true in s, false in s' (one shaded state), named in the legend.
    expect(await svg.locator('.atom-band').count()).toBe(1)
    const { p, q } = cti.induction!.assignment
    expect(await svg.locator('text.legend').allTextContents()).toContain(`calm: alive(${q}) implies not ${p}.dark[${q}]`)
    expect(await witness.locator('h4').textContent()).toBe("Why calm is not proved by induction with 2 processes: one tick from a state s that satisfies the invariant to a state s' that does not")
    // The tick table: s, then the one tick.
    const ticks = await witness.locator('table.ticks tbody > tr > th').allTextContents()
    expect(ticks).toEqual(['s', '1'])
    expect(await witness.locator('table.ticks').textContent()).toContain(`${p}: dark[${q}] false → true`)
    expect(await blocks.nth(0).locator('td.verdict .note, td.verdict').first().textContent()).toMatch(/add a property that excludes this state/)
    await witness.screenshot({ path: join(ARTIFACTS, 'induction-counterexample.png') })
    expect(errors).toEqual([])
    await done()
  }, 300_000)

  it('Stop interrupts the solver: the row is inconclusive, never holds', async () => {
    const { page, errors, done } = await openWith('ledger.md', LEDGER, 'Quay ledgers')
    await page.locator('.check-line button.run').first().click()
    // Once the worker has Z3, the solver works on the base question (for minutes, uninterrupted).
    const started = Date.now()
    while (!solverFiles().some((p) => p.endsWith('.wasm')) && Date.now() - started < 120_000) await page.waitForTimeout(200)
    expect(solverFiles().some((p) => p.endsWith('.wasm'))).toBe(true)
    await page.waitForTimeout(3000)
    expect(await page.locator('.check-line.fresh').count()).toBe(0)
    await page.locator('.check-line button.stop').first().click()
    await page.waitForFunction(() => (document.querySelector('.check-status')?.textContent ?? '').startsWith('stopped'), null, { timeout: 60_000 })
    const verdicts = await page.locator('td.verdict .word').allTextContents()
    expect(verdicts).toEqual(['stopped: inconclusive'])
    expect(await page.locator('td.verdict').first().textContent()).toContain('the proof was stopped before the solver finished')
    await page.locator('.block-check').first().screenshot({ path: join(ARTIFACTS, 'induction-stopped.png') })
    expect(errors).toEqual([])
    await done()
  }, 300_000)
})
