// The kernel in a Web Worker, exposed through Comlink. A thin wrapper of kernels/api.ts over plain
// values: the notebook text goes in (the worker keeps the model of the last text it read, so a run
// does not ship the model back and forth), rows, diagnostics, digests and records come out.
import * as Comlink from 'comlink'
import {
  analyzeNotebook, buildRecord, canonicalJsonPretty, createSharedBuffers, planRows, runNotebook, runPlannedRow, setPoolProvider,
  sha256Hex, type CheckRow, type ExplorePool, type NotebookModel, type Progress, type RowPlan,
} from '../../kernels/api'

/**
 * The pool of parallel exploration workers (kernels/explore/parallel.ts): one Web Worker per core
 * (or as many as the page's address asks, `?workers=N`), started ahead of the first run (nested
 * workers may not start while this worker blocks) where the page is cross-origin isolated;
 * elsewhere, or with `?workers=1`, rows are explored on this worker alone.
 */
let pool: Promise<ExplorePool | null> | null = null
function explorePool(): Promise<ExplorePool | null> {
  pool ??= startPool().catch(() => null)
  return pool
}
async function startPool(): Promise<ExplorePool | null> {
  // The page names this worker `twofold-kernel workers=N|auto` (kernel.ts).
  const asked = /workers=(auto|[0-9]+)/.exec(self.name)?.[1] ?? 'auto'
  const cores = navigator.hardwareConcurrency || 1
  const n = Math.min(16, asked === 'auto' ? cores : Number(asked))
  if (n < 2 || typeof SharedArrayBuffer === 'undefined' || !globalThis.crossOriginIsolated || typeof Worker === 'undefined') return null
  // Smaller reservations than Node's: a browser tab's address space is shared with the page.
  const caps = { arena: 2 ** 30, table: 2 ** 28, stage: 2 ** 30, perState: 2 ** 27, job: 2 ** 24 }
  const buffers = createSharedBuffers(caps)
  const workers: Worker[] = []
  try {
    await Promise.all(Array.from({ length: n }, (_, index) => new Promise<void>((resolve, reject) => {
      const w = new Worker(new URL('./explore-worker.ts', import.meta.url), { type: 'module', name: `twofold-explore-${index + 1}` })
      workers.push(w)
      const timer = setTimeout(() => reject(new Error('an exploration worker did not start')), 20_000)
      w.onmessage = () => { clearTimeout(timer); resolve() }
      w.onerror = (e) => { clearTimeout(timer); reject(new Error(e.message)) }
      w.postMessage({ buffers, index })
    })))
  } catch {
    for (const w of workers) w.terminate()
    return null
  }
  const started: ExplorePool = { size: n, buffers, caps, start() {} }
  setPoolProvider((k) => (k === n ? started : null))
  return started
}

let lastText: string | null = null
let lastModel: NotebookModel | null = null

function modelOf(text: string): NotebookModel {
  if (text !== lastText || !lastModel) {
    lastModel = analyzeNotebook(text)
    lastText = text
  }
  return lastModel
}

/** A made verification record: the rows it holds (to show on the page) and its file text. */
export interface MadeRecord {
  rows: CheckRow[]
  /** The record as canonical JSON, indented, with a final line break (what `twofold check --record` writes). */
  json: string
}

/** What the worker offers the page. */
export const kernelApi = {
  /** The typed model and diagnostics of a notebook text. */
  analyze(text: string): NotebookModel {
    return modelOf(text)
  },
  /** The rows of the notebook's row plan that belong to check `check` (all rows when omitted). */
  plan(text: string, check?: number): RowPlan[] {
    const rows = planRows(modelOf(text))
    return check === undefined ? rows : rows.filter((r) => r.check === check)
  },
  /**
   * Runs one planned row. `stop`, when given, is a shared flag: the page sets element 0 to 1 to
   * stop the row (it then comes back inconclusive), because a busy worker cannot read messages.
   */
  async run(text: string, plan: RowPlan, onProgress?: (p: Progress) => void, stop?: Int32Array): Promise<CheckRow> {
    // `by induction` rows load the solver into this worker on first use (runPlannedRow).
    // Invariant rows explore on every core where the pool could start (same results as one).
    const workers = (await explorePool())?.size
    return runPlannedRow(modelOf(text), plan, {
      onProgress: onProgress ? (p) => onProgress(p) : undefined,
      shouldStop: stop ? () => Atomics.load(stop, 0) === 1 : undefined,
      workers,
    })
  },
  /**
   * The SHA-256 of each text (kernels/base/hash.ts), as 64 hex digits. Where Web Crypto is
   * missing (a page served over plain HTTP), each text itself prefixed `text:` stands in, so the
   * page can still key its cache; such a key is never written into a record.
   */
  async digests(texts: string[]): Promise<string[]> {
    if (!globalThis.crypto?.subtle) return texts.map((t) => 'text:' + t)
    return Promise.all(texts.map((t) => sha256Hex(t)))
  },
  /**
   * Runs every check of the notebook and builds its verification record, exactly as
   * `twofold check --record` does (runNotebook, then buildRecord); `path` is the notebook's name
   * in the record. `stop` is the shared flag of `run`: a stopped run makes no record (null).
   */
  async record(text: string, path: string, onProgress?: (p: Progress) => void, stop?: Int32Array): Promise<MadeRecord | null> {
    const stopped = () => stop !== undefined && Atomics.load(stop, 0) === 1
    const report = await runNotebook(text, path, { onProgress: onProgress ? (p) => onProgress(p) : undefined, shouldStop: stop ? stopped : undefined })
    if (stopped()) return null
    const record = await buildRecord(report, text, modelOf(text))
    return { rows: record.checks, json: canonicalJsonPretty(record) + '\n' }
  },
}

/** The worker's API as the page sees it. */
export type KernelApi = typeof kernelApi

Comlink.expose(kernelApi)

// An error in one of the solver's threads reaches this worker's global scope (the solver's script
// rethrows it here) but not always the page; a solver that faulted never answers again. The page
// ends the row and starts a fresh worker when told (kernel.ts `watched`).
self.addEventListener('error', (e) => {
  self.postMessage({ twofoldFault: e.message || 'an error in a solver thread' })
})
