// The kernel's public surface: a handful of functions over plain serialisable values. The Web
// Worker exposes exactly these through Comlink; the command line and the tests call them directly.
// A facade only: every name is defined elsewhere (plan.ts, run.ts, language/, record/, base/). The
// workbench page imports the kernel through this file alone (and the generated parser).
export type { NotebookModel } from './language/model'
export type { CheckRow, Progress, Report } from './result'
export type { Plan, RowPlan, RunOptions, ShardSpec } from './plan'
export { analyzeNotebook } from './language/analyze'
export { planOf, planRows } from './plan'
export { runRow, runPlannedRow, runNotebook } from './run'
// What the page shows and reads: result types, rule names, the notebook's spans and title rule,
// the formula printer; and what the kernel worker needs to make records.
export type { Counterexample, CutoffInfo, MessageEvent } from './result'
export type { Diagnostic } from './language/model'
export { ruleLabel } from './symmetry/rules'
export { LineMap } from './language/positions'
export { notebookSpans, notebookTitle, titleOf, frontMatterSpan } from './language/spans'
export type { FenceSpan, FrontMatterSpan, HeadingSpan, NotebookSpans } from './language/spans'
export { printFormula, printProperties } from './language/formula-print'
export type { PrintedProperty } from './language/formula-print'
export { sha256Hex } from './base/hash'
export { canonicalJsonPretty } from './base/canonical'
export { errorText } from './base/error-text'
export { buildRecord } from './record/record'
// The workbench's parallel exploration pool (Web Workers over SharedArrayBuffer): the kernel
// worker starts and registers it, each exploration worker serves the parallel search.
export { createSharedBuffers, setPoolProvider } from './explore/parallel'
export type { ExplorePool, SharedBuffers } from './explore/parallel'
export { runExploreWorker } from './explore/parallel-worker'
