// Keeping the open notebook: saves after a pause in typing and when the page is hidden or closed,
// tells other tabs of each save (BroadcastChannel) and takes in theirs, and never writes over a
// stored version it has not seen: edits on both sides are merged by lines when they do not touch
// the same lines, otherwise the other version is kept as a copy and the user is told.
import { mergeTexts } from './merge'
import { Shelf, newId, shownTitle, type StoredNotebook } from './store'
import { withTitle } from './title'
import { errorText } from '../../kernels/api'

const SAVE_DELAY = 500
const CHANNEL = 'twofold-notebooks'
/** localStorage key of text written synchronously as the page goes away (IndexedDB is asynchronous). */
const PENDING = 'twofold:unsaved:'

/** What the keeper needs from the page. */
export interface KeeperHost {
  id(): string
  text(): string
  /** Replace the open notebook's text (another tab's edits, or a merge). */
  adopt(text: string): void
  status(text: string): void
  notice(message: string, action?: { label: string; run: () => void }): void
  /** Offer the notebook as a download (when the browser refuses to store it). */
  exportNow(): void
  shelfChanged(): void
}

/** A save message between tabs. */
interface Saved { id: string; text: string; changed: number }

/** Runs `f` holding a lock shared by every tab of this origin, where the browser has Web Locks. */
function locked<T>(f: () => Promise<T>): Promise<T> {
  const locks = (navigator as Navigator & { locks?: LockManager }).locks
  return locks ? (locks.request('twofold-save', f) as Promise<T>) : f()
}

/** Saves the open notebook and keeps it in step with other tabs. */
export class Keeper {
  /** The stored version this tab last saw for the open notebook. */
  private base: StoredNotebook | null = null
  private timer = 0
  private channel: BroadcastChannel | null = typeof BroadcastChannel === 'function' ? new BroadcastChannel(CHANNEL) : null
  private failing = false

  constructor(private shelf: Shelf, private host: KeeperHost) {
    this.channel?.addEventListener('message', (e) => this.heard(e.data as Saved))
    // Closing, reloading or switching away must not lose the last half second of typing.
    const away = () => { if (this.timer) { this.keepPending(); void this.flush() } }
    window.addEventListener('pagehide', away)
    document.addEventListener('visibilitychange', () => { if (document.visibilityState === 'hidden') away() })
  }

  /** The notebook `entry` was opened as stored: it is the version later saves build on. */
  opened(entry: StoredNotebook): StoredNotebook {
    window.clearTimeout(this.timer)
    this.timer = 0
    this.base = { ...entry }
    const pending = this.readPending(entry.id)
    if (pending && pending.text !== entry.text) {
      // Text kept as the page closed, newer than what IndexedDB had: put it back and save it.
      const merged = pending.changed === entry.changed ? pending.text : mergeTexts(pending.baseText, pending.text, entry.text)
      if (merged !== null) {
        this.changed()
        return { ...entry, text: merged }
      }
    }
    this.clearPending(entry.id)
    return entry
  }

  /** The text changed: save it after a pause. */
  changed(): void {
    window.clearTimeout(this.timer)
    this.host.status('editing…')
    this.timer = window.setTimeout(() => { this.timer = 0; void this.save() }, SAVE_DELAY)
  }

  /** Saves now if a save is waiting. */
  async flush(): Promise<void> {
    if (!this.timer) return
    window.clearTimeout(this.timer)
    this.timer = 0
    await this.save()
  }

  /** Whether there are edits not yet stored. */
  get dirty(): boolean { return this.timer !== 0 || (this.base !== null && this.base.text !== this.host.text()) }

  private async save(): Promise<void> {
    const id = this.host.id()
    const text = this.host.text()
    try {
      const entry = await locked(() => this.write(id, text))
      if (this.host.id() !== id) return
      this.base = entry
      this.clearPending(id)
      this.failing = false
      if (entry.text !== text && this.host.text() === text) this.host.adopt(entry.text)
      this.host.status(`saved ${new Date(entry.changed).toLocaleTimeString()}`)
      this.channel?.postMessage({ id, text: entry.text, changed: entry.changed } satisfies Saved)
      this.host.shelfChanged()
    } catch (e) {
      this.keepPending()
      this.host.status('not saved')
      if (!this.failing) {
        this.host.notice(`Could not save this notebook in the browser: ${errorText(e)}. The text stays open here; save it as .md to keep your changes.`,
          { label: 'save as .md', run: () => this.host.exportNow() })
      }
      this.failing = true
    }
  }

  /** Writes `text` unless the stored version moved on unseen, in which case merge or keep both. */
  private async write(id: string, text: string): Promise<StoredNotebook> {
    const stored = await this.shelf.load(id)
    const base = this.base?.id === id ? this.base : null
    const unseen = stored && base && stored.changed !== base.changed && stored.text !== base.text && stored.text !== text
    if (!unseen) return this.shelf.save(id, text)
    const merged = mergeTexts(base.text, text, stored.text)
    if (merged !== null) {
      this.host.notice('This notebook was also changed in another tab; both sets of edits are kept, merged.')
      return this.shelf.save(id, merged)
    }
    const title = `${shownTitle(stored.text)} (from another tab)`
    await this.shelf.save(newId(), withTitle(stored.text, title), stored.changed)
    this.host.notice(`This notebook was changed in another tab on the same lines. Your version stays here; the other one is kept as “${title}”.`)
    return this.shelf.save(id, text)
  }

  /** Another tab saved a notebook. */
  private heard(m: Saved): void {
    if (!m || typeof m.id !== 'string') return
    this.host.shelfChanged()
    if (m.id !== this.host.id() || !this.base || m.changed === this.base.changed) return
    if (!this.dirty) {
      this.base = { id: m.id, text: m.text, changed: m.changed }
      if (m.text !== this.host.text()) this.host.adopt(m.text)
      this.host.status(`updated from another tab ${new Date(m.changed).toLocaleTimeString()}`)
    } else {
      // Our own edits are waiting: save them now, merging with what the other tab stored.
      window.clearTimeout(this.timer)
      this.timer = 0
      void this.save()
    }
  }

  private keepPending(): void {
    try {
      const id = this.host.id()
      localStorage.setItem(PENDING + id, JSON.stringify({ text: this.host.text(), changed: this.base?.changed ?? 0, baseText: this.base?.text ?? '' }))
    } catch { /* private mode: nothing more can be done synchronously */ }
  }

  private readPending(id: string): { text: string; changed: number; baseText: string } | null {
    try {
      const raw = localStorage.getItem(PENDING + id)
      return raw ? JSON.parse(raw) : null
    } catch { return null }
  }

  private clearPending(id: string): void {
    try { localStorage.removeItem(PENDING + id) } catch { /* nothing kept */ }
  }
}
