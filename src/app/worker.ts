// The kernel in a Web Worker, exposed through Comlink. A thin wrapper of kernels/api.ts over plain
// values: the notebook text goes in (the worker keeps the model of the last text it read, so a run
// does not ship the model back and forth), rows and diagnostics come out.
import * as Comlink from 'comlink'
import { analyzeNotebook, planRows, runPlannedRow, type CheckRow, type NotebookModel, type Progress, type RowPlan } from '../../kernels/api'

let lastText: string | null = null
let lastModel: NotebookModel | null = null

function modelOf(text: string): NotebookModel {
  if (text !== lastText || !lastModel) {
    lastModel = analyzeNotebook(text)
    lastText = text
  }
  return lastModel
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
  run(text: string, plan: RowPlan, onProgress?: (p: Progress) => void, stop?: Int32Array): Promise<CheckRow> {
    // `by induction` rows load the solver into this worker on first use (runPlannedRow).
    return runPlannedRow(modelOf(text), plan, {
      onProgress: onProgress ? (p) => onProgress(p) : undefined,
      shouldStop: stop ? () => Atomics.load(stop, 0) === 1 : undefined,
    })
  },
}

/** The worker's API as the page sees it. */
export type KernelApi = typeof kernelApi

Comlink.expose(kernelApi)
