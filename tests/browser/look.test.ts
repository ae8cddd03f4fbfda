// Look and reach (issue 13, items 15 to 19) in the built workbench in Chromium: an automated
// contrast scan (axe-core's `color-contrast` rule, WCAG 2.2 SC 1.4.3) in the light and the dark
// scheme, the header at 800 px, printing, and working offline after one visit.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ARTIFACTS, ROOT, openPage, startWorkbench, type Workbench } from './harness'

let bench: Workbench
beforeAll(async () => { bench = await startWorkbench() })
afterAll(async () => { await bench?.close() })

const AXE = readFileSync(join(ROOT, 'node_modules/axe-core/axe.min.js'), 'utf8')

async function runEverything(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'run every check in the notebook again' }).click()
  await page.waitForFunction(() => [...document.querySelectorAll('.check-line')].every((l) => l.classList.contains('fresh')), null, { timeout: 90_000 })
}

/** Violations of the contrast rule on the page as it stands, as "selector: ratio" lines. */
async function contrastProblems(page: Page): Promise<string[]> {
  if (!(await page.evaluate(() => 'axe' in window))) await page.addScriptTag({ content: AXE })
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: { nodes: { target: string[]; any: { data?: { contrastRatio?: number } }[] }[] }[] }> } }).axe
    const result = await axe.run(document, { runOnly: { type: 'rule', values: ['color-contrast'] }, resultTypes: ['violations'] })
    return result.violations.flatMap((v) => v.nodes.map((n) => `${n.target.join(' ')}: ${n.any[0]?.data?.contrastRatio ?? '?'}`))
  })
}

describe('contrast', () => {
  for (const scheme of ['light', 'dark'] as const) {
    it(`every text meets 4.5:1 (3:1 when large) in the ${scheme} scheme`, async () => {
      const { context, page } = await openPage(bench)
      await page.emulateMedia({ colorScheme: scheme })
      await runEverything(page)
      // Open the folded parts too, so that their text is scanned.
      await page.evaluate(() => { for (const d of document.querySelectorAll('details')) (d as HTMLDetailsElement).open = true })
      await page.locator('.witness').first().scrollIntoViewIfNeeded()
      await page.screenshot({ path: join(ARTIFACTS, `scheme-${scheme}.png`) })
      expect(await contrastProblems(page)).toEqual([])
      // The scan can fail: a caption in the old grey (3.4:1 on the paper colour) is caught.
      await page.evaluate(() => {
        const p = document.createElement('p')
        p.className = 'contrast-probe'
        p.textContent = 'a caption in the old grey'
        p.style.cssText = 'color:#8b877c;background:#fbfaf6;font-size:13px'
        document.querySelector('.notebook')!.prepend(p)
      })
      expect((await contrastProblems(page)).filter((l) => l.includes('contrast-probe'))).toHaveLength(1)
      await page.evaluate(() => document.querySelector('.contrast-probe')!.remove())
      if (scheme === 'dark') {
        const bg = await page.evaluate(() => getComputedStyle(document.body).backgroundColor)
        expect(bg).toBe('rgb(28, 27, 24)')
      }
      await context.close()
    })
  }
})

describe('the header at 800 px', () => {
  it('fits on one row', async () => {
    const { context, page } = await openPage(bench)
    await page.setViewportSize({ width: 800, height: 900 })
    const box = await page.locator('.topbar').boundingBox()
    const brand = await page.locator('.topbar .brand').boundingBox()
    const last = await page.locator('.topbar .save-state').boundingBox()
    const run = await page.locator('.topbar button.primary').boundingBox()
    // One row: every item shares the brand's line, and nothing spills past the right edge.
    expect(Math.abs(run!.y - brand!.y)).toBeLessThan(brand!.height)
    expect(Math.abs(last!.y - brand!.y)).toBeLessThan(brand!.height)
    expect(box!.height).toBeLessThan(60)
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(800)
    await page.screenshot({ path: join(ARTIFACTS, 'header-800.png'), clip: { x: 0, y: 0, width: 800, height: 120 } })
    await context.close()
  })
})

describe('printing', () => {
  it('prints the summary at the top, the title once, and no controls', async () => {
    const { context, page } = await openPage(bench)
    await runEverything(page)
    await page.emulateMedia({ media: 'print' })
    const shown = await page.evaluate(() => {
      const visible = (sel: string) => [...document.querySelectorAll<HTMLElement>(sel)].filter((e) => e.getClientRects().length > 0 && getComputedStyle(e).visibility !== 'hidden')
      const title = document.querySelector('.doc-title')!.textContent!
      const titles = [...document.querySelectorAll<HTMLElement>('h1, .doc-title')].filter((e) => e.getClientRects().length > 0 && e.textContent === title)
      const summary = document.querySelector('.summary')!.getBoundingClientRect().top
      const firstBlock = document.querySelector('.notebook .block')!.getBoundingClientRect().top
      return { titles: titles.length, buttons: visible('button').length, summaryFirst: summary < firstBlock }
    })
    expect(shown).toEqual({ titles: 1, buttons: 0, summaryFirst: true })
    const pdf = await page.pdf({ format: 'A4' })
    expect(pdf.length).toBeGreaterThan(10_000)
    await context.close()
  })
})

describe('offline', () => {
  it('reopens and runs a check with no network after one visit', async () => {
    const { context, page } = await openPage(bench)
    await page.evaluate(async () => { await navigator.serviceWorker.ready })
    await page.waitForFunction(async () => (await caches.keys()).length > 0)
    // Wait until the precache holds the kernel worker too.
    await page.waitForFunction(async () => {
      for (const name of await caches.keys()) {
        const keys = await (await caches.open(name)).keys()
        if (keys.some((r) => /worker/.test(r.url))) return true
      }
      return false
    })
    await context.setOffline(true)
    await page.reload()
    await page.waitForSelector('.check-line button.run:not([disabled])')
    await page.locator('.check-line button.run').first().click()
    await page.waitForSelector('.check-line.fresh', { timeout: 60_000 })
    expect(await page.locator('.check-line.fresh .verdict .word').count()).toBeGreaterThan(0)
    await context.setOffline(false)
    await context.close()
  })
})
