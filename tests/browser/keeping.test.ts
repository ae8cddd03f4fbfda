// Nothing lost (issue 13, items 1 to 3), in the built workbench in Chromium: two tabs on one
// notebook, edits in the last moments before a reload, deleting and importing while the browser
// refuses writes. The oracle is the stored text itself, read straight from IndexedDB.
import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { Page } from 'playwright-core'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { ARTIFACTS, importText, openPage, startWorkbench, watchErrors, type Workbench } from './harness'

let bench: Workbench
beforeAll(async () => { bench = await startWorkbench() })
afterAll(async () => { await bench?.close() })

/** A small notebook of our own: ferry slips that signal each other. */
const ferries = `# Ferry slips

The slips of a ferry crossing tell each other when a boat is moored.

\`\`\`protocol
protocol slips {
  timing synchronous(delay: 1, idle: 1)
  faults crash
  message moored
  state heard[peer]: bool = false
  on moored from q { heard[q] := true }
  step { broadcast moored }
}
\`\`\`

\`\`\`property
property calm = forall p, q: always (p.heard[q] or not p.heard[q])
\`\`\`

\`\`\`check
check slips: calm
\`\`\`
`

/** Reads a key of the workbench's IndexedDB store in the page. */
function idbGet(page: Page, key: string): Promise<unknown> {
  return page.evaluate((k) => new Promise((ok, fail) => {
    const req = indexedDB.open('twofold')
    req.onerror = () => fail(req.error)
    req.onsuccess = () => {
      const get = req.result.transaction('kv').objectStore('kv').get(k)
      get.onsuccess = () => { ok(get.result); req.result.close() }
      get.onerror = () => fail(get.error)
    }
  }), key)
}

/** Writes a key straight into IndexedDB, as a tab whose save message was never heard would. */
function idbPut(page: Page, key: string, value: unknown): Promise<void> {
  return page.evaluate(([k, v]) => new Promise<void>((ok, fail) => {
    const req = indexedDB.open('twofold')
    req.onsuccess = () => {
      const tx = req.result.transaction('kv', 'readwrite')
      tx.objectStore('kv').put(v, k as string)
      tx.oncomplete = () => { req.result.close(); ok() }
      tx.onerror = () => fail(tx.error)
    }
  }), [key, value] as const)
}

async function openId(page: Page): Promise<string> { return (await idbGet(page, 'open')) as string }
async function stored(page: Page): Promise<{ text: string; changed: number }> {
  return (await idbGet(page, 'nb:' + (await openId(page)))) as { text: string; changed: number }
}

async function openFerries(): Promise<{ page: Page; context: Awaited<ReturnType<typeof openPage>>['context'] }> {
  const { context, page } = await openPage(bench)
  await importText(page, 'ferries.md', ferries)
  await page.locator('.doc-title', { hasText: 'Ferry slips' }).waitFor()
  await page.waitForFunction(() => !document.querySelector('.save-state')?.textContent?.startsWith('editing'))
  return { context, page }
}

async function typeAtEndOfCheck(page: Page, text: string): Promise<void> {
  await page.locator('.block-check .cm-line', { hasText: 'check slips' }).first().click()
  await page.keyboard.press('End')
  await page.keyboard.type(text)
}

describe('two tabs on one notebook', () => {
  it('shows each tab the other one’s saved edits, live', async () => {
    const { context, page } = await openFerries()
    const other = await context.newPage()
    const errors = watchErrors(other)
    await other.goto(bench.url)
    await other.locator('.doc-title', { hasText: 'Ferry slips' }).waitFor()
    await typeAtEndOfCheck(page, ' // tide table')
    await page.waitForFunction(() => document.querySelector('.save-state')?.textContent?.startsWith('saved'))
    await other.locator('.block-check .cm-line', { hasText: 'tide table' }).waitFor({ timeout: 10_000 })
    expect(await other.locator('.save-state').textContent()).toMatch(/updated from another tab/)
    expect(errors).toEqual([])
    await context.close()
  })

  it('merges a stored version it has not seen when the edits touch different lines', async () => {
    const { context, page } = await openFerries()
    const before = await stored(page)
    // Another tab changed the prose and stored it without this tab hearing of it.
    const theirs = before.text.replace('when a boat is moored', 'when a boat is moored or cast off')
    await idbPut(page, 'nb:' + (await openId(page)), { id: await openId(page), text: theirs, changed: before.changed + 1 })
    await typeAtEndOfCheck(page, ' // mine')
    await page.locator('.notice', { hasText: 'merged' }).waitFor()
    const after = await stored(page)
    expect(after.text).toContain('when a boat is moored or cast off')
    expect(after.text).toContain('check slips: calm // mine')
    // The page shows the merged text too.
    expect(await page.locator('.prose-rendered', { hasText: 'cast off' }).count()).toBe(1)
    await context.close()
  })

  it('keeps both versions, the other as a copy, when the edits touch the same line', async () => {
    const { context, page } = await openFerries()
    const before = await stored(page)
    const theirs = before.text.replace('check slips: calm', 'check slips: calm // theirs')
    await idbPut(page, 'nb:' + (await openId(page)), { id: await openId(page), text: theirs, changed: before.changed + 1 })
    await typeAtEndOfCheck(page, ' // mine')
    await page.locator('.notice', { hasText: 'kept as' }).waitFor()
    expect((await stored(page)).text).toContain('check slips: calm // mine')
    await page.locator('.shelf-open', { hasText: 'Ferry slips (from another tab)' }).waitFor()
    await page.locator('.shelf-open', { hasText: 'Ferry slips (from another tab)' }).click()
    await page.locator('.block-check .cm-line', { hasText: '// theirs' }).waitFor()
    await context.close()
  })
})

describe('the last moments before closing', () => {
  it('keeps an edit typed just before a reload (inside the save pause)', async () => {
    const { context, page } = await openFerries()
    await typeAtEndOfCheck(page, ' // last words')
    await page.reload() // at once: the debounced save has not run
    await page.locator('.doc-title', { hasText: 'Ferry slips' }).waitFor()
    await page.locator('.block-check .cm-line', { hasText: 'last words' }).waitFor({ timeout: 10_000 })
    await page.waitForFunction(() => document.querySelector('.save-state')?.textContent?.startsWith('saved'))
    expect((await stored(page)).text).toContain('// last words')
    await context.close()
  })

  it('keeps an edit typed just before the tab is closed', async () => {
    const { context, page } = await openFerries()
    await typeAtEndOfCheck(page, ' // closing time')
    await page.close({ runBeforeUnload: true })
    const again = await context.newPage()
    await again.goto(bench.url)
    await again.locator('.block-check .cm-line', { hasText: 'closing time' }).waitFor({ timeout: 10_000 })
    await context.close()
  })
})

/** Every IndexedDB write and delete now fails, as with a full disk. */
async function refuseWrites(page: Page): Promise<void> {
  await page.evaluate(() => {
    const refuse = function () { throw new DOMException('the quota is used up', 'QuotaExceededError') }
    IDBObjectStore.prototype.put = refuse
    IDBObjectStore.prototype.delete = refuse
  })
}

describe('while the browser refuses writes', () => {
  it('deleting and then undoing loses nothing', async () => {
    const { context, page } = await openFerries()
    await page.locator('.shelf-list li').nth(1).waitFor()
    await refuseWrites(page)
    await page.getByRole('button', { name: 'delete Ferry slips' }).click()
    await page.locator('.doc-title', { hasText: /guide/i }).waitFor()
    expect(await page.locator('.shelf-open', { hasText: 'Ferry slips' }).count()).toBe(0)
    await page.locator('.notice', { hasText: 'Deleted' }).locator('button.undo').click()
    await page.locator('.doc-title', { hasText: 'Ferry slips' }).waitFor()
    await page.locator('.block-check .cm-line', { hasText: 'check slips: calm' }).waitFor()
    expect((await idbGet(page, 'nb:' + (await openId(page))) as { text: string }).text).toBe(ferries)
    await context.close()
  })

  it('a delete the browser refuses leaves the notebook listed, and says so once its undo window ends', async () => {
    const { context, page } = await openFerries()
    await refuseWrites(page)
    await page.getByRole('button', { name: 'delete Ferry slips' }).click()
    await page.locator('.notice', { hasText: 'it is still kept' }).waitFor({ timeout: 25_000 })
    await page.locator('.shelf-open', { hasText: 'Ferry slips' }).waitFor()
    await context.close()
  }, 60_000)

  it('keeps typed text in the page and offers it as a download', async () => {
    const { context, page } = await openFerries()
    await refuseWrites(page)
    await typeAtEndOfCheck(page, ' // unsaved')
    const notice = page.locator('.notice', { hasText: 'Could not save this notebook' })
    await notice.waitFor()
    const download = page.waitForEvent('download')
    await notice.getByRole('button', { name: 'save as .md' }).click()
    const text = readFileSync((await (await download).path())!, 'utf8')
    expect(text).toContain('check slips: calm // unsaved')
    await page.screenshot({ path: join(ARTIFACTS, 'refused-writes.png') })
    await context.close()
  })

  it('an import reports one outcome, not both', async () => {
    const { context, page } = await openPage(bench)
    await refuseWrites(page)
    await importText(page, 'ferries.md', ferries)
    await page.locator('.notice', { hasText: 'ferries.md' }).first().waitFor()
    await page.waitForTimeout(500)
    const notices = await page.locator('.notice').allTextContents()
    expect(notices.filter((n) => n.includes('ferries.md'))).toHaveLength(1)
    expect(notices.join(' ')).toMatch(/Nothing was imported from ferries\.md: this browser refused to store it/)
    expect(notices.join(' ')).not.toMatch(/Could not create|Imported ferries/)
    await context.close()
  })
})
