// Parallel exploration in the built workbench: an invariant row with wide levels is explored by
// the pool of Web Workers (the page is cross-origin isolated) and gives the row the kernel gives
// in Node on one worker (the oracle: runRow, sequential).
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { planRows, runRow } from '../../kernels/run'
import { importText, openPage, startWorkbench, type Workbench } from './harness'
import { PUMPS } from '../symmetry/fixtures'

let bench: Workbench
beforeAll(async () => { bench = await startWorkbench() })
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

describe('parallel exploration in the workbench', () => {
  it('explores an invariant row on the pool of workers with the counts of one worker', async () => {
    const nb = analyzeNotebook(pumps)
    const want = runRow(nb, planRows(nb)[0])
    expect(want.verdict).toBe('holds')
    // The pool is opt-in (`?workers=auto`); without it the page explores on its one kernel worker.
    const { context, page, errors } = await openPage(bench, '?workers=auto')
    await importText(page, 'pumps.md', pumps)
    await page.locator('.doc-title', { hasText: 'Orchard pumps' }).waitFor()
    await page.waitForSelector('.check-line button.run:not([disabled])')
    const isolated = await page.evaluate(() => globalThis.crossOriginIsolated && navigator.hardwareConcurrency >= 2)
    await page.locator('.check-line button.run').first().click()
    await page.locator('.check-line.fresh').first().waitFor({ timeout: 300_000 })
    const counts = await page.locator('.verdict .counts', { hasText: 'transitions' }).first().textContent()
    expect(counts).toContain(`${want.states.toLocaleString('en-US')} states`)
    expect(counts).toContain(`${want.transitions.toLocaleString('en-US')} transitions`)
    expect(await page.locator('.verdict .word').first().textContent()).toMatch(/holds/)
    // The pool's workers (nested in the kernel worker) ran, where the page allows them.
    if (isolated) expect(page.workers().filter((w) => w.url().includes('explore-worker')).length).toBeGreaterThanOrEqual(2)
    expect(isolated).toBe(true)
    expect(errors).toEqual([])
    await context.close()
  })
})
