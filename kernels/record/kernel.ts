// The slice of the kernel API that records need. Records, replay and the command line take it as a
// parameter, so they run against the real kernel (`kernels/api.ts`) and, in unit tests, against a
// scripted one whose answers are known in advance.
import type { NotebookModel } from '../language/model'
import type { RunOptions } from '../plan'
import type { Report } from '../result'

/** What a record needs from the kernel: the typed model of a notebook, and a full run of its checks. */
export interface RecordKernel {
  analyzeNotebook(text: string): NotebookModel | Promise<NotebookModel>
  runNotebook(text: string, path: string, options: RunOptions): Promise<Report>
}
