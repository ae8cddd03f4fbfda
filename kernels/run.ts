// The runner: turns the checks of a notebook into rows (property x size x constant setting) and
// runs each row with the kernel: the class check decides the cutoff, the instance is compiled and
// explored, invariants are checked during the search and temporal properties on the product
// with the automaton of their negation under the fairness of semantics.md.
import { planOf, type RowPlan, type RunOptions } from './plan'
// The plan lives in plan.ts; tests and tools written against run.ts still import it from here.
export { planRows } from './plan'
import { analyzeNotebook } from './language/analyze'
import { instantiatedText } from './language/instantiate'
import type { CheckModel, Formula, NotebookModel, PropertyModel, ProtocolModel, Term } from './language/model'
import { FairGraphRecorder, lassoTicks, systemOf } from './explore/fairgraph'
import { explore } from './explore/reach'
import { exploreWith, type ParallelJob } from './explore/parallel'
import { modelErrorCounterexample, traceCounterexample } from './explore/trace'
import { fromModel } from './logic/ltl'
import { checkLtl, type System } from './logic/product'
import { MAX_TEMPORAL_PROCESSES } from './language/limits'
import { ModelSetupError, PropertyFault } from './model/errors'
import { compileInstance, type Instance } from './model/instance'
import { compileTerm, type StateTerm } from './model/observe'
import { canonicalizer, orbitTotal } from './symmetry/canon'
import { decideCutoff } from './symmetry/cutoff'
import { RULE_NAMES } from './symmetry/rules'
import { sha256Hex } from './record/hash'
import { byInduction, runInductionRow, type ProofCache } from './induction/row'
import type { CheckRow, CutoffInfo, Report, Verdict } from './result'

/** States explored before a check without `within K states` gives up as inconclusive (memory guard). */
export const DEFAULT_LIMIT = 4_000_000

/** Does the term divide (`/` or `%`) anywhere? */
function divides(t: Term): boolean {
  switch (t.k) {
    case 'bin': return t.op === '/' || t.op === '%' || divides(t.left) || divides(t.right)
    case 'min': case 'max': return divides(t.left) || divides(t.right)
    case 'neg': return divides(t.arg)
    default: return false
  }
}

/**
 * The invariant of an `always P` row: P over every chosen assignment; `failed` tells which
 * assignment broke it last. Exported for the parallel explorer's workers, which rebuild it from
 * plain data (kernels/explore/worker.ts).
 */
export function rowInvariant(inst: Instance, inv: Formula, terms: Term[], chosen: number[][]): { invariant: (w: Uint32Array, o: number) => boolean; failed: () => number } {
  const predicates = chosen.map((a) => statePredicate(inv, (t) => compileTerm(inst, t, a)))
  // A division in the property is evaluated in every atom on every state, whatever the connectives
  // around it, so that a division by zero is a model error (as in protocols) however it is guarded.
  const dividing = terms.some(divides) ? chosen.map((a) => terms.map((t) => compileTerm(inst, t, a))) : null
  let failed = -1
  const invariant = (w: Uint32Array, o: number): boolean => {
    if (dividing) for (const atoms of dividing) for (const t of atoms) t(w, o)
    for (let k = 0; k < predicates.length; k++) if (!predicates[k](w, o)) { failed = k; return false }
    return true
  }
  return { invariant, failed: () => failed }
}

/** Does the formula contain a temporal operator? */
function temporal(f: Formula): boolean {
  switch (f.k) {
    case 'true': case 'false': case 'atom': return false
    case 'always': case 'eventually': case 'next': case 'until': case 'unless': return true
    case 'not': return temporal(f.arg)
    default: return temporal(f.left) || temporal(f.right)
  }
}

/** The atoms of a formula, each once, in order of first appearance (exported for the benchmark). */
export function atomsOf(f: Formula, out: Term[] = []): Term[] {
  if (f.k === 'atom') { if (!out.includes(f.term)) out.push(f.term) }
  else if ('arg' in f) atomsOf(f.arg, out)
  else if ('left' in f) { atomsOf(f.left, out); atomsOf(f.right, out) }
  return out
}

/** A state predicate from a temporal-free formula over compiled atoms. */
function statePredicate(f: Formula, atom: (t: Term) => StateTerm): StateTerm {
  switch (f.k) {
    case 'true': return () => 1
    case 'false': return () => 0
    case 'atom': { const t = atom(f.term); return (w, o) => (t(w, o) ? 1 : 0) }
    case 'not': { const a = statePredicate(f.arg, atom); return (w, o) => (a(w, o) ? 0 : 1) }
    case 'and': { const a = statePredicate(f.left, atom), b = statePredicate(f.right, atom); return (w, o) => (a(w, o) && b(w, o) ? 1 : 0) }
    case 'or': { const a = statePredicate(f.left, atom), b = statePredicate(f.right, atom); return (w, o) => (a(w, o) || b(w, o) ? 1 : 0) }
    case 'implies': { const a = statePredicate(f.left, atom), b = statePredicate(f.right, atom); return (w, o) => (!a(w, o) || b(w, o) ? 1 : 0) }
    case 'iff': { const a = statePredicate(f.left, atom), b = statePredicate(f.right, atom); return (w, o) => (!a(w, o) === !b(w, o) ? 1 : 0) }
  }
  throw new Error('a temporal operator inside a state predicate')
}

/** Every assignment of distinct processes (0-based) to k variables among n. */
function assignments(n: number, k: number): number[][] {
  if (k === 0) return [[]]
  const out: number[][] = []
  for (const rest of assignments(n, k - 1)) for (let i = 0; i < n; i++) if (!rest.includes(i)) out.push([...rest, i])
  return out
}

function named(prop: PropertyModel, a: number[]): Record<string, number> {
  const out: Record<string, number> = {}
  prop.vars.forEach((v, i) => { out[v] = a[i] + 1 })
  return out
}

/** The text of a formula node as written in the notebook. */
function sourceOf(prop: PropertyModel, span: { from: number; to: number }): string {
  return prop.block.text.slice(span.from - prop.block.from, span.to - prop.block.from).replace(/\s+/g, ' ')
}

function atomBands(inst: Instance, data: Uint32Array, path: number[], prop: PropertyModel, terms: Term[], a: number[]) {
  const W = inst.words
  return terms.map((t) => {
    const f = compileTerm(inst, t, a)
    return { text: instantiatedText(prop, t, t.span, a), values: path.map((s) => f(data, s * W) !== 0) }
  })
}

/**
 * The invariant fast path is exact only for `always P` with P free of temporal operators (a state
 * formula P alone is checked on the initial states through the product).
 */
function invariantBody(f: Formula): Formula | null {
  return f.k === 'always' && !temporal(f.arg) ? f.arg : null
}

function emptyCutoff(): CutoffInfo {
  return { applies: false, processes: null, statement: '', tex: '', passed: [], reasons: [] }
}

/**
 * Verdicts of cutoff instances G_k already explored in one run, keyed by check, property and
 * constants, so that every explicit size of that key compares with G_k without exploring it again.
 */
export type CutoffVerdicts = Map<string, Verdict>

/**
 * Runs one planned row. Never throws: a failure becomes verdict `error` with a note. A row with an
 * explicit size n at or above the cutoff k (where the cutoff applies) is also compared with the
 * cutoff instance G_k, explored here unless `cutoffVerdicts` already holds it: `agreement` is
 * therefore a property of the row alone, the same whether or not the run is sharded.
 */
export function runRow(model: NotebookModel, plan: RowPlan, opts: RunOptions = {}, cutoffVerdicts: CutoffVerdicts = new Map()): CheckRow {
  const row = runPlainRow(model, plan, opts)
  const k = row.cutoff.processes
  if (!row.cutoff.applies || k === null || row.processes < k) return row
  const key = `${plan.check}|${plan.property}|${plan.constants.join(',')}`
  if (row.processes === k) cutoffVerdicts.set(key, row.verdict)
  if (plan.processes === null || (row.verdict !== 'holds' && row.verdict !== 'violated')) return row
  let atCutoff = cutoffVerdicts.get(key)
  if (atCutoff === undefined) {
    atCutoff = runPlainRow(model, { ...plan, processes: k }, { shouldStop: opts.shouldStop }).verdict
    cutoffVerdicts.set(key, atCutoff)
  }
  if (atCutoff !== 'holds' && atCutoff !== 'violated') return row
  row.agreement = atCutoff === row.verdict
  if (!row.agreement) {
    const said = `sizes disagree: G_${row.processes} ${row.verdict === 'holds' ? 'holds' : 'is violated'} but the cutoff instance G_${k} ${atCutoff === 'holds' ? 'holds' : 'is violated'}; the cutoff claim is contradicted; please report this notebook`
    row.note = row.note ? `${said}. ${row.note}` : said
  }
  return row
}

function runPlainRow(model: NotebookModel, plan: RowPlan, opts: RunOptions): CheckRow {
  const t0 = performance.now()
  const check = model.checks[plan.check]
  const protocol = model.protocols[check.protocol]
  const prop = check.properties[plan.property]
  const constants: Record<string, number> = {}
  protocol.consts.forEach((c, i) => { constants[c.name] = plan.constants[i] })
  let cutoff: CutoffInfo
  try {
    cutoff = decideCutoff(protocol, prop)
  } catch (e) {
    cutoff = { ...emptyCutoff(), reasons: [{ rule: 0, name: RULE_NAMES[0], line: prop.span.line, column: prop.span.column, message: `the class check failed internally (${(e as Error).message})` }] }
  }
  const row: CheckRow = {
    row: plan.row, check: plan.check, protocol: protocol.name, property: prop.name,
    processes: plan.processes ?? cutoff.processes ?? 0, constants, timing: protocol.timing.kind,
    verdict: 'inconclusive', states: 0, transitions: 0, seconds: 0, complete: false, cutoff,
    counterexample: null, assignment: {},
  }
  const finish = (): CheckRow => { row.seconds = (performance.now() - t0) / 1000; return row }
  if (plan.processes === null && !cutoff.applies) {
    row.note = 'the cutoff does not apply to this protocol and property (see the reasons); give explicit sizes with `at N = K`'
    return finish()
  }
  if (check.method === 'induction') {
    // Proofs are asynchronous (the solver loads on first use): runPlannedRow routes them.
    row.verdict = 'error'
    row.note = 'a check by induction is run by runPlannedRow, not runRow'
    return finish()
  }
  const n = row.processes
  try {
    runInstance(row, protocol, prop, check, n, plan.constants, cutoff, opts)
    if (plan.processes === null && cutoff.processes === 1 && row.verdict === 'holds') {
      confirmNoModelErrorsAtTwo(row, protocol, plan.constants, check.limit ?? DEFAULT_LIMIT, opts)
    }
    return finish()
  } catch (e) {
    row.verdict = 'error'
    row.note = e instanceof ModelSetupError ? e.message : `the check could not be run: ${(e as Error).message}`
    return finish()
  }
}

/**
 * cutoff.md, "Model errors and one-index properties": G_1 has no peer entries and no channels, so
 * a one-index property granted the cutoff at G_1 stands for every N only once G_2 is free of model
 * errors too. Explores G_2 for model errors only (no property); a model error there makes the row
 * `violated` with G_2's trace, an unfinished search makes it `inconclusive`, and either way the
 * statement says what was done about G_2.
 */
function confirmNoModelErrorsAtTwo(row: CheckRow, protocol: ProtocolModel, constants: number[], limit: number, opts: RunOptions): void {
  const inst = compileInstance(protocol, 2, constants)
  const r = explore(inst, { limit, shouldStop: opts.shouldStop })
  const cutoff = { ...row.cutoff }
  row.cutoff = cutoff
  if (r.outcome === 'model-error' && r.error && r.trace) {
    row.verdict = 'violated'
    row.complete = false
    row.counterexample = modelErrorCounterexample(inst, r.store, r.trace, r.error)
    row.note = `G_1 satisfies \`${row.property}\`, but G_2 (2 processes) reaches a model error that G_1 cannot show (it has no peer entries and no channels); the counterexample is the run of G_2`
    cutoff.statement = `${cutoff.statement}; not established: G_2 is not free of model errors`
    return
  }
  if (!r.complete) {
    row.verdict = 'inconclusive'
    row.complete = false
    row.note = r.stopped
      ? 'the check was stopped while G_2 was being explored for model errors'
      : `G_1 satisfies \`${row.property}\`, but G_2 could not be shown free of model errors within the state limit of ${limit} states; raise it with \`limit K states\``
    cutoff.statement = `${cutoff.statement}; not established: G_2 was not fully explored for model errors`
    return
  }
  cutoff.statement = `${cutoff.statement}; G_2 was checked free of model errors (${r.states} states)`
}

function runInstance(row: CheckRow, protocol: ProtocolModel, prop: PropertyModel, check: CheckModel, n: number,
  constants: number[], cutoff: CutoffInfo, opts: RunOptions): CheckRow {
  const t0 = performance.now()
  const inst = compileInstance(protocol, n, constants)
  const limit = check.limit ?? DEFAULT_LIMIT
  const terms = atomsOf(prop.formula)
  // One assignment stands for all when the class check grants the cutoff (symmetry); otherwise
  // every assignment of distinct processes is checked.
  const all = assignments(n, prop.vars.length)
  const chosen = cutoff.applies ? [all[0]] : all
  const progress = opts.onProgress
    ? (p: { states: number; transitions: number; statesPerSecond: number; seconds: number }) =>
        opts.onProgress!({ check: row.check, property: prop.name, processes: n, ...p })
    : undefined
  const inv = invariantBody(prop.formula)
  if (!inv && n > MAX_TEMPORAL_PROCESSES) {
    throw new ModelSetupError(`temporal properties are checked on at most ${MAX_TEMPORAL_PROCESSES} processes (their fairness conditions must fit the temporal product's 31 marks), not ${n} (line ${prop.span.line}, column ${prop.span.column})`, prop.span)
  }
  const built = inv ? rowInvariant(inst, inv, terms, chosen) : null
  const invariant = built?.invariant
  // Cross-checks above the cutoff size use symmetry reduction for invariants: the processes the
  // property names stay fixed and the others are interchangeable (the class check granted it, and
  // a protocol cannot tell processes apart). Temporal properties are checked unreduced, because
  // the fairness sets name processes and a quotient would mix them.
  // Permutations are enumerated per state, so only up to 5 free processes (120 permutations).
  const reduce = inv !== null && cutoff.applies && cutoff.processes !== null && n - cutoff.processes >= 2 && n - chosen[0].length <= 5
  if (reduce) {
    const fixed = chosen[0]
    const rr = explore(inst, { limit, shouldStop: opts.shouldStop, onProgress: progress, invariant, canonicalize: canonicalizer(inst, fixed) })
    if (rr.outcome === 'ok') {
      row.method = 'exploration'
      row.search = 'invariant'
      row.assignment = named(prop, fixed)
      row.reducedStates = rr.states
      row.states = orbitTotal(inst, rr.store.data, rr.states, fixed)
      row.transitions = rr.transitions
      if (!rr.complete) {
        row.note = rr.stopped ? 'the check was stopped before it finished' : `the state limit of ${limit} states was reached; raise it with \`within K states\``
        return row
      }
      row.verdict = 'holds'
      row.complete = true
      row.note = `checked with symmetry reduction over the processes the property does not name: ${rr.states} representatives stand for ${row.states} states; transitions are counted between representatives`
      return row
    }
    // A violation or a model error: explore again without reduction for a real, shortest trace.
  }
  // The temporal route records the fair graph in the same pass (unless told to save memory).
  const recorder = inv ? undefined : new FairGraphRecorder(inst, opts.recomputeEdges ? 0 : undefined)
  // Invariant rows run on `opts.workers` workers where a pool is available (explore/parallel.ts).
  const job: ParallelJob = { protocol, n, constants, invariant: inv ? { formula: inv, terms, chosen } : null, fault: opts.workerFault }
  const r = exploreWith(inst, { limit, shouldStop: opts.shouldStop, onProgress: progress, invariant, edges: recorder }, opts.workers, job)
  row.states = r.states
  row.transitions = r.transitions
  row.method = 'exploration'
  row.search = inv ? 'invariant' : 'ltl'
  row.assignment = named(prop, chosen[0] ?? [])
  const data = r.store.data
  if (r.outcome === 'model-error' && r.error && r.trace) {
    row.verdict = 'violated'
    row.complete = false
    row.counterexample = modelErrorCounterexample(inst, r.store, r.trace, r.error)
    return row
  }
  if (r.outcome === 'violation' && r.trace) {
    const path = r.trace
    const a = chosen[built?.failed() ?? -1] ?? chosen[0]
    const ticks = path.length - 1
    row.verdict = 'violated'
    row.complete = false
    row.assignment = named(prop, a)
    row.counterexample = {
      ...traceCounterexample(inst, r.store, path,
        `\`${prop.name}\` fails after ${ticks} tick${ticks === 1 ? '' : 's'}: the state reached breaks \`${sourceOf(prop, inv!.span)}\``),
      atoms: atomBands(inst, data, path, prop, terms, a),
    }
    return row
  }
  if (!r.complete) {
    row.note = r.stopped ? 'the check was stopped before it finished' : `the state limit of ${limit} states was reached; raise it with \`within K states\``
    return row
  }
  if (inv) {
    row.verdict = 'holds'
    row.complete = true
    return row
  }
  // Temporal property: the product with the automaton of the negation, per assignment.
  let productNodes = 0
  const graph = recorder!.graph(r.states)
  for (const a of chosen) {
    const compiled = terms.map((t) => compileTerm(inst, t, a))
    let sys: System
    try {
      sys = systemOf(inst, r, graph, compiled)
    } catch (e) {
      if (!(e instanceof PropertyFault)) throw e
      // An atom divides by zero on a reachable state: find the shortest trace to such a state.
      const again = explore(inst, { limit, shouldStop: opts.shouldStop, invariant: (w, o) => { for (const t of compiled) t(w, o); return true } })
      if (!again.error || !again.trace) throw e
      row.verdict = 'violated'
      row.complete = false
      row.assignment = named(prop, a)
      row.counterexample = modelErrorCounterexample(inst, again.store, again.trace, again.error)
      return row
    }
    const ltl = fromModel(prop.formula, (t) => terms.indexOf(t))
    let stoppedByLimit = false
    const v = checkLtl(sys, ltl, {
      shouldStop: () => stoppedByLimit || (opts.shouldStop?.() ?? false),
      onProgress: (nodes) => {
        if (nodes > limit * 8) stoppedByLimit = true
        const seconds = (performance.now() - t0) / 1000
        progress?.({ states: r.states, transitions: r.transitions, statesPerSecond: seconds > 0 ? r.states / seconds : 0, seconds })
      },
    })
    productNodes = Math.max(productNodes, v.nodes)
    if (v.stopped || stoppedByLimit) {
      row.note = 'the check was stopped before the temporal search finished'
      return row
    }
    if (v.holds === false) {
      const path = [...v.prefix, ...v.cycle, v.cycle[0]]
      row.verdict = 'violated'
      row.complete = true
      row.assignment = named(prop, a)
      row.counterexample = {
        kind: 'lasso',
        message: `a fair run violates \`${prop.name}\`: after ${v.prefix.length} tick${v.prefix.length === 1 ? '' : 's'} it repeats a loop of ${v.cycle.length} forever`,
        initial: inst.describeInitial(data, path[0] * inst.words),
        ticks: lassoTicks(inst, r.store, path, v.prefix.length, v.cycleFairness),
        loopStart: v.prefix.length,
        atoms: atomBands(inst, data, path, prop, terms, a),
      }
      ;(row as CheckRow & { productStates?: number }).productStates = productNodes
      return row
    }
  }
  row.verdict = 'holds'
  row.complete = true
  ;(row as CheckRow & { productStates?: number }).productStates = productNodes
  return row
}

/** Runs every planned row of a notebook: the `--json` document of records.md. */
export async function runNotebook(text: string, path: string, opts: RunOptions = {}): Promise<Report> {
  const model = analyzeNotebook(text)
  const sha256 = await sha256Hex(text)
  const errors = model.diagnostics.filter((d) => d.severity === 'error').map((d) => ({ line: d.line, column: d.column, message: d.message }))
  if (errors.length > 0) return { notebook: { path, sha256 }, errors, checks: [] }
  const cutoffVerdicts: CutoffVerdicts = new Map()
  const cache: ProofCache = new Map()
  const checks: CheckRow[] = []
  for (const plan of planOf(model, opts.only).select(opts.shard)) checks.push(await runPlannedRow(model, plan, opts, cache, cutoffVerdicts))
  return { notebook: { path, sha256 }, errors, checks }
}

/**
 * Runs one planned row by its check's method: `by induction` rows go to the induction engine
 * (asynchronous: the solver is loaded on first use), the others to `runRow`. Rows of one check,
 * size and setting share one joint proof through `cache`.
 */
export async function runPlannedRow(model: NotebookModel, plan: RowPlan, opts: RunOptions = {}, cache: ProofCache = new Map(), cutoffVerdicts: CutoffVerdicts = new Map()): Promise<CheckRow> {
  return byInduction(model.checks[plan.check]) ? runInductionRow(model, plan, opts, cache) : runRow(model, plan, opts, cutoffVerdicts)
}

