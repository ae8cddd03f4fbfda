// The runner's route for `check ... by induction`: one joint proof per (check, size, constant
// setting), shared by the rows of the properties it lists, turned into CheckRows with verdicts as
// induction.md says. When the step fails, the explorer (within the row's state bound) tells
// whether the counterexample state is reachable: a reachable one makes the row `violated` with
// the real shortest trace, an unreachable one asks for a strengthening.
import { errorText } from '../base/error-text'
import type { RowPlan, RunOptions } from '../plan'
import type { CheckModel, NotebookModel, PropertyModel } from '../language/model'
import { explore } from '../explore/reach'
import { modelErrorCounterexample, traceCounterexample } from '../explore/trace'
import { ModelSetupError } from '../model/errors'
import type { Instance } from '../model/instance'
import { readField } from '../model/layout'
import { canonicalMessage } from '../model/show'
import { decideCutoff } from '../symmetry/cutoff'
import type { CheckRow, Counterexample, CutoffInfo, InductionState } from '../result'
import { explicitConjunct, inductionFormError, type Conjunct } from './invariant'
import { proveInduction, type InductionProof } from './prove'

/** States the explorer may visit to tell whether a counterexample to induction is reachable. */
export const FOLLOW_UP_LIMIT = 200_000

/** Joint proofs of one run, by check, size and constant setting. */
export type ProofCache = Map<string, Promise<InductionProof>>

/** Whether a check asks for induction. */
export function byInduction(check: CheckModel): boolean {
  return check.method === 'induction'
}

/** The state of a counterexample to induction as people read it. */
export function inductionState(inst: Instance, w: Uint32Array): InductionState {
  const { layout } = inst
  const values = inst.describeInitial(w, 0)
  const processes = values.map((p, i) => ({
    process: p.process,
    alive: readField(w, 0, layout.alive[i]) === 1,
    ...(layout.idle ? { idle: readField(w, 0, layout.idle[i]) } : {}),
    values: p.values,
  }))
  const inFlight: InductionState['inFlight'] = []
  layout.channel.forEach((row, c) => row.forEach((f, v) => {
    const mask = readField(w, 0, f)
    const message = canonicalMessage(layout, v).replace(/,/g, ', ')
    const from = layout.channelFrom[c] + 1, to = layout.channelTo[c] + 1
    if (!layout.tracksAges) { if (mask) inFlight.push({ from, to, message }) }
    else for (let a = 1; a <= layout.delay; a++) if (mask & (1 << (a - 1))) inFlight.push({ from, to, message, age: a })
  }))
  return { processes, inFlight, ...(layout.stable ? { stable: readField(w, 0, layout.stable) === 1 } : {}) }
}

function named(prop: PropertyModel, a: number[]): Record<string, number> {
  const out: Record<string, number> = {}
  prop.vars.forEach((v, i) => { out[v] = a[i] + 1 })
  return out
}

function conjunctText(prop: PropertyModel, a: number[]): string {
  const bound = prop.vars.map((v, i) => `${v} = ${a[i] + 1}`).join(', ')
  return `${prop.name}${bound ? ` at ${bound}` : ''}`
}

/** Runs one planned row of a check by induction. Never throws: a failure becomes verdict `error`. */
export async function runInductionRow(model: NotebookModel, plan: RowPlan, opts: RunOptions, cache: ProofCache): Promise<CheckRow> {
  const t0 = performance.now()
  const check = model.checks[plan.check]
  const protocol = model.protocols[check.protocol]
  const prop = check.properties[plan.property]
  const constants: Record<string, number> = {}
  protocol.consts.forEach((c, i) => { constants[c.name] = plan.constants[i] })
  const cutoffs: CutoffInfo[] = check.properties.map((p) => decideCutoff(protocol, p))
  const cutoff = cutoffs[plan.property]
  const row: CheckRow = {
    row: plan.row, check: plan.check, protocol: protocol.name, property: prop.name,
    processes: plan.processes ?? cutoff.processes ?? 0, constants, timing: protocol.timing.kind,
    verdict: 'inconclusive', states: 0, transitions: 0, seconds: 0, complete: false, cutoff,
    counterexample: null, assignment: {}, method: 'induction',
  }
  const finish = (): CheckRow => { row.seconds = (performance.now() - t0) / 1000; return row }
  for (const p of check.properties) {
    const bad = inductionFormError(p)
    if (bad) {
      row.verdict = 'error'
      row.note = `line ${bad.span.line}, column ${bad.span.column}: ${bad.message}`
      return finish()
    }
  }
  if (plan.processes === null && !cutoff.applies) {
    row.note = 'the cutoff does not apply to this protocol and property (see the reasons); give explicit sizes with `at N = K`'
    return finish()
  }
  const n = row.processes
  try {
    const key = `${plan.check}|${n}|${plan.constants.join(',')}`
    let proof = cache.get(key)
    if (!proof) {
      proof = proveInduction(protocol, check.properties, n, plan.constants, { shouldStop: opts.shouldStop, onWait: opts.onWait })
      cache.set(key, proof)
    }
    const result = await proof
    row.solver = result.solver
    verdictOf(row, result, check, plan.property, cutoffs, opts)
  } catch (e) {
    row.verdict = 'error'
    row.note = e instanceof ModelSetupError ? e.message : `the check could not be run: ${errorText(e)}`
  }
  return finish()
}

function verdictOf(row: CheckRow, proof: InductionProof, check: CheckModel, mine: number, cutoffs: CutoffInfo[], opts: RunOptions): void {
  const out = proof.outcome
  const inst = proof.instance
  const props = check.properties
  const prop = props[mine]
  if (out.kind === 'unknown') {
    row.note = out.reason
    return
  }
  if (out.kind === 'holds') {
    row.verdict = 'holds'
    row.complete = true
    const all = cutoffs.every((c) => c.applies)
    row.note = `proved by induction at N = ${inst.n}: every initial state satisfies the invariant and every tick from a state of the type space that satisfies it keeps it`
    if (!all && row.cutoff.applies) {
      row.cutoff = { ...row.cutoff, applies: false, statement: '', tex: '', reasons: [{ rule: 0, name: 'joint-proof', line: check.span.line, column: check.span.column, message: 'the proof is of the conjunction of the listed properties, and not every one of them is granted the cutoff, so it is not carried to other sizes' }] }
    }
    return
  }
  if (out.kind === 'base') {
    const fails = out.conjunct.property === mine
    if (!fails) { row.note = `the joint proof failed on \`${conjunctText(props[out.conjunct.property], out.conjunct.assignment)}\`, see its row`; return }
    row.verdict = 'violated'
    row.assignment = named(prop, out.conjunct.assignment)
    row.counterexample = {
      kind: 'trace',
      message: `\`${prop.name}\` fails in an initial state (${conjunctText(prop, out.conjunct.assignment)})`,
      initial: inst.describeInitial(out.state, 0),
      ticks: [],
    }
    return
  }
  // The step fails: is the state reachable?
  const conjuncts = props.flatMap((p, k) => (p.vars.length === 0 ? [[]] : allAssignments(inst.n, p.vars.length)).map((a) => ({ property: k, assignment: a, test: explicitConjunct(inst, p, a) })))
  const limit = check.limit ?? FOLLOW_UP_LIMIT
  const r = explore(inst, { limit, shouldStop: opts.shouldStop, invariant: (w, o) => conjuncts.every((c) => c.test(w, o)) })
  row.states = r.states
  row.transitions = r.transitions
  if (r.outcome === 'model-error' && r.error && r.trace) {
    row.verdict = 'violated'
    row.counterexample = modelErrorCounterexample(inst, r.store, r.trace, r.error)
    row.note = 'the step of the proof failed, and the explorer reached a model error: a real run'
    return
  }
  if (r.outcome === 'violation' && r.trace) {
    const last = new Uint32Array(inst.words)
    r.store.get(r.trace[r.trace.length - 1], last, 0)
    const broken = conjuncts.find((c) => !c.test(last, 0))!
    if (broken.property !== mine) { row.note = `the joint invariant is violated by a real run on \`${conjunctText(props[broken.property], broken.assignment)}\`, see its row`; return }
    const ticks = r.trace.length - 1
    row.verdict = 'violated'
    row.assignment = named(prop, broken.assignment)
    row.counterexample = traceCounterexample(inst, r.store, r.trace, `\`${prop.name}\` fails after ${ticks} tick${ticks === 1 ? '' : 's'} (${conjunctText(prop, broken.assignment)}); the explorer found this real run after the step of the proof failed`)
    return
  }
  const cx = inductionCounterexample(inst, out, props)
  if (out.error || out.conjunct?.property === mine) {
    row.counterexample = cx
    if (out.conjunct) row.assignment = named(prop, out.conjunct.assignment)
  }
  const reach = r.complete
    ? `the explorer visited every reachable state (${r.states}) and the state s is not among them: the invariant is true but not inductive; add a property that excludes this state`
    : r.stopped ? 'the check was stopped before the explorer could tell whether s is reachable'
      : `the explorer could not tell within ${limit} states whether s is reachable`
  row.complete = r.complete
  row.note = `not inductive at N = ${inst.n}: ${reach}`
}

/** The state formula S of `always S`, as written. */
function sourceOf(prop: PropertyModel): string {
  const f = prop.formula
  const span = f.k === 'always' ? f.arg.span : f.span
  return prop.block.text.slice(span.from - prop.block.from, span.to - prop.block.from).replace(/\s+/g, ' ')
}

function allAssignments(n: number, k: number): number[][] {
  if (k === 0) return [[]]
  const out: number[][] = []
  for (const rest of allAssignments(n, k - 1)) for (let i = 0; i < n; i++) if (!rest.includes(i)) out.push([...rest, i])
  return out
}

/** The counterexample to induction: s, the tick, s' and the conjunct that fails. */
function inductionCounterexample(inst: Instance, out: Extract<InductionProof['outcome'], { kind: 'step' }>, props: PropertyModel[]): Counterexample {
  const c = out.conjunct as Conjunct | null
  const conjunct = c ? conjunctText(props[c.property], c.assignment) : null
  const message = out.error
    ? `from a state s that satisfies the invariant, process ${out.error.process + 1} makes a model error (${out.error.what}) at line ${out.error.span.line}, column ${out.error.span.column}`
    : `a state s that satisfies the invariant has a successor s' that breaks \`${conjunct}\``
  return {
    kind: 'induction',
    message,
    initial: inst.describeInitial(out.before, 0),
    ticks: out.after ? [inst.describeTick(out.before, 0, out.after, 0, 1)] : [],
    // The failing conjunct as an atom band: true in s, false in s' (the diagram highlights it). The
    // text keeps the property's variables; readers fill in the row's assignment (as for any atom).
    ...(c && out.after ? { atoms: [{ text: `${props[c.property].name}: ${sourceOf(props[c.property])}`, values: [true, false] }] } : {}),
    induction: {
      before: inductionState(inst, out.before),
      after: out.after ? inductionState(inst, out.after) : null,
      property: c ? props[c.property].name : null,
      conjunct,
      assignment: c ? named(props[c.property], c.assignment) : {},
    },
  }
}
