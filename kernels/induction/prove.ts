// Proof by induction at one size (induction.md): the base (every initial state satisfies I) and the
// step (from every state of the type space that satisfies I, no tick faults and every successor
// satisfies I), each one satisfiability question to the solver. A counterexample is checked again
// by the explicit successor function and the explicit observer before it is reported, so a defect
// of the encoding shows as an error, never as a wrong verdict.
import type { Solver } from 'z3-solver'
import type { PropertyModel, ProtocolModel, Span } from '../language/model'
import { compileInstance, type Instance } from '../model/instance'
import { encodeTick, type EncodedError } from './encode'
import { conjunctsOf, encodeConjunct, explicitConjunct, type Conjunct } from './invariant'
import { initialState, readState, stateVars, typeSpace } from './space'
import { loadSolver, solving, type Z3 } from './solver'

/** Guarded handler runs beyond which an encoding is refused as too large for the solver's budget. */
export const DEFAULT_BUDGET = 20_000

/** Options of one proof. */
export interface InductionOptions {
  /** Polled before each solver question and every 100 ms while it runs; true interrupts it (the result is `unknown`). */
  shouldStop?: () => boolean
  /** The largest encoding attempted, in guarded handler runs (default DEFAULT_BUDGET). */
  budget?: number
  /** Milliseconds per solver question before giving up (`unknown`); none by default. */
  timeoutMs?: number
  /** Called with true when a solver question starts and false when it ends (RunOptions.onWait). */
  onWait?: (waiting: boolean) => void
}

/** What a proof found. States are packed in the instance's layout. */
export type InductionOutcome =
  | { kind: 'holds' }
  /** An initial state breaks a conjunct. */
  | { kind: 'base'; state: Uint32Array; conjunct: Conjunct }
  /** A state satisfying I whose tick faults (`error`) or reaches `after` breaking `conjunct`. */
  | { kind: 'step'; before: Uint32Array; after: Uint32Array | null; conjunct: Conjunct | null; error: { span: Span; what: string; process: number } | null }
  | { kind: 'unknown'; reason: string }

export interface InductionProof {
  outcome: InductionOutcome
  instance: Instance
  /** The solver's name and version, for records. */
  solver: string
  seconds: number
}

/** Runs one solver question, interruptible; 'unknown' carries the solver's reason. */
async function ask(z: Z3, solver: Solver<'twofold'>, opts: InductionOptions): Promise<'sat' | 'unsat' | 'unknown'> {
  if (opts.timeoutMs) solver.set('timeout', opts.timeoutMs)
  if (opts.shouldStop?.()) return 'unknown'
  let stopped = false
  // Z3 drops an interrupt that arrives before the question is running on its thread, so a stop
  // interrupts again at every poll until the question returns.
  const timer = opts.shouldStop ? setInterval(() => { if (stopped || opts.shouldStop!()) { stopped = true; z.interrupt() } }, 100) : null
  opts.onWait?.(true)
  try {
    const answer = await solving(() => solver.check())
    return stopped ? 'unknown' : answer
  } finally {
    if (timer) clearInterval(timer)
    opts.onWait?.(false)
  }
}

/**
 * Proves the conjunction of `properties` (each `always S`, S temporal-free, checked beforehand
 * with `inductionFormError`) by induction on G_n of `protocol` under `constants`. Throws
 * ModelSetupError for an instance that cannot be compiled.
 */
export async function proveInduction(protocol: ProtocolModel, properties: PropertyModel[], n: number, constants: number[], opts: InductionOptions = {}): Promise<InductionProof> {
  const t0 = performance.now()
  const inst = compileInstance(protocol, n, constants)
  const layout = inst.layout
  const handle = await loadSolver()
  const z = handle.context()
  const version = handle.version
  const done = (outcome: InductionOutcome): InductionProof => ({ outcome, instance: inst, solver: version, seconds: (performance.now() - t0) / 1000 })
  const budget = opts.budget ?? DEFAULT_BUDGET
  const ages = layout.tracksAges ? layout.delay : 1
  const planned = n * ((n - 1) * layout.messageValues * ages + 1)
  if (planned > budget) {
    return done({ kind: 'unknown', reason: `the encoding of one tick needs ${planned} guarded handler runs, more than the solver's budget of ${budget}; prove a smaller size or smaller constants` })
  }
  const s = stateVars(z, layout, 's')
  const t = stateVars(z, layout, 't')
  const conjuncts = conjunctsOf(properties, n)
  const inS = conjuncts.map((c) => encodeConjunct(z, layout, constants, properties[c.property], c.assignment, s))
  const inT = conjuncts.map((c) => encodeConjunct(z, layout, constants, properties[c.property], c.assignment, t))
  const explicit = conjuncts.map((c) => explicitConjunct(inst, properties[c.property], c.assignment))
  const failing = (w: Uint32Array) => conjuncts.find((_, k) => !explicit[k](w, 0)) ?? null
  const stoppedOr = (what: string) => done({ kind: 'unknown', reason: opts.shouldStop?.() ? 'the proof was stopped before the solver finished' : `the solver could not decide the ${what} (${what === 'base' ? 'initial states' : 'one tick'}) within its limits` })

  // Base.
  const base = new z.Solver()
  base.add(initialState(z, protocol, layout, constants, s), z.Not(z.And(...inS)))
  const b = await ask(z, base, opts)
  if (b === 'unknown') return stoppedOr('base')
  if (b === 'sat') {
    const state = readState(z, layout, s, base.model())
    const conjunct = failing(state)
    if (!conjunct) throw new Error('induction: the solver named an initial state that satisfies every conjunct (an encoding defect)')
    return done({ kind: 'base', state, conjunct })
  }

  // Step: first a tick that faults, then a tick that leaves I.
  const tick = encodeTick(z, protocol, layout, constants, s, t)
  const faults = (errs: EncodedError[]) => (errs.length ? z.Or(...errs.map((e) => e.when)) : z.Bool.val(false))
  const assumeS = [typeSpace(z, layout, s), ...inS, tick.relation]
  const err = new z.Solver()
  err.add(...assumeS, faults(tick.errors))
  const e = await ask(z, err, opts)
  if (e === 'unknown') return stoppedOr('step')
  if (e === 'sat') {
    const m = err.model()
    const before = readState(z, layout, s, m)
    const met = tick.errors.find((x) => z.isTrue(m.eval(x.when, true)))!
    if (failing(before) || inst.successors(before, 0, () => false) === null) {
      throw new Error('induction: the solver named a faulting tick that the explicit successor function does not fault (an encoding defect)')
    }
    return done({ kind: 'step', before, after: null, conjunct: null, error: { span: met.span, what: met.what, process: met.process } })
  }
  const step = new z.Solver()
  step.add(...assumeS, z.Not(faults(tick.errors)), z.Not(z.And(...inT)))
  const r = await ask(z, step, opts)
  if (r === 'unknown') return stoppedOr('step')
  if (r === 'unsat') return done({ kind: 'holds' })
  const m = step.model()
  const before = readState(z, layout, s, m)
  const after = readState(z, layout, t, m)
  const conjunct = failing(after)
  let successor = false
  inst.successors(before, 0, (dst) => {
    for (let w = 0; w < inst.words; w++) if (dst[w] !== after[w]) return false
    successor = true
    return true
  })
  if (!successor || failing(before) || !conjunct) {
    throw new Error('induction: the solver named a step that the explicit successor function or the explicit observer does not confirm (an encoding defect)')
  }
  return done({ kind: 'step', before, after, conjunct, error: null })
}

