// Shelf operations on whole notebooks: open, create, rename, what follows a delete, import, and
// the first opening of the page. The page owns the open notebook; this decides which one it is.
import { errorText, type NotebookModel } from '../../kernels/api'
import { ImportRefused, decodeText, importProblems } from './import-file'
import { Shelf, newId, type StoredNotebook } from './store'
import { withTitle } from './title'

/** What the notebook operations need from the page. */
export interface NotebooksHost {
  id(): string
  /** Shows a stored notebook as the open one. */
  load(entry: StoredNotebook): void
  /** Sets the open notebook's title (front matter) and saves it. */
  retitle(title: string): void
  /** Saves the open notebook now if a save is waiting. */
  flush(): Promise<void>
  analyze(text: string): Promise<NotebookModel>
  notice(message: string): void
  shelfChanged(): Promise<void>
}

/** Opening, creating, renaming and importing notebooks. */
export class Notebooks {
  constructor(private shelf: Shelf, private guide: string, private host: NotebooksHost) {}

  /** Opens the notebook kept as open last time, or the guide on a first visit. */
  async start(): Promise<void> {
    let entry: StoredNotebook | undefined
    try {
      const id = await this.shelf.openId()
      if (id) entry = await this.shelf.load(id)
      if (!entry) {
        const list = await this.shelf.list()
        entry = list.length ? await this.shelf.load(list[0].id) : await this.shelf.save(newId(), this.guide)
      }
      await this.shelf.setOpenId(entry!.id)
    } catch (e) {
      this.host.notice(`This browser refused to store notebooks (${errorText(e)}); changes will be lost when the page closes.`)
      entry = { id: newId(), text: this.guide, changed: Date.now() }
    }
    this.host.load(entry!)
    await this.host.shelfChanged()
  }

  async openNotebook(id: string): Promise<void> {
    await this.host.flush()
    try {
      const entry = await this.shelf.load(id)
      if (!entry) { this.host.notice('That notebook is no longer kept in this browser.'); return }
      // Which notebook is open is a convenience for the next visit; a refused write must not stop the opening.
      await this.shelf.setOpenId(id).catch(() => undefined)
      this.host.load(entry)
      await this.host.shelfChanged()
    } catch (e) {
      this.host.notice(`Could not open the notebook: ${errorText(e)}`)
    }
  }

  async rename(id: string, title: string): Promise<void> {
    if (id === this.host.id()) {
      this.host.retitle(title)
      await this.host.flush()
      return
    }
    const entry = await this.shelf.load(id)
    if (entry) await this.shelf.save(id, withTitle(entry.text, title))
    await this.host.shelfChanged()
  }

  async afterDelete(entry: StoredNotebook): Promise<void> {
    if (entry.id === this.host.id()) {
      // The deleted notebook stays stored through its undo window: never reopen it here.
      const list = (await this.shelf.list()).filter((n) => n.id !== entry.id)
      if (list.length) await this.openNotebook(list[0].id)
      else await this.newNotebook(this.guide)
    }
  }

  // No front matter: the title follows the first heading until the notebook is renamed.
  async newNotebook(text = '# Untitled notebook\n\nWrite what the protocol is for here.\n\n'): Promise<void> {
    try {
      await this.createNotebook(text)
    } catch (e) {
      this.host.notice(`Could not create a notebook in this browser: ${errorText(e)}`)
    }
  }

  /** Stores a new notebook and opens it; rejects when the browser refuses to store it. */
  private async createNotebook(text: string): Promise<void> {
    await this.host.flush()
    const entry = await this.shelf.save(newId(), text)
    await this.openNotebook(entry.id)
  }

  async addGuide(): Promise<void> { await this.newNotebook(this.guide) }

  /** Imports a `.md` file: adds it only when it is text and reads without errors. */
  async importFile(file: File): Promise<boolean> {
    try {
      const text = decodeText(new Uint8Array(await file.arrayBuffer()))
      const problems = importProblems(await this.host.analyze(text))
      if (problems.length) throw new ImportRefused(problems)
      await this.createNotebook(text)
      this.host.notice(`Imported ${file.name}.`)
      return true
    } catch (e) {
      const reasons = e instanceof ImportRefused ? e.reasons : [`this browser refused to store it (${errorText(e)})`]
      const shown = reasons.slice(0, 3).join('; ') + (reasons.length > 3 ? `; and ${reasons.length - 3} more` : '')
      this.host.notice(`Nothing was imported from ${file.name}: ${shown}.`)
      return false
    }
  }
}
