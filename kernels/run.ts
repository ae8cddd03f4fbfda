// The runner: turns the checks of a notebook into rows (property x size x constant setting) and
// runs each row with the kernel: the class check decides the cutoff, the instance is compiled and
// explored, invariants are checked during the search and temporal properties on the product
// with the automaton of their negation under the fairness of semantics.md.
import type { RowPlan, RunOptions } from './api'
import { analyzeNotebook } from './language/analyze'
import type { CheckModel, Formula, NotebookModel, PropertyModel, ProtocolModel, Term } from './language/model'
import { explore, type ExploreResult } from './explore/reach'
import { modelErrorCounterexample, traceCounterexample } from './explore/trace'
import { fromModel } from './logic/ltl'
import { Int32Buffer } from './logic/buffer'
import { checkLtl, type System } from './logic/product'
import { ModelSetupError } from './model/errors'
import { compileInstance, type Instance } from './model/instance'
import { channelEmpty, compileTerm, isCrashed, isStable, type StateTerm } from './model/observe'
import { canonicalizer, freePermutations, permuteState } from './symmetry/canon'
import { decideCutoff } from './symmetry/cutoff'
import { sha256Hex } from './record/hash'
import type { CheckRow, CutoffInfo, Report } from './result'

/** States explored before a check without `limit` gives up as inconclusive (memory guard). */
export const DEFAULT_LIMIT = 4_000_000

/** Every constant setting of a check: the cartesian product of its sweep, in sweep order. */
function settings(protocol: ProtocolModel, check: CheckModel): number[][] {
  let out: number[][] = [protocol.consts.map((c) => c.value)]
  for (const item of check.sweep) {
    const next: number[][] = []
    for (const base of out) {
      for (const v of item.values) {
        const s = base.slice()
        s[item.constIndex] = v
        next.push(s)
      }
    }
    out = next
  }
  return out
}

/**
 * The deterministic plan of a notebook's rows: checks in notebook order, then properties in the
 * order listed, then sizes, then constant settings. `only` keeps the rows whose property or
 * protocol has that name; `shard` keeps rows whose index is congruent to index-1 modulo count.
 */
export function planRows(model: NotebookModel, opts: RunOptions = {}): RowPlan[] {
  const plan: RowPlan[] = []
  model.checks.forEach((check, c) => {
    const protocol = model.protocols[check.protocol]
    check.properties.forEach((prop, p) => {
      if (opts.only !== undefined && opts.only !== prop.name && opts.only !== protocol.name) return
      for (const processes of check.sizes ?? [null]) {
        for (const constants of settings(protocol, check)) {
          plan.push({ row: plan.length, check: c, property: p, processes, constants })
        }
      }
    })
  })
  if (!opts.shard) return plan
  const { index, count } = opts.shard
  return plan.filter((r) => r.row % count === index - 1)
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
    return { text: sourceOf(prop, t.span), values: path.map((s) => f(data, s * W) !== 0) }
  })
}

/**
 * The invariant fast path is exact only for `always P` with P free of temporal operators (a state
 * formula P alone is checked on the initial states through the product).
 */
function invariantBody(f: Formula): Formula | null {
  return f.k === 'always' && !temporal(f.arg) ? f.arg : null
}

/**
 * The state graph of a completely explored instance with the fairness marks of every edge, in
 * compressed rows: the successors of s are target[start[s] .. start[s+1]), each with its marks.
 * Built once per row and shared by every assignment of the property's variables, so the product
 * never recomputes a tick.
 */
export interface FairGraph {
  start: Int32Array
  target: Int32Array
  marks: Int32Array
  initial: number[]
  fairnessSets: number
}

/**
 * Fairness sets (semantics.md) as transition marks: bit i, process i steps or is crashed; then one
 * bit per channel j->i: i is crashed, or the channel is empty at the source, or i receives from it
 * in the tick; last, under stabilizing, the edge ends in a stable state.
 */
export interface FairMarks {
  fairnessSets: number
  /** The marks every edge out of this source carries (crashes and empty channels). */
  sourceMarks(src: Uint32Array, off: number): number
  /** The marks of one edge, given its source marks and what `successors` reported. */
  edgeMarks(base: number, dst: Uint32Array, dstOff: number, stepped: number, receivedFrom: number): number
}

export function fairMarks(inst: Instance): FairMarks {
  const n = inst.n
  const crashed = Array.from({ length: n }, (_, i) => isCrashed(inst, i))
  const channels: { i: number; bit: number; index: number; test: (w: Uint32Array, o: number) => boolean }[] = []
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      // Channel index of j->i as the instance numbers it (see Instance.channelCount).
      if (i !== j) channels.push({ i, bit: n + channels.length, index: j * (n - 1) + (i < j ? i : i - 1), test: channelEmpty(inst, j, i) })
    }
  }
  const stab = inst.protocol.timing.kind === 'stabilizing' ? isStable(inst) : null
  const fairnessSets = n + channels.length + (stab ? 1 : 0)
  return {
    fairnessSets,
    sourceMarks(src, off) {
      let base = 0
      for (let i = 0; i < n; i++) if (crashed[i](src, off)) base |= 1 << i
      for (const c of channels) if ((base >> c.i) & 1 || c.test(src, off)) base |= 1 << c.bit
      return base
    },
    edgeMarks(base, dst, dstOff, stepped, receivedFrom) {
      let m = base | stepped
      for (const c of channels) if ((receivedFrom >> c.index) & 1) m |= 1 << c.bit
      for (let i = 0; i < n; i++) if (!((m >> i) & 1) && crashed[i](dst, dstOff)) m |= 1 << i
      if (stab && stab(dst, dstOff)) m |= 1 << (fairnessSets - 1)
      return m
    },
  }
}

/**
 * The state graph of a completely explored instance with the fairness marks of every edge. An edge
 * that reaches the same target with other marks (other processes stepping) is a separate edge.
 * Returns null when stopped.
 */
export function fairGraph(inst: Instance, r: ExploreResult, shouldStop?: () => boolean): FairGraph | null {
  const W = inst.words
  const store = r.store
  const fm = fairMarks(inst)
  const initial: number[] = []
  const init = inst.initialStates()
  for (let off = 0; off < init.length; off += W) {
    const k = store.lookup(init, off)
    if (k >= 0 && !initial.includes(k)) initial.push(k)
  }
  const states = store.size
  const start = new Int32Array(states + 1)
  const target = new Int32Buffer(Math.max(1024, r.transitions + 16))
  const marks = new Int32Buffer(Math.max(1024, r.transitions + 16))
  const src = new Uint32Array(W)
  let base = 0
  let rowStart = 0
  const emit = (dst: Uint32Array, stepped: number, receivedFrom: number): boolean => {
    const t = store.lookup(dst, 0)
    if (t < 0) return false
    const m = fm.edgeMarks(base, dst, 0, stepped, receivedFrom)
    const td = target.data, md = marks.data
    for (let k = rowStart; k < target.length; k++) if (td[k] === t && md[k] === m) return false
    target.push(t)
    marks.push(m)
    return false
  }
  for (let s = 0; s < states; s++) {
    if ((s & 1023) === 0 && shouldStop?.()) return null
    start[s] = rowStart = target.length
    store.get(s, src, 0)
    base = fm.sourceMarks(src, 0)
    inst.successors(src, 0, emit)
  }
  start[states] = target.length
  return { start, target: target.data.subarray(0, target.length), marks: marks.data.subarray(0, marks.length), initial, fairnessSets: fm.fairnessSets }
}

/**
 * The ticks of a lasso (states `path`, the last equal to path[loopStart]). Each edge of the loop is
 * told as the tick that carries the marks the fair cycle used, so that the loop shown is fair:
 * processes that must step infinitely often are seen stepping.
 */
function lassoTicks(inst: Instance, store: ExploreResult['store'], path: number[], loopStart: number, cycleMarks: number[]) {
  const W = inst.words
  const fm = fairMarks(inst)
  const src = new Uint32Array(W)
  const data = store.data
  const ticks = []
  for (let i = 0; i + 1 < path.length; i++) {
    let want: { stepped: number; receivedFrom: number } | undefined
    if (i >= loopStart) {
      const need = cycleMarks[i - loopStart]
      store.get(path[i], src, 0)
      const base = fm.sourceMarks(src, 0)
      const to = path[i + 1]
      inst.successors(src, 0, (dst, stepped, receivedFrom) => {
        if (store.lookup(dst, 0) !== to || fm.edgeMarks(base, dst, 0, stepped, receivedFrom) !== need) return false
        want = { stepped, receivedFrom }
        return true
      })
    }
    ticks.push(inst.describeTick(data, path[i] * W, data, path[i + 1] * W, i + 1, want))
  }
  return ticks
}

/** The system the temporal product reads: a fair graph and the atoms of one assignment. */
export function systemOf(inst: Instance, r: ExploreResult, g: FairGraph, atoms: StateTerm[]): System {
  const W = inst.words
  const data = r.store.data
  const masks = new Int32Array(r.store.size)
  for (let s = 0; s < masks.length; s++) {
    let m = 0
    for (let k = 0; k < atoms.length; k++) if (atoms[k](data, s * W)) m |= 1 << k
    masks[s] = m
  }
  const { start, target, marks } = g
  return {
    fairnessSets: g.fairnessSets,
    initial: () => g.initial,
    atoms: (s) => masks[s],
    successors(s, to, fair) {
      for (let k = start[s], e = start[s + 1]; k < e; k++) {
        to.push(target[k])
        fair.push(marks[k])
      }
    },
  }
}

/**
 * The number of states a reduced exploration stands for: each representative counts for the size
 * of its orbit, the number of permutations of the free processes divided by those that fix it.
 */
function orbitTotal(inst: Instance, r: ExploreResult, fixed: number[]): number {
  const W = inst.words
  const perms = freePermutations(inst.n, fixed)
  const data = r.store.data
  const image = new Uint32Array(W)
  let total = 0
  for (let s = 0; s < r.states; s++) {
    let stabilizer = 0
    for (const p of perms) {
      permuteState(inst, data, s * W, p, image)
      let k = 0
      while (k < W && image[k] === data[s * W + k]) k++
      if (k === W) stabilizer++
    }
    total += perms.length / stabilizer
  }
  return total
}

function emptyCutoff(): CutoffInfo {
  return { applies: false, processes: null, statement: '', tex: '', passed: [], reasons: [] }
}

/** Runs one planned row. Never throws: a failure becomes verdict `error` with a note. */
export function runRow(model: NotebookModel, plan: RowPlan, opts: RunOptions = {}): CheckRow {
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
    cutoff = { ...emptyCutoff(), reasons: [{ rule: 0, line: prop.span.line, column: prop.span.column, message: `the class check failed internally (${(e as Error).message})` }] }
  }
  const row: CheckRow = {
    row: plan.row, check: plan.check, protocol: protocol.name, property: prop.name,
    processes: plan.processes ?? cutoff.processes ?? 0, constants, timing: protocol.timing.kind,
    verdict: 'inconclusive', states: 0, transitions: 0, seconds: 0, complete: false, cutoff,
    counterexample: null, assignment: {},
  }
  const finish = (): CheckRow => { row.seconds = (performance.now() - t0) / 1000; return row }
  if (plan.processes === null && !cutoff.applies) {
    row.note = 'the cutoff does not apply to this protocol and property (see the reasons); give explicit sizes with `for N processes`'
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
  const predicates = inv ? chosen.map((a) => statePredicate(inv, (t) => compileTerm(inst, t, a))) : []
  let failed = -1
  const invariant = inv ? (w: Uint32Array, o: number) => {
    for (let k = 0; k < predicates.length; k++) if (!predicates[k](w, o)) { failed = k; return false }
    return true
  } : undefined
  // Cross-checks above the cutoff size use symmetry reduction for invariants: the processes the
  // property names stay fixed and the others are interchangeable (the class check granted it, and
  // a protocol cannot tell processes apart). Temporal properties are checked unreduced, because
  // the fairness sets name processes and a quotient would mix them.
  const reduce = inv !== null && cutoff.applies && cutoff.processes !== null && n - cutoff.processes >= 2
  if (reduce) {
    const fixed = chosen[0]
    const rr = explore(inst, { limit, shouldStop: opts.shouldStop, onProgress: progress, invariant, canonicalize: canonicalizer(inst, fixed) })
    if (rr.outcome === 'ok') {
      row.method = 'invariant'
      row.assignment = named(prop, fixed)
      row.reducedStates = rr.states
      row.states = orbitTotal(inst, rr, fixed)
      row.transitions = rr.transitions
      if (!rr.complete) {
        row.note = rr.stopped ? 'the check was stopped before it finished' : `the state limit of ${limit} states was reached; raise it with \`limit K states\``
        return row
      }
      row.verdict = 'holds'
      row.complete = true
      row.note = `checked with symmetry reduction over the processes the property does not name: ${rr.states} representatives stand for ${row.states} states; transitions are counted between representatives`
      return row
    }
    // A violation or a model error: explore again without reduction for a real, shortest trace.
  }
  const r = explore(inst, { limit, shouldStop: opts.shouldStop, onProgress: progress, invariant })
  row.states = r.states
  row.transitions = r.transitions
  row.method = inv ? 'invariant' : 'ltl'
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
    const a = chosen[failed] ?? chosen[0]
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
    row.note = r.stopped ? 'the check was stopped before it finished' : `the state limit of ${limit} states was reached; raise it with \`limit K states\``
    return row
  }
  if (inv) {
    row.verdict = 'holds'
    row.complete = true
    return row
  }
  // Temporal property: the product with the automaton of the negation, per assignment.
  let productNodes = 0
  const graph = fairGraph(inst, r, opts.shouldStop)
  if (!graph) {
    row.note = 'the check was stopped before it finished'
    return row
  }
  for (const a of chosen) {
    const compiled = terms.map((t) => compileTerm(inst, t, a))
    const sys = systemOf(inst, r, graph, compiled)
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

/**
 * Marks, for checks with explicit sizes where the cutoff applies, whether the sizes at or above
 * the cutoff agree. A disagreement is a soundness alarm: the theorem says they cannot differ.
 */
export function markAgreement(rows: CheckRow[]): CheckRow[] {
  const groups = new Map<string, CheckRow[]>()
  for (const r of rows) {
    if (!r.cutoff.applies || r.cutoff.processes === null || r.processes < r.cutoff.processes) continue
    if (r.verdict !== 'holds' && r.verdict !== 'violated') continue
    const key = `${r.check}|${r.property}|${JSON.stringify(r.constants)}`
    groups.set(key, [...(groups.get(key) ?? []), r])
  }
  for (const g of groups.values()) {
    if (g.length < 2) continue
    const agree = g.every((r) => r.verdict === g[0].verdict)
    for (const r of g) r.agreement = agree
  }
  return rows
}

/** Runs every planned row of a notebook: the `--json` document of records.md. */
export async function runNotebook(text: string, path: string, opts: RunOptions = {}): Promise<Report> {
  const model = analyzeNotebook(text)
  const sha256 = await sha256Hex(text)
  const errors = model.diagnostics.filter((d) => d.severity === 'error').map((d) => ({ line: d.line, column: d.column, message: d.message }))
  if (errors.length > 0) return { notebook: { path, sha256 }, errors, checks: [] }
  const rows = planRows(model, opts).map((plan) => runRow(model, plan, opts))
  return { notebook: { path, sha256 }, errors, checks: markAgreement(rows) }
}

