// Notebooks kept in this browser (IndexedDB through idb-keyval). One entry per notebook under
// `nb:<id>`, the id of the open notebook under `open`, and check results under `result:<sha256>`.
// Every write reports failure to the caller (quota, private mode): the page shows it, never hides it.
import { createStore, del, entries, get, set, type UseStore } from 'idb-keyval'
import type { CheckRow } from '../../kernels/api'
import { titleOf } from './title'

/** A stored notebook. */
export interface StoredNotebook {
  id: string
  text: string
  /** Last change, milliseconds since the epoch. */
  changed: number
}

/** What the shelf lists for each notebook. */
export interface NotebookSummary {
  id: string
  title: string
  changed: number
}

/** The storage a Shelf uses; a separate database name keeps tests apart. */
export function openStore(name = 'twofold'): UseStore {
  return createStore(name, 'kv')
}

/** A fresh notebook id, unique in this browser. */
export function newId(): string {
  return Date.now().toString(36) + '-' + Math.random().toString(36).slice(2, 8)
}

/** The title shown for a notebook text. */
export function shownTitle(text: string): string {
  return titleOf(text) ?? 'Untitled notebook'
}

/** Reads and writes notebooks and cached results. Methods reject when the browser refuses. */
export class Shelf {
  constructor(private readonly store: UseStore = openStore()) {}

  /** Every stored notebook, most recently changed first. */
  async list(): Promise<NotebookSummary[]> {
    const all = await entries<string, StoredNotebook>(this.store)
    return all
      .filter(([k]) => typeof k === 'string' && k.startsWith('nb:'))
      .map(([, v]) => ({ id: v.id, title: shownTitle(v.text), changed: v.changed }))
      .sort((a, b) => b.changed - a.changed)
  }

  async load(id: string): Promise<StoredNotebook | undefined> {
    return get<StoredNotebook>('nb:' + id, this.store)
  }

  /** Saves a notebook text as changed now; resolves to the stored entry. */
  async save(id: string, text: string, changed = Date.now()): Promise<StoredNotebook> {
    const entry = { id, text, changed }
    await set('nb:' + id, entry, this.store)
    return entry
  }

  /** Puts back an entry exactly as it was (undo of a delete). */
  async restore(entry: StoredNotebook): Promise<void> {
    await set('nb:' + entry.id, entry, this.store)
  }

  /** Deletes a notebook and returns what was deleted, so that the caller can offer undo. */
  async remove(id: string): Promise<StoredNotebook | undefined> {
    const entry = await this.load(id)
    await del('nb:' + id, this.store)
    return entry
  }

  /** Copies a notebook under a new id; resolves to the copy. */
  async duplicate(id: string, retitle: (text: string) => string): Promise<StoredNotebook> {
    const entry = await this.load(id)
    if (!entry) throw new Error('that notebook is no longer stored')
    return this.save(newId(), retitle(entry.text))
  }

  async openId(): Promise<string | undefined> {
    return get<string>('open', this.store)
  }

  async setOpenId(id: string): Promise<void> {
    await set('open', id, this.store)
  }

  /** Cached rows of a check, by the SHA-256 of its inputs. */
  async result(hash: string): Promise<CheckRow[] | undefined> {
    return get<CheckRow[]>('result:' + hash, this.store)
  }

  async putResult(hash: string, rows: CheckRow[]): Promise<void> {
    await set('result:' + hash, rows, this.store)
  }
}
