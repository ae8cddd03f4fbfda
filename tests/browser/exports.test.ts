// Exports, the shelf and block editing in the built workbench. The record is compared with the kernel run
// directly in Node on the same notebook (the oracle); the report is read as text.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { analyzeNotebook, buildRecord, canonicalJsonPretty, runNotebook } from '../../kernels/api'
import { ROOT, openPage, startWorkbench, type Workbench } from './harness'

let bench: Workbench
beforeAll(async () => { bench = await startWorkbench() })
afterAll(async () => { await bench?.close() })
const open = () => openPage(bench)

describe('exports', () => {
  it('exports a verification record with every row the kernel plans for the notebook', async () => {
    const { context, page } = await open()
    const download = page.waitForEvent('download', { timeout: 90_000 })
    await page.locator('details.exports summary').click()
    await page.getByRole('button', { name: 'export the verification record as JSON' }).click()
    const record = JSON.parse(readFileSync((await (await download).path())!, 'utf8'))
    // Oracle: the kernel run directly in Node on the same guide text.
    const guide = readFileSync(join(ROOT, 'notebooks/guide.md'), 'utf8')
    const report = await runNotebook(guide, 'notebooks/guide.md', {})
    expect(record.format.name).toBe('twofold-record')
    expect(record.notebook.sha256).toBe(report.notebook.sha256)
    expect(record.checks.map((r: { row: number; verdict: string }) => [r.row, r.verdict])).toEqual(report.checks.map((r) => [r.row, r.verdict]))
    // The page made it as `twofold check --record` makes it: the same record, apart from its
    // creation time and the rows' running times.
    const cli = JSON.parse(canonicalJsonPretty(await buildRecord(await runNotebook(guide, record.notebook.path, {}), guide, analyzeNotebook(guide))))
    const timeless = (r: { created?: string; checks: { seconds?: number }[] }) => ({ ...r, created: null, checks: r.checks.map((row) => ({ ...row, seconds: null })) })
    expect(timeless(record)).toEqual(timeless(cli))
    // Its rows are now the page's findings: every check line is up to date.
    await page.waitForFunction(() => [...document.querySelectorAll('.check-line')].every((l) => l.classList.contains('fresh')))
    await context.close()
  })

  it('exports a self-contained report with findings and no scripts', async () => {
    const { context, page } = await open()
    await page.locator('.check-line').first().locator('button.run').click()
    await page.waitForSelector('.check-line.fresh', { timeout: 60_000 })
    const download = page.waitForEvent('download')
    await page.locator('details.exports summary').click()
    await page.getByRole('button', { name: 'export a self-contained HTML report' }).click()
    const html = readFileSync((await (await download).path())!, 'utf8')
    expect(html).not.toMatch(/<script/i)
    // The policy attribute is entity-escaped; a browser reads &#39; as a quote.
    expect(html).toMatch(/Content-Security-Policy" content="default-src (&#39;|')none/)
    expect(html).toContain('class="verdict v-')
    expect(html).toContain('<math')
    expect(html).not.toMatch(/src="(?!data:)/)
    await context.close()
  })
})

describe('the shelf', () => {
  it('renames, duplicates, and deletes with undo', async () => {
    const { context, page } = await open()
    const items = page.locator('.shelf-list li')
    await items.first().waitFor()
    await page.getByRole('button', { name: /^rename / }).first().click()
    await page.locator('input.rename').fill('Quay lamps')
    await page.keyboard.press('Enter')
    await page.locator('.doc-title', { hasText: 'Quay lamps' }).waitFor()
    await page.getByRole('button', { name: /^duplicate / }).first().click()
    await page.locator('.shelf-open', { hasText: 'Quay lamps (copy)' }).waitFor()
    expect(await items.count()).toBe(2)
    await page.getByRole('button', { name: 'delete Quay lamps (copy)' }).click()
    await page.waitForFunction(() => document.querySelectorAll('.shelf-list li').length === 1)
    await page.locator('.notice button.undo').click()
    await page.waitForFunction(() => document.querySelectorAll('.shelf-list li').length === 2)
    await context.close()
  })
})

describe('blocks', () => {
  it('inserts, moves and removes blocks as spans of the notebook text', async () => {
    const { context, page } = await open()
    const blocks = page.locator('.notebook > .block')
    const before = await blocks.count()
    const kinds = () => blocks.evaluateAll((els) => els.map((e) => [...e.classList].find((c) => c.startsWith('block-') && c !== 'block-formal')))
    const original = await kinds()
    // Insert a property block after the first protocol block.
    const protocolIndex = original.indexOf('block-protocol')
    const protocol = blocks.nth(protocolIndex)
    await protocol.hover()
    await protocol.locator('details.add summary').click()
    await protocol.getByRole('button', { name: 'insert a properties block after this one' }).click()
    expect(await blocks.count()).toBe(before + 1)
    expect((await kinds())[protocolIndex + 1]).toBe('block-property')
    // Move it up above the protocol, then remove it and put it back.
    const added = blocks.nth(protocolIndex + 1)
    await added.hover()
    await added.getByRole('button', { name: 'move this block up' }).click()
    expect((await kinds()).slice(protocolIndex, protocolIndex + 2)).toEqual(['block-property', 'block-protocol'])
    const moved = blocks.nth(protocolIndex)
    await moved.hover()
    await moved.getByRole('button', { name: 'remove this block' }).click()
    expect(await kinds()).toEqual(original)
    await page.locator('.notice button.undo').click()
    expect(await blocks.count()).toBe(before + 1)
    await context.close()
  })
})

describe('refused writes', () => {
  it('tells the user when the browser refuses to save', async () => {
    const { context, page } = await open()
    // Simulate a full disk: every IndexedDB write now fails the way a quota error does.
    await page.evaluate(() => {
      IDBObjectStore.prototype.put = function () { throw new DOMException('the quota is used up', 'QuotaExceededError') }
    })
    await page.locator('.block-protocol .cm-content').first().click()
    await page.keyboard.type('x')
    await page.locator('.notice', { hasText: 'Could not save this notebook' }).waitFor()
    expect(await page.locator('.save-state').textContent()).toBe('not saved')
    await context.close()
  })
})
