// The kernel's public surface: a handful of functions over plain serialisable values. The Web
// Worker exposes exactly these through Comlink; the command line and the tests call them directly.
// A facade only: every name is defined elsewhere (plan.ts, run.ts, language/analyze.ts, result.ts).
// The page imports its types from here and calls the functions only through the worker.
export type { NotebookModel } from './language/model'
export type { CheckRow, Counterexample, CutoffInfo, MessageEvent, Progress, Report } from './result'
export type { Plan, RowPlan, RunOptions, ShardSpec } from './plan'
export { analyzeNotebook } from './language/analyze'
export { planOf, planRows } from './plan'
export { runRow, runPlannedRow, runNotebook } from './run'
