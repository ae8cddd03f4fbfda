// The page's handle on the kernel: two workers, one that reads the notebook as the user types
// (diagnostics) and one that runs checks, so that a long check never delays the underlines.
// Stopping uses a shared flag when the page is cross-origin isolated; otherwise the run worker is
// ended and a fresh one started (the row then has no result at all, and the page says so).
import * as Comlink from 'comlink'
import type { CheckRow, NotebookModel, Progress, RowPlan } from '../../kernels/api'
import type { KernelApi, MadeRecord } from './worker'

export type { MadeRecord }

/** Raised by `run` when the user stopped a check that could not be stopped gently. */
export class StoppedError extends Error {
  constructor() { super('stopped before the kernel could report') }
}

/**
 * How many workers explore invariant rows: one per core by default (`auto`), where the page is
 * cross-origin isolated (worker.ts falls back to one elsewhere); `?workers=N` in the page's
 * address asks for N (`?workers=1`: the kernel worker alone).
 */
function workersWanted(): string {
  const w = new URLSearchParams(location.search).get('workers') ?? ''
  return /^(auto|[0-9]{1,3})$/.test(w) ? w : 'auto'
}

function spawn(): { worker: Worker; api: Comlink.Remote<KernelApi> } {
  const worker = new Worker(new URL('./worker.ts', import.meta.url), { type: 'module', name: `twofold-kernel workers=${workersWanted()}` })
  return { worker, api: Comlink.wrap<KernelApi>(worker) }
}

/** Both kernel workers and the stop control. */
export class Kernel {
  private reader = spawn()
  private runner = this.watched(spawn())
  private stopFlag: Int32Array | null =
    typeof SharedArrayBuffer !== 'undefined' && globalThis.crossOriginIsolated ? new Int32Array(new SharedArrayBuffer(4)) : null
  private rejectRun: ((e: Error) => void) | null = null

  /** True when a stop keeps the partial counts (the row comes back inconclusive). */
  get stopsGently(): boolean { return this.stopFlag !== null }

  analyze(text: string): Promise<NotebookModel> {
    return this.reader.api.analyze(text)
  }

  plan(text: string, check?: number): Promise<RowPlan[]> {
    return this.reader.api.plan(text, check)
  }

  /** The kernel's SHA-256 of each text (or the text itself, prefixed `text:`, without Web Crypto). */
  digests(texts: string[]): Promise<string[]> {
    return this.reader.api.digests(texts)
  }

  /**
   * Runs every check and builds the verification record in the run worker, as the command line
   * does. Resolves to null when `stop` stopped it gently; rejects with StoppedError if `stop` had
   * to end the worker.
   */
  record(text: string, path: string, onProgress: (p: Progress) => void): Promise<MadeRecord | null> {
    if (this.stopFlag) Atomics.store(this.stopFlag, 0, 0)
    return new Promise<MadeRecord | null>((resolve, reject) => {
      this.rejectRun = reject
      this.runner.api
        .record(text, path, Comlink.proxy(onProgress), this.stopFlag ?? undefined)
        .then(resolve, reject)
        .finally(() => { this.rejectRun = null })
    })
  }

  /** Runs one row; rejects with StoppedError if `stop` had to end the worker. */
  run(text: string, plan: RowPlan, onProgress: (p: Progress) => void): Promise<CheckRow> {
    if (this.stopFlag) Atomics.store(this.stopFlag, 0, 0)
    return new Promise<CheckRow>((resolve, reject) => {
      this.rejectRun = reject
      this.runner.api
        .run(text, plan, Comlink.proxy(onProgress), this.stopFlag ?? undefined)
        .then(resolve, reject)
        .finally(() => { this.rejectRun = null })
    })
  }

  /**
   * A run worker whose failure is never a hang: an uncaught error in it, or one its solver threads
   * raise (which the worker reports as a `twofoldFault` message, worker.ts; a faulted solver never
   * answers again), ends the row in progress with that error, and a fresh worker takes its place,
   * also when no row is running. Ending the worker ends the workers it started (its exploration
   * pool and the solver's threads); the fresh one starts its own.
   */
  private watched(w: { worker: Worker; api: Comlink.Remote<KernelApi> }): { worker: Worker; api: Comlink.Remote<KernelApi> } {
    const failed = (message: string) => {
      if (this.runner !== w) return
      w.worker.terminate()
      this.runner = this.watched(spawn())
      this.rejectRun?.(new Error(`the kernel failed while running this row (${message}); it was restarted: run the check again`))
      this.rejectRun = null
    }
    w.worker.addEventListener('error', (e) => { e.preventDefault(); failed(e.message || 'an error in the worker') })
    w.worker.addEventListener('message', (e: MessageEvent<{ twofoldFault?: unknown } | null>) => {
      const fault = e.data?.twofoldFault
      if (typeof fault === 'string') failed(fault)
    })
    return w
  }

  /** Stops the row that is running, if any. */
  stop(): void {
    if (this.stopFlag) {
      Atomics.store(this.stopFlag, 0, 1)
      return
    }
    if (this.rejectRun) {
      this.runner.worker.terminate()
      this.runner = this.watched(spawn())
      this.rejectRun(new StoppedError())
      this.rejectRun = null
    }
  }
}
