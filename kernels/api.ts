// The kernel's public surface: a handful of functions over plain serialisable values. The Web
// Worker exposes exactly these through Comlink; the command line and the tests call them directly.
import type { NotebookModel } from './language/model'
import type { CheckRow, Progress, Report } from './result'

export type { NotebookModel } from './language/model'
export type { CheckRow, Progress, Report } from './result'

/** One planned row: a property of a check at one size and one constant setting. */
export interface RowPlan {
  row: number
  check: number
  property: number // index into the check's properties
  /** Size to check; null when the cutoff decides it (the runner picks k, or reports why not). */
  processes: number | null
  constants: number[] // one value per protocol constant, in declaration order
}

export interface RunOptions {
  /** Run only the checks that name this property or protocol. */
  only?: string
  /** Run a deterministic share of the rows: rows whose index is congruent to index-1 modulo count. */
  shard?: { index: number; count: number }
  /** Called at most every 100 ms during long checks. */
  onProgress?: (p: Progress) => void
  /** Polled regularly; returning true stops the current check (its row becomes inconclusive). */
  shouldStop?: () => boolean
}

export { analyzeNotebook } from './language/analyze'
export { planRows, runRow, runPlannedRow, runNotebook } from './run'
