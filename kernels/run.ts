// The runner: turns the checks of a notebook into rows (property x size x constant setting) and
// runs each row with the kernel: the class check decides the cutoff, the instance is compiled and
// explored, invariants are checked during the search and temporal properties on the product
// with the automaton of their negation under the fairness of semantics.md.
import { planOf, type RowPlan, type RunOptions } from './plan'
// The plan lives in plan.ts; tests and tools written against run.ts still import it from here.
export { planRows } from './plan'
import { analyzeNotebook } from './language/analyze'
import { instantiatedText } from './language/instantiate'
import { assignmentsOf, atomsOf, divides, invariantBody } from './language/formula'
import type { CheckModel, Formula, NotebookModel, ProcRef, PropertyModel, ProtocolModel, Term } from './language/model'
import { FairGraphRecorder, systemOf } from './explore/fairgraph'
import { explore, type ExploreProgress, type ExploreResult } from './explore/reach'
import { isOutOfMemory } from './base/stateset'
import { atomBands, lassoCounterexample, modelErrorCounterexample, traceCounterexample } from './explore/trace'
import { fromModel, type Ltl } from './logic/ltl'
import { statePredicate } from './logic/predicate'
import { checkLtl, negationAutomaton, type System } from './logic/product'
import type { Automaton } from './logic/automaton'
import { exploreWith, type ParallelJob } from './explore/parallel'
import { rowInvariant } from './explore/invariant'
import { MAX_TEMPORAL_PROCESSES } from './language/limits'
import { ModelSetupError, PropertyFault } from './model/errors'
import { compileInstance, type Instance } from './model/instance'
import { compileTerm, termMayFault } from './model/observe'
import { canonicalizer, orbitTotal } from './symmetry/canon'
import { decideCutoff } from './symmetry/cutoff'
import { reducedTemporal } from './symmetry/temporal'
import { RULE_NAMES } from './symmetry/rules'
import { errorText } from './base/error-text'
import { sha256Hex } from './base/hash'
import { byInduction, runInductionRow, type ProofCache } from './induction/row'
import type { CheckRow, CutoffInfo, Report, Verdict } from './result'

/** States explored before a check without `within K states` gives up as inconclusive (memory guard). */
export const DEFAULT_LIMIT = 4_000_000

function named(prop: PropertyModel, a: number[]): Record<string, number> {
  const out: Record<string, number> = {}
  prop.vars.forEach((v, i) => { out[v] = a[i] + 1 })
  return out
}

/** The text of a formula node as written in the notebook. */
function sourceOf(prop: PropertyModel, span: { from: number; to: number }): string {
  return prop.block.text.slice(span.from - prop.block.from, span.to - prop.block.from).replace(/\s+/g, ' ')
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
    cutoff = { ...emptyCutoff(), reasons: [{ rule: 0, name: RULE_NAMES[0], line: prop.span.line, column: prop.span.column, message: `the class check failed internally (${errorText(e)})` }] }
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
    if (isOutOfMemory(e)) {
      // Past the exploration (which reports its own): the temporal product ran out of memory.
      row.verdict = 'inconclusive'
      row.complete = false
      row.note = `memory ran out after ${row.states} states, in the temporal search; check a smaller instance`
      return finish()
    }
    row.verdict = 'error'
    row.note = e instanceof ModelSetupError ? e.message : `the check could not be run: ${errorText(e)}`
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
  const r = explore(inst, { limit, shouldStop: opts.shouldStop, memoryBudget: opts.memoryBudget })
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
      : r.memoryHit ? `G_1 satisfies \`${row.property}\`, but memory ran out after ${r.states} states of G_2 while it was explored for model errors`
      : `G_1 satisfies \`${row.property}\`, but G_2 could not be shown free of model errors within the state limit of ${limit} states; raise it with \`limit K states\``
    cutoff.statement = `${cutoff.statement}; not established: G_2 was not fully explored for model errors`
    return
  }
  cutoff.statement = `${cutoff.statement}; G_2 was checked free of model errors (${r.states} states)`
}

/** What every route of one row works with: the row being filled in, the instance and the property's assignments. */
interface Route {
  row: CheckRow
  prop: PropertyModel
  inst: Instance
  limit: number
  /** The property's atoms, each once. */
  terms: Term[]
  /** The assignments checked: one when the cutoff is granted, every assignment otherwise. */
  chosen: number[][]
  opts: RunOptions
  progress: ((p: ExploreProgress) => void) | undefined
  t0: number
  /** The row's cutoff decision (temporal rows above the cutoff size are searched on the quotient first). */
  cutoff: CutoffInfo
  /** What a parallel exploration's workers compile the instance and the invariant from. */
  protocol: ProtocolModel
  constants: number[]
  /** The `always P` body, or null for a temporal property. */
  inv: Formula | null
}

/**
 * Runs the row's instance by its route: an invariant (`always P`, P free of temporal operators)
 * with symmetry reduction above the cutoff size, an invariant, or a temporal property.
 */
function runInstance(row: CheckRow, protocol: ProtocolModel, prop: PropertyModel, check: CheckModel, n: number,
  constants: number[], cutoff: CutoffInfo, opts: RunOptions): CheckRow {
  const t0 = performance.now()
  const inst = compileInstance(protocol, n, constants)
  // One assignment stands for all when the class check grants the cutoff (symmetry); otherwise
  // every assignment of distinct processes is checked.
  const all = assignmentsOf(n, prop.vars.length)
  const route: Route = {
    row, prop, inst, limit: check.limit ?? DEFAULT_LIMIT, terms: atomsOf(prop.formula), chosen: cutoff.applies ? [all[0]] : all, opts,
    progress: opts.onProgress ? (p) => opts.onProgress!({ check: row.check, property: prop.name, processes: n, ...p }) : undefined,
    t0, cutoff, protocol, constants, inv: invariantBody(prop.formula),
  }
  const inv = route.inv
  if (!inv) {
    if (n > MAX_TEMPORAL_PROCESSES) {
      throw new ModelSetupError(`temporal properties are checked on at most ${MAX_TEMPORAL_PROCESSES} processes (their fairness conditions must fit the temporal product's 31 marks), not ${n} (line ${prop.span.line}, column ${prop.span.column})`, prop.span)
    }
    return runTemporal(route)
  }
  // Cross-checks above the cutoff size use symmetry reduction for invariants: the processes the
  // property names stay fixed and the others are interchangeable (the class check granted it, and
  // a protocol cannot tell processes apart). Temporal properties take the annotated quotient below,
  // because the fairness sets name processes and a plain quotient would mix them.
  // Permutations are enumerated per state, so only up to 5 free processes (120 permutations).
  const reduce = cutoff.applies && cutoff.processes !== null && n - cutoff.processes >= 2 && n - route.chosen[0].length <= 5
  // A violation or a model error under reduction is explored again without it, for a real, shortest trace.
  if (reduce && runReducedInvariant(route, inv)) return row
  return runInvariant(route, inv)
}

/** The invariant's test on a state, and which assignment failed last (`failed`, -1 while none). */
function invariantTest(route: Route, inv: Formula): { test: (w: Uint32Array, o: number) => boolean; failed: () => number } {
  const { invariant, failed } = rowInvariant(route.inst, inv, route.terms, route.chosen)
  return { test: invariant, failed }
}

/** Why an exploration did not finish, for the note of an `inconclusive` row. */
function incompleteNote(r: ExploreResult, limit: number): string {
  if (r.stopped) return 'the check was stopped before it finished'
  if (r.memoryHit) return `memory ran out after ${r.states} states (the store of states needed more than was available); check a smaller instance or give a bound with \`within K states\``
  return `the state limit of ${limit} states was reached; raise it with \`within K states\``
}

/**
 * The invariant under symmetry reduction (`symmetry/canon.ts`), the processes the property names
 * fixed. True when the row is decided; false on a violation or a model error, which the caller
 * explores again unreduced.
 */
function runReducedInvariant(route: Route, inv: Formula): boolean {
  const { row, prop, inst, limit, opts } = route
  const fixed = route.chosen[0]
  const rr = explore(inst, { limit, shouldStop: opts.shouldStop, onProgress: route.progress, invariant: invariantTest(route, inv).test, canonicalize: canonicalizer(inst, fixed), memoryBudget: opts.memoryBudget })
  if (rr.outcome !== 'ok') return false
  opts.onExplored?.(row.row, 1)
  row.method = 'exploration'
  row.search = 'invariant'
  row.assignment = named(prop, fixed)
  row.reducedStates = rr.states
  row.states = orbitTotal(inst, rr.store.data, rr.states, fixed)
  row.transitions = rr.transitions
  if (!rr.complete) {
    row.note = incompleteNote(rr, limit)
    return true
  }
  row.verdict = 'holds'
  row.complete = true
  row.note = `checked with symmetry reduction over the processes the property does not name: ${rr.states} representatives stand for ${row.states} states; transitions are counted between representatives`
  return true
}

/**
 * Explores the row's instance once, unreduced, and fills in what every route reports: counts,
 * method and route, a model error's counterexample, an unfinished search's note. Returns the
 * result, and whether the row is already decided by it.
 */
function exploreRow(route: Route, search: 'invariant' | 'ltl', invariant?: (w: Uint32Array, o: number) => boolean, edges?: FairGraphRecorder): { r: ExploreResult; decided: boolean } {
  const { row, prop, inst, limit, opts } = route
  const eo = { limit, shouldStop: opts.shouldStop, onProgress: route.progress, invariant, edges, memoryBudget: opts.memoryBudget }
  // Invariant rows, and temporal rows recording their fair graph, run on `opts.workers` workers
  // where a pool is available (explore/parallel.ts); the results are the same as on one.
  const job = { protocol: route.protocol, n: inst.n, constants: route.constants, fault: opts.workerFault }
  const r = search === 'invariant' && route.inv
    ? exploreWith(inst, eo, opts.workers, { ...job, invariant: { formula: route.inv, terms: route.terms, chosen: route.chosen } })
    : search === 'ltl' && edges && !edges.abandoned
      ? exploreWith(inst, eo, opts.workers, { ...job, invariant: null, edges: true })
      : explore(inst, eo)
  opts.onExplored?.(row.row, r.workers ?? 1)
  row.states = r.states
  row.transitions = r.transitions
  row.method = 'exploration'
  row.search = search
  row.assignment = named(prop, route.chosen[0] ?? [])
  if (r.outcome === 'model-error' && r.error && r.trace) {
    row.verdict = 'violated'
    row.complete = false
    row.counterexample = modelErrorCounterexample(inst, r.store, r.trace, r.error)
    return { r, decided: true }
  }
  return { r, decided: false }
}

/** The invariant route: one exploration checks P on every reachable state, for every chosen assignment. */
function runInvariant(route: Route, inv: Formula): CheckRow {
  const { row, prop, inst, limit, terms, chosen } = route
  const invariant = invariantTest(route, inv)
  const { r, decided } = exploreRow(route, 'invariant', invariant.test)
  if (decided) return row
  if (r.outcome === 'violation' && r.trace) {
    const path = r.trace
    const a = chosen[invariant.failed()] ?? chosen[0]
    const ticks = path.length - 1
    row.verdict = 'violated'
    row.complete = false
    row.assignment = named(prop, a)
    row.counterexample = {
      ...traceCounterexample(inst, r.store, path,
        `\`${prop.name}\` fails after ${ticks} tick${ticks === 1 ? '' : 's'}: the state reached breaks \`${sourceOf(prop, inv.span)}\``),
      atoms: atomBands(inst, r.store, path, prop, terms, a),
    }
    return row
  }
  if (!r.complete) {
    row.note = incompleteNote(r, limit)
    return row
  }
  row.verdict = 'holds'
  row.complete = true
  return row
}

/**
 * The temporal route: one exploration records the fair graph (`explore/fairgraph.ts`), then per
 * assignment the product with the automaton of the negated property is searched for a fair
 * accepting lasso (`logic/product.ts`).
 */
function runTemporal(route: Route): CheckRow {
  const { row, prop, inst, limit, terms, opts, cutoff } = route
  // One translation of the negated property for every search of this row (reduced and not).
  const ltl = fromModel(prop.formula, (t) => terms.indexOf(t))
  let negated: ReturnType<typeof negationAutomaton> | undefined
  const translation = (onProgress?: () => void) => negated ??= negationAutomaton(ltl, { shouldStop: opts.shouldStop, translation: { onProgress, budget: opts.translationBudget } })
  // Above the cutoff size: the annotated quotient (symmetry/temporal.ts), exact under our
  // fairness; it decides the verdict, and a violation is searched again unreduced for a real lasso.
  let reducedViolated = false
  if (cutoff.applies && cutoff.processes !== null && inst.n - cutoff.processes >= 2) {
    const aut = translation(() => route.progress?.({ states: 0, transitions: 0, statesPerSecond: 0, seconds: (performance.now() - route.t0) / 1000 }))
    if ('states' in aut) {
      const decided = runReducedTemporal(route, ltl, aut)
      if (decided === true) return row
      reducedViolated = decided === 'violated'
    }
  }
  // The fair graph is recorded in the same pass (unless told to save memory).
  const recorder = new FairGraphRecorder(inst, opts.recomputeEdges ? 0 : undefined)
  const { r, decided } = exploreRow(route, 'ltl', undefined, recorder)
  if (decided) return row
  if (!r.complete) {
    row.note = incompleteNote(r, limit)
    return row
  }
  let productNodes = 0
  const graph = recorder.graph(r.states)
  // Atoms that cannot fault are computed only on the states the product reaches.
  const mayFault = terms.some((t) => termMayFault(inst, t))
  for (const a of route.chosen) {
    const compiled = terms.map((t) => compileTerm(inst, t, a))
    let sys: System
    try {
      sys = systemOf(inst, r, graph, compiled, mayFault)
    } catch (e) {
      if (!(e instanceof PropertyFault)) throw e
      // An atom divides by zero on a reachable state: find the shortest trace to such a state.
      const again = explore(inst, { limit, shouldStop: opts.shouldStop, invariant: (w, o) => { for (const t of compiled) t(w, o); return true }, memoryBudget: opts.memoryBudget })
      if (!again.error || !again.trace) throw e
      row.verdict = 'violated'
      row.complete = false
      row.assignment = named(prop, a)
      row.counterexample = modelErrorCounterexample(inst, again.store, again.trace, again.error)
      return row
    }
    let stoppedByLimit = false
    const report = () => {
      const seconds = (performance.now() - route.t0) / 1000
      route.progress?.({ states: r.states, transitions: r.transitions, statesPerSecond: seconds > 0 ? r.states / seconds : 0, seconds })
    }
    // One translation for every assignment (the formula over atom numbers is the same).
    negated = translation(report)
    if (!('states' in negated)) {
      // The translation gave up (stopped, or over budget): inconclusive, never a verdict.
      row.note = negated.stopped ? 'the check was stopped before the temporal search finished'
        : `property \`${prop.name}\` was not checked: ${negated.reason}; split it into several properties or simplify it`
      return row
    }
    const v = checkLtl(sys, ltl, {
      automaton: negated,
      shouldStop: () => stoppedByLimit || (opts.shouldStop?.() ?? false),
      onProgress: (nodes) => {
        if (nodes > limit * 8) stoppedByLimit = true
        report()
      },
    })
    productNodes = Math.max(productNodes, v.nodes)
    if (v.stopped || stoppedByLimit) {
      row.note = 'the check was stopped before the temporal search finished'
      return row
    }
    if (v.holds === null) {
      // Too many acceptance sets besides the fairness sets: inconclusive, never a verdict.
      row.note = `property \`${prop.name}\` was not checked: ${v.reason}; split it into several properties or simplify it`
      return row
    }
    if (v.holds === false) {
      const loops = v.prefix.length
      row.verdict = 'violated'
      row.complete = true
      row.assignment = named(prop, a)
      row.counterexample = {
        ...lassoCounterexample(inst, r.store, v.prefix, v.cycle, v.cycleFairness,
          `a fair run violates \`${prop.name}\`: after ${loops} tick${loops === 1 ? '' : 's'} it repeats a loop of ${v.cycle.length} forever`),
        atoms: atomBands(inst, r.store, [...v.prefix, ...v.cycle, v.cycle[0]], prop, terms, a),
      }
      row.productStates = productNodes
      return row
    }
  }
  row.verdict = 'holds'
  row.complete = true
  row.productStates = productNodes
  if (reducedViolated) row.note = 'the symmetry-reduced search found a fair violating run that the search without reduction does not; the unreduced verdict stands; please report this notebook'
  return row
}

/**
 * The temporal property on the annotated quotient (`symmetry/temporal.ts`): true when the row is
 * decided (holds, or unfinished); 'violated' when the quotient found a fair violating run (the
 * caller searches unreduced for the real lasso); false when reduction cannot decide this row
 * (the row's note says why, and the caller searches unreduced).
 */
function runReducedTemporal(route: Route, ltl: Ltl, automaton: Automaton): boolean | 'violated' {
  const { row, prop, inst, limit, terms, opts } = route
  const a = route.chosen[0]
  const fixed = [...new Set([...a, ...literalProcesses(terms)])]
  const rt = reducedTemporal(inst, fixed, terms.map((t) => compileTerm(inst, t, a)), ltl,
    { limit, shouldStop: opts.shouldStop, onProgress: route.progress, recomputeEdges: opts.recomputeEdges, automaton })
  if (rt.kind === 'fallback') {
    row.note = `explored without symmetry reduction: ${rt.reason}`
    return false
  }
  opts.onExplored?.(row.row, 1)
  if (rt.kind === 'decided' && !rt.holds) {
    row.note = 'the symmetry-reduced search found a fair run that violates the property; the counterexample is from the search without reduction'
    return 'violated'
  }
  Object.assign(row, { method: 'exploration', search: 'ltl', assignment: named(prop, a), reducedStates: rt.representatives, transitions: rt.transitions })
  if (rt.kind === 'incomplete') {
    row.note = rt.stopped ? 'the check was stopped before it finished' : `the state limit of ${limit} states was reached; raise it with \`within K states\``
    return true
  }
  Object.assign(row, { verdict: 'holds', complete: true, states: rt.states, productStates: rt.productNodes })
  row.note = `checked with symmetry reduction over the processes the property does not name (the annotated quotient, fairness tracked through the permutations): ${rt.representatives} representatives stand for ${rt.states} states; transitions are counted between representatives`
  return true
}

/** The 0-based processes a property names by number (`#n`): reduction keeps them fixed too. */
function literalProcesses(terms: Term[]): number[] {
  const out: number[] = []
  const ref = (r: ProcRef | null) => { if (r && r.k === 'fixed') out.push(r.n - 1) }
  const walk = (t: Term): void => {
    switch (t.k) {
      case 'member': ref(t.proc); ref(t.peer); break
      case 'alive': case 'crashed': ref(t.proc); break
      case 'pending': ref(t.from); ref(t.to); break
      case 'neg': walk(t.arg); break
      case 'bin': case 'min': case 'max': walk(t.left); walk(t.right); break
      default: break
    }
  }
  terms.forEach(walk)
  return out
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

