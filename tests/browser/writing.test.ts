// Writing in the workbench (issue 13, items 11 to 14) in the built page in Chromium: Tab moves
// focus and never edits, indentation comes from Enter, `}` and Mod-] / Mod-[, toolbars are one tab
// stop, new blocks start from templates, the title follows the first heading, exports raise no
// unrelated notices, search, the shortcut list, "run every check" and copying a table as Markdown.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { analyzeNotebook, runNotebook } from '../../kernels/api'
import { findingsMarkdown } from '../../src/app/results'
import { ARTIFACTS, ROOT, openPage, startWorkbench, type Workbench } from './harness'

let bench: Workbench
beforeAll(async () => { bench = await startWorkbench() })
afterAll(async () => { await bench?.close() })

const editorText = (page: Page, sel: string) => page.locator(sel).first().evaluate((e) => {
  const view = (e.querySelector('.cm-content') as unknown as { cmView?: { view: { state: { doc: { toString(): string } } } } }).cmView?.view
  return view ? view.state.doc.toString() : [...e.querySelectorAll('.cm-line')].map((l) => l.textContent).join('\n')
})

describe('keys in the editors', () => {
  it('Tab leaves the editor without changing the notebook', async () => {
    const { context, page } = await openPage(bench)
    await page.locator('.block-protocol .cm-content').first().click()
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => !!document.activeElement?.closest('.block-protocol .cm-editor'))).toBe(false)
    await page.keyboard.press('Shift+Tab')
    expect(await page.evaluate(() => !!document.activeElement?.closest('.block-protocol .cm-editor'))).toBe(true)
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => !!document.activeElement?.closest('.block-protocol .cm-editor'))).toBe(false)
    // Oracle: the notebook text, exported, is still the guide exactly.
    await page.locator('details.exports summary').click()
    const download = page.waitForEvent('download')
    await page.getByRole('button', { name: 'export the notebook as Markdown' }).click()
    const text = readFileSync((await (await download).path())!, 'utf8')
    expect(text).toBe(readFileSync(join(ROOT, 'notebooks/guide.md'), 'utf8'))
    await context.close()
  })

  it('indents on Enter after a brace, dedents on a typed closing brace, and indents with Mod-] / Mod-[', async () => {
    const { context, page } = await openPage(bench)
    await page.locator('.block-check .cm-content').first().click()
    await page.keyboard.press('Control+End')
    await page.keyboard.type('step {')
    await page.keyboard.press('Enter')
    await page.keyboard.type('x')
    let lines = (await editorText(page, '.block-check')).split('\n')
    expect(lines.at(-1)).toBe('  x')
    await page.keyboard.press('Enter')
    await page.keyboard.type('}')
    lines = (await editorText(page, '.block-check')).split('\n')
    expect(lines.at(-1)).toBe('}')
    await page.keyboard.press('Control+BracketRight')
    lines = (await editorText(page, '.block-check')).split('\n')
    expect(lines.at(-1)).toBe('  }')
    await page.keyboard.press('Control+BracketLeft')
    lines = (await editorText(page, '.block-check')).split('\n')
    expect(lines.at(-1)).toBe('}')
    await context.close()
  })

  it('makes each block toolbar one tab stop with the arrow keys inside', async () => {
    const { context, page } = await openPage(bench)
    const tools = page.locator('.block-protocol .block-tools').first()
    expect(await tools.getAttribute('role')).toBe('toolbar')
    const stops = await tools.evaluate((t) => [...t.querySelectorAll<HTMLElement>('button, summary')].filter((b) => b.tabIndex === 0).length)
    expect(stops).toBe(1)
    await tools.locator('[tabindex="0"]').focus()
    const first = await page.evaluate(() => document.activeElement?.getAttribute('aria-label'))
    await page.keyboard.press('ArrowRight')
    const second = await page.evaluate(() => document.activeElement?.getAttribute('aria-label'))
    expect(second).not.toBe(first)
    expect(await page.evaluate(() => !!document.activeElement?.closest('.block-tools'))).toBe(true)
    await page.keyboard.press('Tab')
    expect(await page.evaluate(() => !!document.activeElement?.closest('.block-protocol .block-tools'))).toBe(false)
    await context.close()
  })

  it('searches inside an editor and lists the shortcuts on ?', async () => {
    const { context, page } = await openPage(bench)
    await page.locator('.block-protocol .cm-content').first().click()
    await page.keyboard.press('Control+f')
    await page.locator('.block-protocol .cm-search input[name="search"]').waitFor()
    await page.keyboard.type('state')
    await page.keyboard.press('Enter')
    expect(await page.locator('.block-protocol .cm-searchMatch').count()).toBeGreaterThan(0)
    await page.keyboard.press('Escape')
    await page.locator('.doc-title').click()
    await page.keyboard.press('Shift+Slash')
    await page.locator('dialog.shortcuts[open]').waitFor()
    expect(await page.locator('dialog.shortcuts').textContent()).toContain('Alt-Shift-C')
    await page.screenshot({ path: join(ARTIFACTS, 'shortcuts.png') })
    await page.keyboard.press('Escape')
    await page.getByRole('button', { name: 'keyboard shortcuts (press ?)' }).click()
    await page.locator('dialog.shortcuts[open]').waitFor()
    await context.close()
  })
})

describe('blocks and titles', () => {
  it('starts a new block from a short template of its kind that reads without errors', async () => {
    const { context, page } = await openPage(bench)
    const protocol = page.locator('.block-protocol').first()
    await protocol.hover()
    await protocol.locator('details.add summary').click()
    await protocol.getByRole('button', { name: 'insert a checks block after this one' }).click()
    const added = page.locator('.block-check').first()
    const text = await editorText(page, '.block-check')
    expect(text).toMatch(/^check \w+: \w+\n$/)
    // Oracle: the kernel reads the guide with the template added and finds no error in it.
    const guide = readFileSync(join(ROOT, 'notebooks/guide.md'), 'utf8')
    const errors = analyzeNotebook(guide + '\n```check\n' + text + '```\n').diagnostics.filter((d) => d.severity === 'error')
    expect(errors).toEqual([])
    expect(await added.count()).toBe(1)
    await context.close()
  })

  it('lets the title follow the first heading until the notebook is renamed', async () => {
    const { context, page } = await openPage(bench)
    await page.getByRole('button', { name: 'new notebook' }).click()
    await page.locator('.doc-title', { hasText: 'Untitled notebook' }).waitFor()
    await page.locator('.block-prose .prose-rendered').first().dblclick()
    const area = page.locator('textarea.prose-source')
    await area.fill('# Ferry timetable\n\nWhen the boats leave.\n')
    await page.keyboard.press('Escape')
    await page.locator('.doc-title', { hasText: 'Ferry timetable' }).waitFor()
    await page.getByRole('button', { name: 'rename Ferry timetable' }).click()
    await page.locator('input.rename').fill('Crossings')
    await page.keyboard.press('Enter')
    await page.locator('.doc-title', { hasText: 'Crossings' }).waitFor()
    await page.locator('.block-prose .prose-rendered').first().dblclick()
    await page.locator('textarea.prose-source').fill('# Winter timetable\n\nWhen the boats leave.\n')
    await page.keyboard.press('Escape')
    await page.waitForTimeout(300)
    expect(await page.locator('.doc-title').textContent()).toBe('Crossings')
    await context.close()
  })

  it('exports raise no unrelated notices', async () => {
    const { context, page } = await openPage(bench)
    await page.getByRole('button', { name: 'run every check in the notebook again' }).click()
    await page.waitForFunction(() => [...document.querySelectorAll('.check-line')].every((l) => l.classList.contains('fresh')), null, { timeout: 90_000 })
    await page.locator('details.exports summary').click()
    const download = page.waitForEvent('download')
    await page.getByRole('button', { name: 'export the verification record as JSON' }).click()
    await download
    await page.waitForTimeout(300)
    expect(await page.locator('.notice').allTextContents()).toEqual([])
    await context.close()
  })
})

describe('running and copying', () => {
  it('runs every check again, not only the changed ones, and copies a result table as Markdown', async () => {
    const { context, page } = await openPage(bench)
    await context.grantPermissions(['clipboard-read', 'clipboard-write'])
    const run = page.getByRole('button', { name: 'run every check in the notebook again' })
    await run.click()
    await page.waitForFunction(() => [...document.querySelectorAll('.check-line')].every((l) => l.classList.contains('fresh')), null, { timeout: 90_000 })
    // Everything is up to date; "run every check" still runs them.
    await page.evaluate(() => { (window as unknown as { __ran: number }).__ran = 0; new MutationObserver((m) => { for (const r of m) if ((r.target as Element).classList?.contains('running')) (window as unknown as { __ran: number }).__ran++ }).observe(document.body, { subtree: true, attributes: true, attributeFilter: ['class'] }) })
    await run.click()
    await page.waitForFunction(() => (window as unknown as { __ran: number }).__ran > 0)
    await page.waitForFunction(() => [...document.querySelectorAll('.check-line')].every((l) => l.classList.contains('fresh') && !l.classList.contains('running')), null, { timeout: 90_000 })
    await page.locator('.check-line').first().getByRole('button', { name: 'copy this result table as Markdown' }).click()
    const copied = await page.evaluate(() => navigator.clipboard.readText())
    // Oracle: the kernel's rows for the same check, through the same table writer.
    const guide = readFileSync(join(ROOT, 'notebooks/guide.md'), 'utf8')
    const report = await runNotebook(guide, 'notebooks/guide.md', {})
    const rows = report.checks.filter((r) => r.check === 0)
    expect(copied.replace(/\(\d[\d,]* states\)/g, '')).toBe(findingsMarkdown(rows).replace(/\(\d[\d,]* states\)/g, ''))
    expect(copied.split('\n')[1]).toMatch(/^\| --- \|/)
    await context.close()
  })
})
