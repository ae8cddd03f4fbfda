// Result objects: the plain, JSON-serialisable values that the kernel hands to the workbench, the
// command line and verification records. Shapes follow shared/design/records.md exactly; fields
// beyond the contract are additions, never renamings.

/** A value as shown to people and written to records: booleans, integers, or enum labels. */
export type ShownValue = boolean | number | string

/** One variable change in a tick: `variable` is `name` or `name[j]` (j: the peer process, 1-based). */
export interface Change { process: number; variable: string; from: ShownValue; to: ShownValue }

/** A message in a tick description: `message` is `kind` or `kind(v1, v2)`. */
export interface MessageEvent { from: number; to: number; message: string }

/** What happened in one tick of a counterexample (records.md). Processes are 1-based. */
export interface TickRecord {
  tick: number
  crashed: number[]
  /** `eventually synchronous` only: true in the tick in which GST passes (the tick sets `stable`; the bounds hold from then on). */
  gst?: boolean
  stepped: number[]
  received: MessageEvent[]
  sent: MessageEvent[]
  changes: Change[]
}

/** The values every process starts with in a counterexample (needed where `any` initial values branch). */
export interface InitialProcess { process: number; values: Record<string, ShownValue> }

/** A state of a counterexample to induction, whole: processes, their values and what is in flight. */
export interface InductionState {
  processes: { process: number; alive: boolean; idle?: number; values: Record<string, ShownValue> }[]
  /** Messages in flight, `age` omitted under asynchronous. */
  inFlight: { from: number; to: number; message: string; age?: number }[]
  stable?: boolean
}

/**
 * Why a row is violated, as people read it (records.md): the initial values, then the ticks. A
 * `trace` ends in the state that breaks an invariant, a `model-error` in the step that failed, a
 * `lasso` repeats its ticks from `loopStart` forever (a fair run), and an `induction` shows one
 * tick from a state that satisfies the invariant to one that does not.
 */
export interface Counterexample {
  kind: 'trace' | 'lasso' | 'model-error' | 'induction'
  message: string
  initial: InitialProcess[]
  ticks: TickRecord[]
  /** lasso only: index into `ticks` where the repeating part begins. */
  loopStart?: number
  /** The property's atoms, and for each state (initial state first, then after each tick) which hold. */
  atoms?: { text: string; values: boolean[] }[]
  /**
   * induction only: the state s (it satisfies the invariant; `initial` shows its values), the
   * state s' after the one tick in `ticks` (null when that tick makes a model error), and the
   * conjunct that fails in s' with its processes.
   */
  induction?: { before: InductionState; after: InductionState | null; property: string | null; conjunct: string | null; assignment: Record<string, number> }
}

/** One failed class-check rule (cutoff.md): its number and its short name, such as `no-aggregate`. */
export interface Reason { rule: number; name: string; line: number; column: number; message: string }

/**
 * The cutoff decision of a row (cutoff.md): whether a k-process instance stands for every size,
 * the theorem instance that says so, the class-check rules that passed, or the reasons it failed.
 */
export interface CutoffInfo {
  applies: boolean
  /** The cutoff instance size when it applies (1 or 2), else null. */
  processes: number | null
  /** Plain-text theorem instance, e.g. "for every N >= 2: G_N |= forall p != q. phi(p, q) iff G_2 |= phi(1, 2)". */
  statement: string
  /** The same statement as TeX for the workbench to typeset. */
  tex: string
  /** The rules that passed (when it applies). */
  passed: string[]
  reasons: Reason[]
}

export type Verdict = 'holds' | 'violated' | 'inconclusive' | 'error'

/** One row of a check: one property at one size and one constant setting. */
export interface CheckRow {
  /** Position of this row in the notebook's full, deterministic row plan (0-based); shards keep it. */
  row: number
  /** Index of the check in the notebook (0-based, in notebook order). */
  check: number
  protocol: string
  property: string
  processes: number
  constants: Record<string, number>
  timing: 'synchronous' | 'eventually synchronous' | 'asynchronous'
  verdict: Verdict
  states: number
  transitions: number
  seconds: number
  complete: boolean
  cutoff: CutoffInfo
  counterexample: Counterexample | null
  /** The processes the property's variables were bound to, e.g. {p: 1, q: 2}. */
  assignment: Record<string, number>
  /** How the row was decided (records.md): by exploring the instance, or by induction (induction.md). */
  method?: 'exploration' | 'induction'
  /** exploration only: 'invariant' (reachability) or 'ltl' (automaton product). */
  search?: 'invariant' | 'ltl'
  /** induction only: the solver's name and version. */
  solver?: string
  /** Symmetry-reduced state count, when the check used reduction. */
  reducedStates?: number
  /** exploration with search 'ltl' only: the largest product (states x automaton states) searched for one assignment. */
  productStates?: number
  /** Why the verdict is inconclusive or error, in one sentence. */
  note?: string
  /** With explicit sizes where the cutoff also applies: whether the sizes agree (false is a soundness alarm). */
  agreement?: boolean
}

export interface ErrorEntry { line: number; column: number; message: string }

/** The `--json` document of records.md. */
export interface Report {
  notebook: { path: string; sha256: string }
  errors: ErrorEntry[]
  checks: CheckRow[]
}

/** Progress of a long check, reported at most every 100 ms. */
export interface Progress {
  check: number
  property: string
  processes: number
  states: number
  transitions: number
  statesPerSecond: number
  seconds: number
  /**
   * How many workers explore the row's current level: more than 1 on a parallel pool
   * (explore/parallel.ts, once levels are wide enough); absent for a search on one thread.
   */
  workers?: number
}
