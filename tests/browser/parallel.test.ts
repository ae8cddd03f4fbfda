// Parallel exploration in the built workbench: by default an invariant row with wide levels is
// explored by the pool of Web Workers (the page is cross-origin isolated) and gives the row the
// kernel gives in Node on one worker (the oracle: runRow, sequential); a page that is not
// cross-origin isolated (no SharedArrayBuffer) explores on its one kernel worker, with the same row.
import type { BrowserContext, Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { planRows, runRow } from '../../kernels/run'
import type { CheckRow } from '../../kernels/result'
import { importText, startWorkbench, watchErrors, type Workbench } from './harness'
import { PUMPS } from '../symmetry/fixtures'

let bench: Workbench
let want: CheckRow
beforeAll(async () => {
  bench = await startWorkbench()
  const nb = analyzeNotebook(pumps)
  want = runRow(nb, planRows(nb)[0])
})
afterAll(async () => { await bench?.close() })

const pumps = `# Orchard pumps

\`\`\`protocol
${PUMPS}
\`\`\`

\`\`\`property
property bounded = forall p, q: always p.wait[q] <= cap
\`\`\`

\`\`\`check
check pumps: bounded at N = 3
\`\`\`
`

/**
 * A fresh page on the workbench; `isolated: false` serves every response without the
 * cross-origin isolation headers (and keeps the service worker out, so every response is seen).
 */
async function open(search: string, isolated: boolean): Promise<{ context: BrowserContext; page: Page; errors: string[] }> {
  const context = await bench.browser.newContext({ viewport: { width: 1400, height: 1000 }, serviceWorkers: 'block' })
  if (!isolated) {
    await context.route('**/*', async (route) => {
      const response = await route.fetch()
      const headers = { ...response.headers() }
      delete headers['cross-origin-opener-policy']
      delete headers['cross-origin-embedder-policy']
      await route.fulfill({ response, headers })
    })
  }
  const page = await context.newPage()
  const errors = watchErrors(page)
  await page.goto(bench.url + search)
  await page.waitForSelector('.check-line')
  return { context, page, errors }
}

/** Runs the pumps row in the page: its counts, its verdict, and every progress line it showed. */
async function runPumps(page: Page): Promise<{ counts: string; verdict: string; lines: string[] }> {
  await importText(page, 'pumps.md', pumps)
  await page.locator('.doc-title', { hasText: 'Orchard pumps' }).waitFor()
  await page.waitForSelector('.check-line button.run:not([disabled])')
  await page.evaluate(() => {
    const seen: string[] = []
    ;(window as unknown as { __lines: string[] }).__lines = seen
    new MutationObserver(() => { for (const s of document.querySelectorAll('.check-status')) if (s.textContent) seen.push(s.textContent) })
      .observe(document.body, { subtree: true, childList: true, characterData: true })
  })
  await page.locator('.check-line button.run').first().click()
  await page.locator('.check-line.fresh').first().waitFor({ timeout: 300_000 })
  return {
    counts: (await page.locator('.verdict .counts', { hasText: 'transitions' }).first().textContent()) ?? '',
    verdict: (await page.locator('.verdict .word').first().textContent()) ?? '',
    lines: await page.evaluate(() => (window as unknown as { __lines: string[] }).__lines),
  }
}

const exploreWorkers = (page: Page) => page.workers().filter((w) => w.url().includes('explore-worker')).length

describe('parallel exploration in the workbench', () => {
  it('explores an invariant row on the pool of workers by default, with the counts and verdict of one worker', async () => {
    expect(want.verdict).toBe('holds')
    const { context, page, errors } = await open('', true)
    expect(await page.evaluate(() => globalThis.crossOriginIsolated && navigator.hardwareConcurrency >= 2)).toBe(true)
    const cores = await page.evaluate(() => navigator.hardwareConcurrency)
    const got = await runPumps(page)
    expect(got.counts).toContain(`${want.states.toLocaleString('en-US')} states`)
    expect(got.counts).toContain(`${want.transitions.toLocaleString('en-US')} transitions`)
    expect(got.verdict).toMatch(/holds/)
    // The pool's workers (nested in the kernel worker) ran, one per core, and the page said so.
    expect(exploreWorkers(page)).toBe(Math.min(16, cores))
    expect(got.lines.some((l) => l.includes(`on ${Math.min(16, cores)} workers`))).toBe(true)
    expect(errors).toEqual([])
    await context.close()
  })

  /** The pumps row run on the page equals Node's, explored on the kernel worker alone, and the page says so. */
  async function expectOneWorkerRow(page: Page): Promise<void> {
      const got = await runPumps(page)
      expect(got.counts).toContain(`${want.states.toLocaleString('en-US')} states`)
      expect(got.counts).toContain(`${want.transitions.toLocaleString('en-US')} transitions`)
      expect(got.verdict).toMatch(/holds/)
      expect(exploreWorkers(page)).toBe(0)
      expect(got.lines.some((l) => l.includes('on 1 worker'))).toBe(true)
      expect(got.lines.some((l) => /on \d+ workers/.test(l))).toBe(false)
  }

  it('keeps one worker with ?workers=1, with the same row', async () => {
    const { context, page, errors } = await open('?workers=1', true)
    await expectOneWorkerRow(page)
    expect(errors).toEqual([])
    await context.close()
  })

  it('falls back to one worker where the page is not cross-origin isolated, with the same row', async () => {
    const { context, page, errors } = await open('', false)
    expect(await page.evaluate(() => globalThis.crossOriginIsolated || typeof SharedArrayBuffer !== 'undefined')).toBe(false)
    await expectOneWorkerRow(page)
    expect(errors).toEqual([])
    await context.close()
  })
})
