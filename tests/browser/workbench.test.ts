// End-to-end tests of the built workbench in Debian's Chromium. The verdicts shown come from the
// kernel; the oracle for "the page shows the verdict" is the kernel itself, called directly in
// Node on the same notebook text (runNotebook), so the page must agree with it.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { analyzeNotebook, runNotebook } from '../../kernels/api'
import { ARTIFACTS, ROOT, importText, openPage, startWorkbench, type Workbench } from './harness'

let bench: Workbench
beforeAll(async () => { bench = await startWorkbench() })
afterAll(async () => { await bench?.close() })
const open = () => openPage(bench)

/** A harbour crane protocol whose detector keeps suspecting a crashed peer: `quiet` is violated. */
const cranes = `---
title: Harbour cranes
---

# Harbour cranes

Each crane signals the others; a crane that hears nothing for two ticks suspects its peer.

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
\`\`\`

\`\`\`check
check cranes: quiet
\`\`\`
`

describe('opening the workbench', () => {
  it('shows the guide with editors and typeset formulas and no console errors', async () => {
    const { context, page, errors } = await open()
    expect(await page.locator('.doc-title').textContent()).toMatch(/guide/i)
    expect(await page.locator('.cm-editor').count()).toBeGreaterThan(2)
    expect(await page.locator('.prose-rendered .katex').count()).toBeGreaterThan(0)
    expect(await page.locator('.typeset .katex').count()).toBeGreaterThan(0)
    await page.waitForTimeout(600) // let the first analysis land, so its errors would show
    await page.screenshot({ path: join(ARTIFACTS, 'guide.png') })
    expect(errors).toEqual([])
    await context.close()
  })
})

describe('running a check', () => {
  it('shows the verdict the kernel gives for the same notebook', async () => {
    const { context, page, errors } = await open()
    await page.locator('.check-line').first().locator('button.run').click()
    await page.waitForSelector('.check-line.fresh', { timeout: 60_000 })
    const shown = await page.locator('.check-line').first().locator('.verdict .word').allTextContents()
    // Oracle: the kernel run directly in Node on the guide.
    const guide = readFileSync(join(ROOT, 'notebooks/guide.md'), 'utf8')
    const report = await runNotebook(guide, 'notebooks/guide.md', {})
    const expected = report.checks.filter((r) => r.check === 0).map((r) => (r.verdict === 'error' ? 'could not run' : r.verdict))
    expect(shown.map((s) => s.trim().toLowerCase())).toEqual(expected)
    expect(errors).toEqual([])
    await context.close()
  })

  it('marks dependent findings out of date as soon as the protocol is edited', async () => {
    const { context, page } = await open()
    const first = page.locator('.check-line').first()
    await first.locator('button.run').click()
    await page.waitForSelector('.check-line.fresh', { timeout: 60_000 })
    await page.locator('.block-protocol .cm-content').first().click()
    await page.keyboard.press('End')
    await page.keyboard.type(' // edited')
    expect(await first.getAttribute('class')).toContain('stale')
    expect(await first.locator('.stale-note').isVisible()).toBe(true)
    // The findings stay visible (out of date, not deleted).
    expect(await first.locator('.verdict').count()).toBeGreaterThan(0)
    await context.close()
  })
})

describe('keeping notebooks', () => {
  it('restores an edit after a reload', async () => {
    const { context, page } = await open()
    await page.locator('.block-protocol .cm-content').first().click()
    await page.keyboard.press('Control+End')
    await page.keyboard.type('\n// the lamp on the north pier')
    await page.waitForFunction(() => document.querySelector('.save-state')?.textContent?.startsWith('saved'))
    await page.reload()
    await page.waitForSelector('.cm-editor')
    // CodeMirror draws only the lines near the viewport: bring the block's end into view first.
    await page.locator('.block-protocol').first().evaluate((e) => e.scrollIntoView({ block: 'end' }))
    await page.locator('.block-protocol .cm-line', { hasText: 'the lamp on the north pier' }).first().waitFor({ timeout: 10_000 })
    await context.close()
  })

  it('refuses a malformed import, says where, and leaves the list unchanged', async () => {
    const { context, page } = await open()
    await page.waitForSelector('.shelf-list li')
    const before = await page.locator('.shelf-list li').count()
    await importText(page, 'broken.md', '# Broken quay\n\n```protocol\nprotocol quay {\n  state x: bool = \n}\n```\n')
    const notice = page.locator('.notice', { hasText: 'Nothing was imported' })
    await notice.waitFor()
    expect(await notice.textContent()).toMatch(/line \d+, column \d+/)
    expect(await page.locator('.shelf-list li').count()).toBe(before)
    await importText(page, 'binary.md', Buffer.from([0x23, 0x20, 0xff, 0xfe, 0x00, 0x01]))
    await page.locator('.notice', { hasText: 'not UTF-8 text' }).waitFor()
    expect(await page.locator('.shelf-list li').count()).toBe(before)
    await context.close()
  })
})

describe('untrusted notebook text', () => {
  it('renders prose with an onerror image, a script and a javascript: link without running any', async () => {
    const { context, page, errors } = await open()
    const evil = [
      '# Lighthouse log',
      '',
      'A picture: <img src=x onerror="window.__pwned = 1">',
      '',
      '<script>window.__pwned = 2</script>',
      '',
      '[open the log](javascript:window.__pwned=3) and <a href="javascript:window.__pwned=4">this</a>.',
      '',
      '$\\href{javascript:window.__pwned=5}{x}$',
      '',
    ].join('\n')
    await importText(page, 'evil.md', evil)
    await page.locator('.doc-title', { hasText: 'Lighthouse log' }).waitFor()
    for (const link of await page.locator('.prose-rendered a').all()) await link.click({ force: true }).catch(() => {})
    await page.waitForTimeout(500)
    expect(await page.evaluate(() => (window as unknown as { __pwned?: number }).__pwned)).toBeUndefined()
    expect(await page.locator('.prose-rendered script').count()).toBe(0)
    expect(await page.locator('[onerror]').count()).toBe(0)
    expect(await page.locator('a[href^="javascript"]').count()).toBe(0)
    expect(errors.filter((e) => !/ERR_|404|Failed to load resource/.test(e))).toEqual([])
    await context.close()
  })
})

describe('counterexamples', () => {
  it('draws the lasso of a violated property beside its tick table', async () => {
    // Oracle: the kernel in Node says `quiet` is violated with a lasso.
    const report = await runNotebook(cranes, 'cranes.md', {})
    expect(report.checks[0].verdict).toBe('violated')
    const { context, page } = await open()
    await importText(page, 'cranes.md', cranes)
    await page.locator('.doc-title', { hasText: 'Harbour cranes' }).waitFor()
    await page.locator('.check-line').first().locator('button.run').click()
    await page.waitForSelector('.witness svg', { timeout: 60_000 })
    expect(await page.locator('.verdict .word').first().textContent()).toBe('violated')
    expect(await page.locator('.witness svg .lane').count()).toBe(report.checks[0].processes)
    expect(await page.locator('.witness table.ticks tr[data-tick]').count()).toBe(report.checks[0].counterexample!.ticks.length)
    // Unticking an atom removes its shading from the diagram.
    const bands = await page.locator('.witness svg .atom-band').count()
    await page.locator('.atom-chooser input').last().uncheck()
    expect(await page.locator('.witness svg .atom-band').count()).toBeLessThan(bands)
    await page.locator('.atom-chooser input').last().check()
    expect(await page.locator('.witness svg .atom-band').count()).toBe(bands)
    await page.locator('.witness svg .tick-band').first().hover({ force: true })
    expect(await page.locator('.witness tr.lit').count()).toBe(1)
    await page.locator('.witness').first().screenshot({ path: join(ARTIFACTS, 'counterexample.png') })
    await context.close()
  })
})

describe('diagnostics while typing', () => {
  it('marks a malformed property in the editor and lists it under the block with its line', async () => {
    const { context, page } = await open()
    const typed = '\nproperty lamp = forall p: always (p.glow and'
    await page.locator('.block-property .cm-content').first().click()
    await page.keyboard.press('Control+End')
    await page.keyboard.type(typed)
    await page.locator('.block-property .diagnostics li.diag-error').first().waitFor()
    // A span is underlined (cm-lintRange); an error at the very end is marked as a point (cm-lintPoint).
    expect(await page.locator('.block-property .cm-lintRange-error, .block-property .cm-lintPoint-error').count()).toBeGreaterThan(0)
    // Oracle: the kernel in Node, on the same edit (typed at the end of the first property block).
    const guide = readFileSync(join(ROOT, 'notebooks/guide.md'), 'utf8')
    const fence = guide.indexOf('```property\n')
    const close = guide.indexOf('\n```', fence + 12) + 1
    const edited = guide.slice(0, close) + typed + '\n' + guide.slice(close)
    const errors = analyzeNotebook(edited).diagnostics.filter((d) => d.severity === 'error')
    const shown = await page.locator('.block-property .diagnostics li.diag-error').first().textContent()
    expect(errors.length).toBeGreaterThan(0)
    expect(shown).toContain(`line ${errors[0].line}, column ${errors[0].column}`)
    await context.close()
  })
})

describe('reasons', () => {
  it('links each refused rule to its line, and the link puts the cursor there', async () => {
    const quay = "# Quay bells\n\n```protocol\nprotocol quay {\n  timing synchronous(delay: 1, idle: 1)\n  faults crash\n  message bell\n  state heard[peer]: bool = false\n  state loud: bool = false\n  on bell from q { heard[q] := true }\n  step {\n    loud := some q: heard[q]\n    if loud { broadcast bell }\n  }\n}\n```\n\n```property\nproperty rings = forall p, q: always (p.heard[q] implies alive(q) or crashed(q))\n```\n\n```check\ncheck quay: rings\n```\n"
    // Oracle: the kernel in Node refuses the cutoff with reasons (an aggregate feeds a broadcast).
    const report = await runNotebook(quay, 'quay.md', {})
    const reason = report.checks[0].cutoff.reasons[0]
    const { context, page } = await open()
    await importText(page, 'quay.md', quay)
    await page.locator('.doc-title', { hasText: 'Quay bells' }).waitFor()
    await page.waitForSelector('.check-line button.run:not([disabled])')
    await page.locator('.check-line button.run').first().click()
    await page.waitForSelector('.check-line.fresh')
    const link = page.locator(`a.jump[data-line="${reason.line}"]`).first()
    expect(await link.textContent()).toBe(`line ${reason.line}, column ${reason.column}`)
    await link.click()
    // The editor draws the line once it has scrolled there (a frame later): wait for it.
    const want = quay.split('\n')[reason.line - 1]
    await page.waitForFunction((w) => document.activeElement?.closest('.block-protocol')?.querySelector('.cm-focused .cm-activeLine')?.textContent === w, want, { timeout: 5000 })
    await context.close()
  })
})
