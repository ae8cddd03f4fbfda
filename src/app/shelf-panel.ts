// The shelf: the notebooks kept in this browser, with title and last change, and what can be done
// with them (open, rename, duplicate, delete with undo, new, import). It holds no notebook state of
// its own; every action goes to the store or back to the workbench.
import { button, el } from './dom'
import { ACTION_WINDOW } from './notices'
import { Shelf, type NotebookSummary, type StoredNotebook } from './store'
import { titleOf, withTitle } from './title'
import { errorText } from '../../kernels/api'

/** What the shelf asks of the workbench. */
export interface ShelfActions {
  open(id: string): void
  current(): string
  rename(id: string, title: string): Promise<void>
  duplicated(entry: StoredNotebook): void
  deleted(entry: StoredNotebook): Promise<void>
  created(): void
  imported(file: File): Promise<boolean>
  restoreGuide(): void
  notice(message: string, action?: { label: string; run: () => void }): void
  /** Offer a text as a `.md` download (a notebook the browser would not keep). */
  exportText(text: string): void
}

function when(ms: number): string {
  const d = new Date(ms)
  const today = new Date().toDateString() === d.toDateString()
  return today ? d.toLocaleTimeString([], { hour: '2-digit', minute: '2-digit' }) : d.toLocaleDateString()
}

/** The list panel. */
export class ShelfPanel {
  readonly root: HTMLElement
  private list = el('ul', { class: 'shelf-list' })
  /** Notebooks deleted but still inside their undo window: kept here, whole, until the delete is stored. */
  private deleting = new Map<string, { entry: StoredNotebook; timer: number }>()
  private fileInput = el('input', { type: 'file', accept: '.md,.markdown,text/markdown,text/plain', class: 'file-input', 'aria-label': 'choose a Markdown notebook to import' })

  constructor(private shelf: Shelf, private actions: ShelfActions) {
    this.fileInput.addEventListener('change', async () => {
      const file = this.fileInput.files?.[0]
      this.fileInput.value = ''
      if (file) await this.actions.imported(file)
      await this.refresh()
    })
    this.root = el('nav', { class: 'shelf', 'aria-label': 'notebooks kept in this browser' },
      el('h2', {}, 'In this browser'),
      this.list,
      el('div', { class: 'shelf-actions' },
        button('new notebook', () => this.actions.created()),
        button('import .md', () => this.fileInput.click(), { 'aria-label': 'import a Markdown notebook' }),
        button('add the guide', () => this.actions.restoreGuide(), { 'aria-label': 'add a fresh copy of the guide notebook' }),
        this.fileInput))
  }

  /** Re-reads the list from the store. */
  async refresh(): Promise<void> {
    let items: NotebookSummary[]
    try {
      items = await this.shelf.list()
    } catch (e) {
      this.list.replaceChildren(el('li', { class: 'quiet' }, `The list could not be read: ${errorText(e)}`))
      return
    }
    this.list.replaceChildren(...items.filter((n) => !this.deleting.has(n.id)).map((n) => this.item(n)))
  }

  private item(n: NotebookSummary): HTMLElement {
    const current = n.id === this.actions.current()
    const open = button(n.title, () => this.actions.open(n.id), { class: 'shelf-open', 'aria-current': current ? 'true' : undefined, 'aria-label': `open ${n.title}, changed ${when(n.changed)}` })
    const li = el('li', { class: current ? 'current' : '', 'data-id': n.id },
      open,
      el('span', { class: 'changed' }, when(n.changed)),
      el('span', { class: 'shelf-item-actions' },
        button('rename', () => this.renaming(li, n), { 'aria-label': `rename ${n.title}` }),
        button('copy', () => void this.duplicate(n), { 'aria-label': `duplicate ${n.title}` }),
        button('delete', () => void this.remove(n), { 'aria-label': `delete ${n.title}` })))
    return li
  }

  private renaming(li: HTMLElement, n: NotebookSummary): void {
    const input = el('input', { type: 'text', class: 'rename', 'aria-label': `new title for ${n.title}` })
    input.value = n.title
    const commit = async (ok: boolean) => {
      input.onblur = null
      const title = input.value.trim()
      if (ok && title && title !== n.title) {
        try { await this.actions.rename(n.id, title) } catch (e) { this.actions.notice(`Could not rename: ${errorText(e)}`) }
      }
      await this.refresh()
    }
    input.addEventListener('keydown', (e) => {
      if (e.key === 'Enter') { e.preventDefault(); void commit(true) }
      if (e.key === 'Escape') { e.preventDefault(); void commit(false) }
    })
    input.onblur = () => void commit(true)
    li.querySelector('.shelf-open')!.replaceWith(input)
    input.focus()
    input.select()
  }

  private async duplicate(n: NotebookSummary): Promise<void> {
    try {
      const copy = await this.shelf.duplicate(n.id, (text) => withTitle(text, `${titleOf(text) ?? n.title} (copy)`))
      await this.refresh()
      this.actions.duplicated(copy)
    } catch (e) {
      this.actions.notice(`Could not duplicate: ${errorText(e)}`)
    }
  }

  /**
   * Deletes with undo. The notebook leaves the list at once, but its text stays (here and in
   * storage) until the undo window has passed; only then is the delete written. Undo is therefore
   * never a write that could fail, and a delete that storage refuses leaves the notebook listed.
   */
  private async remove(n: NotebookSummary): Promise<void> {
    let entry: StoredNotebook | undefined
    try { entry = await this.shelf.load(n.id) } catch (e) { this.actions.notice(`Could not delete: ${errorText(e)}`); return }
    if (!entry) return
    const kept = entry
    const timer = window.setTimeout(() => void this.commitDelete(kept), ACTION_WINDOW)
    this.deleting.set(n.id, { entry: kept, timer })
    await this.refresh()
    await this.actions.deleted(kept)
    this.actions.notice(`Deleted “${n.title}”.`, { label: 'undo', run: () => void this.undoDelete(n.id) })
  }

  private async undoDelete(id: string): Promise<void> {
    const pending = this.deleting.get(id)
    if (!pending) return
    window.clearTimeout(pending.timer)
    this.deleting.delete(id)
    await this.refresh()
    this.actions.open(id)
  }

  private async commitDelete(entry: StoredNotebook): Promise<void> {
    try {
      await this.shelf.remove(entry.id)
      this.deleting.delete(entry.id)
    } catch (e) {
      this.deleting.delete(entry.id)
      await this.refresh()
      this.actions.notice(`Could not delete “${titleOf(entry.text) ?? 'the notebook'}” (${errorText(e)}); it is still kept.`,
        { label: 'save it as .md', run: () => this.actions.exportText(entry.text) })
    }
  }
}
