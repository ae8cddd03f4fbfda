// Reading results at a glance (issue 13, items 4 to 9) in the built workbench in Chromium. The
// oracle for every verdict, count and location shown is the kernel run directly in Node on the
// same notebook text (runNotebook).
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { runNotebook } from '../../kernels/api'
import { CAUTION } from '../../src/app/results'
import { ARTIFACTS, ROOT, importText, openPage, startWorkbench, type Workbench } from './harness'

let bench: Workbench
beforeAll(async () => { bench = await startWorkbench() })
afterAll(async () => { await bench?.close() })

/** Harbour cranes: `quiet` is violated (a crashed peer stays suspected), `bounded` holds. */
const cranes = `# Harbour cranes

\`\`\`protocol
protocol cranes {
  timing synchronous(delay: 1, idle: 1)
  faults crash
  message signal
  state suspect[peer]: bool = false
  state quiet[peer]: 0..2 = 0
  on signal from q { quiet[q] := 0
    suspect[q] := false }
  step {
    broadcast signal
    for q {
      quiet[q] := min(quiet[q] + 1, 2)
      if quiet[q] >= 2 { suspect[q] := true }
    }
  }
}
\`\`\`

\`\`\`property
property quiet = forall p, q: correct(p) and faulty(q) implies eventually always not p.suspect[q]
property bounded = forall p, q: always p.quiet[q] <= 2
\`\`\`

\`\`\`check
check cranes: quiet, bounded
\`\`\`

\`\`\`check
check cranes: bounded
\`\`\`
`

/** Orchard counters: the basket count leaves its type, a model error that stops both properties. */
const orchard = '# Orchard counters\n\n```protocol\nprotocol orchard {\n  timing synchronous(delay: 1, idle: 1)\n  faults crash\n  message ripe\n  state baskets: 0..2 = 0\n  step {\n    baskets := baskets + 1\n  }\n}\n```\n\n```property\nproperty small = forall p: always p.baskets <= 2\nproperty tidy = forall p: always p.baskets >= 0\n```\n\n```check\ncheck orchard: small, tidy\n```\n'

/** Quay bells: an aggregate feeds a broadcast, so the cutoff is refused; one check gives sizes. */
const quay = '# Quay bells\n\n```protocol\nprotocol quay {\n  timing synchronous(delay: 1, idle: 1)\n  faults crash\n  message bell\n  state heard[peer]: bool = false\n  state loud: bool = false\n  on bell from q { heard[q] := true }\n  step {\n    loud := some q: heard[q]\n    if loud { broadcast bell }\n  }\n}\n```\n\n```property\nproperty rings = forall p, q: always (p.heard[q] implies alive(q) or crashed(q))\n```\n\n```check\ncheck quay: rings\ncheck quay: rings at N = 2\n```\n'

async function openWith(name: string, text: string, title: string): Promise<{ page: Page; close: () => Promise<void> }> {
  const { context, page } = await openPage(bench)
  await importText(page, name, text)
  await page.locator('.doc-title', { hasText: title }).waitFor()
  await page.waitForSelector('.check-line button.run:not([disabled])')
  return { page, close: () => context.close() }
}

async function runAll(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'run every check in the notebook again' }).click()
  await page.waitForFunction(() => [...document.querySelectorAll('.check-line')].every((l) => l.classList.contains('fresh')), null, { timeout: 60_000 })
}

describe('verdicts at a glance', () => {
  it('shows each verdict as a word and a shape, and a summary that links every row that does not hold', async () => {
    const report = await runNotebook(cranes, 'cranes.md', {})
    const { page, close } = await openWith('cranes.md', cranes, 'Harbour cranes')
    await runAll(page)
    const cells = await page.locator('td.verdict').evaluateAll((tds) => tds.map((td) => [td.querySelector('.shape')?.textContent, td.querySelector('.word')?.textContent]))
    expect(cells.map((c) => c[1])).toEqual(report.checks.map((r) => r.verdict))
    // A shape per verdict: never colour alone.
    const shapes = new Map(cells.map(([s, w]) => [w, s]))
    expect(shapes.get('holds')).toBeTruthy()
    expect(shapes.get('violated')).toBeTruthy()
    expect(shapes.get('holds')).not.toBe(shapes.get('violated'))
    const n = (v: string) => report.checks.filter((r) => r.verdict === v).length
    expect(await page.locator('.summary-counts').textContent()).toBe(`${report.checks.length} rows: ${n('holds')} hold, ${n('violated')} violated, ${n('inconclusive')} inconclusive, ${n('error')} error, 0 out of date`)
    const links = page.locator('.summary a.to-row')
    expect(await links.count()).toBe(report.checks.filter((r) => r.verdict !== 'holds').length)
    await page.evaluate(() => window.scrollTo(0, document.body.scrollHeight))
    await links.first().click()
    const row = report.checks.find((r) => r.verdict !== 'holds')!.row
    const box = await page.locator(`#row-${row}`).boundingBox()
    expect(box!.y).toBeGreaterThan(0)
    expect(box!.y).toBeLessThan(1000)
    await page.screenshot({ path: join(ARTIFACTS, 'summary.png') })
    // Edit the protocol: every row is now out of date, and the summary says so.
    await page.locator('.block-protocol .cm-line', { hasText: 'faults crash' }).click()
    await page.keyboard.press('End')
    await page.keyboard.type(' // edited')
    await page.waitForFunction(() => /3 out of date/.test(document.querySelector('.summary-counts')?.textContent ?? ''))
    await close()
  })

  it('says the caution about model verdicts once per notebook and once in the report', async () => {
    const { page, close } = await openWith('cranes.md', cranes, 'Harbour cranes')
    await runAll(page)
    expect(await page.locator('.caution').count()).toBe(1)
    await page.locator('details.exports summary').click()
    const download = page.waitForEvent('download')
    await page.getByRole('button', { name: 'export a self-contained HTML report' }).click()
    const html = readFileSync((await (await download).path())!, 'utf8')
    expect(html.split('for systems where failure can hurt people'.replace('f', 'F')).length - 1).toBe(1)
    expect(html.indexOf('class="summary"')).toBeLessThan(html.indexOf('class="verdict'))
    // The title once: the heading in the notebook gives way to the report's.
    expect(html.match(/>Harbour cranes</g)).toHaveLength(2) // <title> and <h1>
    expect(CAUTION).toContain('For systems where failure can hurt people')
    await close()
  })
})

describe('the guide', () => {
  it('explains each violated result it shows, in the text right after its check block', async () => {
    const guide = readFileSync(join(ROOT, 'notebooks/guide.md'), 'utf8')
    const violated = (await runNotebook(guide, 'notebooks/guide.md', {})).checks.filter((r) => r.verdict === 'violated')
    expect(violated.length).toBeGreaterThan(0)
    const { context, page } = await openPage(bench)
    await runAll(page)
    const explained = await page.evaluate(() => [...document.querySelectorAll('.block-check')].map((b) => ({
      violated: [...b.querySelectorAll('th[scope="col"]')].map((th) => th.textContent!).filter((_, i) => b.querySelectorAll('td.verdict')[i]?.classList.contains('v-violated')),
      next: b.nextElementSibling?.classList.contains('block-prose') ? b.nextElementSibling.textContent ?? '' : '',
    })))
    for (const r of violated) {
      const block = explained.find((e) => e.next.includes(r.property) && e.violated.length)
      expect(block, `the guide explains why ${r.property} is violated`).toBeTruthy()
      expect(block!.next).toMatch(new RegExp(`${r.property}\\W[^.]*violated`))
    }
    await context.close()
  })
})

describe('model errors', () => {
  it('are shown as model errors once per check, linked to the line and marked in the diagram and table', async () => {
    const report = await runNotebook(orchard, 'orchard.md', {})
    expect(report.checks.every((r) => r.counterexample?.kind === 'model-error')).toBe(true)
    const message = report.checks[0].counterexample!.message
    const [, line, column] = /line (\d+), column (\d+)/.exec(message)!
    const { page, close } = await openWith('orchard.md', orchard, 'Orchard counters')
    await runAll(page)
    expect(await page.locator('td.verdict .word').allTextContents()).toEqual(report.checks.map(() => 'model error'))
    expect(await page.locator('.witness').count()).toBe(1)
    expect(await page.locator('.witness h4').textContent()).toMatch(/A model error stops every property of this check/)
    expect(await page.locator('.witness-message').textContent()).toBe(message)
    expect(await page.locator('.witness svg .failing').count()).toBe(1)
    expect(await page.locator('.witness table.ticks tr.failing').count()).toBe(1)
    await page.locator('.witness').screenshot({ path: join(ARTIFACTS, 'model-error.png') })
    await page.evaluate(() => window.scrollTo(0, document.body.scrollHeight))
    const link = page.locator(`.witness-message a.jump[data-line="${line}"][data-column="${column}"]`)
    await link.click()
    const want = orchard.split('\n')[Number(line) - 1]
    await page.waitForFunction((w) => document.activeElement?.closest('.block-protocol')?.querySelector('.cm-activeLine')?.textContent === w, want, { timeout: 5000 })
    // The line is in view below the sticky header.
    const lineBox = await page.locator('.block-protocol .cm-activeLine').boundingBox()
    const header = await page.locator('.topbar').boundingBox()
    expect(lineBox!.y).toBeGreaterThanOrEqual(header!.y + header!.height)
    await close()
  })
})

describe('refused cutoffs', () => {
  it('show one not-run line without sizes, no advice to give sizes where sizes are given, and code in backticks', async () => {
    const report = await runNotebook(quay, 'quay.md', {})
    expect(report.checks[0].cutoff.applies).toBe(false)
    expect(report.checks[0].states).toBe(0)
    const { page, close } = await openWith('quay.md', quay, 'Quay bells')
    await runAll(page)
    const lines = page.locator('.check-line')
    const first = lines.nth(0)
    expect(await first.locator('table.verdicts').count()).toBe(0)
    expect(await first.locator('.not-run').textContent()).toBe('○ not run: the cutoff does not apply (reasons below); give sizes with at N = ...')
    expect(await first.locator('.not-run code').textContent()).toBe('at N = ...')
    expect(await first.locator('.reasons li').count()).toBe(report.checks[0].cutoff.reasons.length)
    const second = lines.nth(1)
    expect(await second.locator('table.verdicts').count()).toBe(1)
    expect(await second.textContent()).not.toMatch(/give explicit sizes|give sizes/)
    expect(await page.locator('.check-findings').evaluateAll((els) => els.some((e) => e.textContent!.includes('`')))).toBe(false)
    await page.locator('.block-check').screenshot({ path: join(ARTIFACTS, 'not-run.png') })
    await close()
  })
})

describe('formulas', () => {
  it('are never clipped: typeset properties and cutoff statements wrap or scroll', async () => {
    const long = cranes.replace('property bounded = forall p, q: always p.quiet[q] <= 2',
      'property bounded = forall p, q: always (p.quiet[q] <= 2 and q.quiet[p] <= 2 and (p.suspect[q] implies p.quiet[q] >= 1) and (q.suspect[p] implies q.quiet[p] >= 1))')
    const { page, close } = await openWith('cranes.md', long, 'Harbour cranes')
    await page.setViewportSize({ width: 900, height: 1000 })
    await runAll(page)
    const clipped = await page.evaluate(() => {
      const out: string[] = []
      for (const k of document.querySelectorAll('.typeset .katex, .statement .katex')) {
        // Walk up to the first ancestor that clips; it must let the formula scroll.
        let box = k.parentElement
        while (box && getComputedStyle(box).overflowX === 'visible') box = box.parentElement
        if (!box) continue
        const fits = k.getBoundingClientRect().right <= box.getBoundingClientRect().right + 1
        if (!fits && !['auto', 'scroll'].includes(getComputedStyle(box).overflowX)) out.push(k.textContent!.slice(0, 40))
      }
      return out
    })
    expect(clipped).toEqual([])
    await close()
  })
})

describe('the counterexample diagram', () => {
  it('keeps message labels apart, keys every line style, and lines tick labels up with their dots', async () => {
    // The guide's violated check has a lasso with messages crossing between the two lanes.
    const { context, page } = await openPage(bench)
    const close = () => context.close()
    await runAll(page)
    const svg = page.locator('.witness svg').first()
    // Real font metrics: no two message labels' boxes intersect.
    const overlaps = await svg.evaluate((s) => {
      const boxes = [...s.querySelectorAll<SVGTextElement>('.msg-label')].map((t) => t.getBBox())
      let n = 0
      for (let i = 0; i < boxes.length; i++) for (let j = i + 1; j < boxes.length; j++) {
        const a = boxes[i], b = boxes[j]
        if (a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height) n++
      }
      return { n, labels: boxes.length }
    })
    expect(overlaps.labels).toBeGreaterThan(1)
    expect(overlaps.n).toBe(0)
    const keys = await svg.locator('.line-key text').allTextContents()
    expect(keys).toEqual(['received', 'in flight', 'dropped at a crashed process', 'after a crash'])
    // Every line style drawn has its key entry.
    const styles = await svg.evaluate((s) => [...new Set([...s.querySelectorAll('line.msg')].map((l) => l.getAttribute('class')))])
    for (const st of styles) expect(await svg.locator(`.line-key line[class="${st}"]`).count()).toBe(1)
    // "tick t" labels sit on the row of that tick's dots.
    const aligned = await svg.evaluate((s) => {
      const labels = [...s.querySelectorAll<SVGTextElement>('.state-label')].filter((t) => t.textContent!.startsWith('tick'))
      const dots = [...s.querySelectorAll<SVGCircleElement>('circle.step')]
      return labels.every((t) => {
        const tick = t.textContent!.slice(5)
        const mine = dots.filter((d) => d.querySelector('title')!.textContent!.endsWith(`in tick ${tick}`))
        const mid = t.getBBox().y + t.getBBox().height / 2
        return mine.every((d) => Math.abs(Number(d.getAttribute('cy')) - mid) < 6)
      })
    })
    expect(aligned).toBe(true)
    // The tick table says who steps in words, and the atom legend names processes, not variables.
    expect(await page.locator('.witness table.ticks').first().textContent()).toMatch(/processes 1 and 2 step|process [12] steps/)
    expect(await page.locator('.witness table.ticks').first().textContent()).not.toMatch(/steps?: \d/)
    const atoms = await svg.evaluate((s) => [...s.querySelectorAll('text.legend')].filter((t) => !t.closest('.line-key')).map((t) => t.textContent!))
    expect(atoms.length).toBeGreaterThan(0)
    for (const a of atoms) expect(a).not.toMatch(/[(,[]\s*[pq]\b|\b[pq]\.|#/)
    await page.locator('.witness').first().screenshot({ path: join(ARTIFACTS, 'diagram-labels.png') })
    await close()
  })
})
