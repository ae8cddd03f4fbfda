// The temporal route under symmetry reduction (run.ts uses it for temporal rows at sizes of at
// least k + 2 with a granted cutoff): one reduced exploration that records the annotated quotient
// (explore/quotient.ts), then the fair-cycle test on the quotient product (logic/quotient.ts,
// after Emerson and Sistla, ACM TOPLAS 19(4), 1997; the soundness argument is in that file).
// It decides the verdict only; a violation is explored again unreduced by the caller for a real,
// shortest lasso, as the invariant route does.
import { explore } from '../explore/reach'
import { QuotientRecorder, quotientSystemOf } from '../explore/quotient'
import { fairMarks } from '../explore/fairgraph'
import type { Automaton } from '../logic/automaton'
import type { Ltl } from '../logic/ltl'
import { checkLtlQuotient } from '../logic/quotient'
import { PropertyFault } from '../model/errors'
import type { Instance } from '../model/instance'
import type { StateTerm } from '../model/observe'
import { canonicalizer, orbitTotal } from './canon'
import { symmetries } from './group'

export type ReducedTemporal =
  /** The quotient decided the verdict. `states` is the orbit-weighted total of the representatives. */
  | { kind: 'decided'; holds: boolean; representatives: number; states: number; transitions: number; productNodes: number; components: number }
  /** The reduced exploration or search did not finish (state limit, or stopped). */
  | { kind: 'incomplete'; stopped: boolean; representatives: number; transitions: number }
  /** Reduction cannot decide this row; the caller searches unreduced. `reason` says why, for the row's note. */
  | { kind: 'fallback'; reason: string }

export interface ReducedTemporalOptions {
  limit: number
  /** Recompute quotient rows on demand instead of storing them (`RunOptions.recomputeEdges`). */
  recomputeEdges?: boolean
  shouldStop?: () => boolean
  /** The automaton of the negated property, already translated (within the translation budget) by the caller. */
  automaton?: Automaton
  onProgress?: (p: { states: number; transitions: number; statesPerSecond: number; seconds: number }) => void
}

/**
 * Checks `ltl` over `atoms` (compiled for one assignment, naming only the processes in `fixed`)
 * on G_n reduced by the permutations of the other processes.
 */
export function reducedTemporal(inst: Instance, fixed: number[], atoms: StateTerm[], ltl: Ltl, opts: ReducedTemporalOptions): ReducedTemporal {
  const canon = canonicalizer(inst, fixed)
  const recorder = new QuotientRecorder(inst, opts.recomputeEdges ? 0 : undefined)
  const r = explore(inst, { limit: opts.limit, shouldStop: opts.shouldStop, onProgress: opts.onProgress, canonicalize: canon, edges: recorder })
  if (r.outcome === 'model-error') return { kind: 'fallback', reason: 'the reduced search met a model error, so the instance was explored again without reduction for its shortest trace' }
  if (!r.complete) return { kind: 'incomplete', stopped: r.stopped, representatives: r.states, transitions: r.transitions }
  const g = recorder.graph(r.states)
  let sys
  try {
    sys = quotientSystemOf(inst, r, g, atoms, symmetries(inst.n, fixed, fairMarks(inst).fairnessSets), canon)
  } catch (e) {
    if (!(e instanceof PropertyFault)) throw e
    return { kind: 'fallback', reason: 'an atom of the property faults on a reachable state, so the instance was explored again without reduction for its shortest trace' }
  }
  let stoppedByLimit = false
  const t0 = performance.now()
  const v = checkLtlQuotient(sys, ltl, {
    automaton: opts.automaton,
    shouldStop: () => stoppedByLimit || (opts.shouldStop?.() ?? false),
    onProgress: (nodes) => {
      if (nodes > opts.limit * 8) stoppedByLimit = true
      const seconds = (performance.now() - t0) / 1000
      opts.onProgress?.({ states: r.states, transitions: r.transitions, statesPerSecond: seconds > 0 ? r.states / seconds : 0, seconds })
    },
  })
  if (v.holds === null && !v.stopped && v.reason && !stoppedByLimit) return { kind: 'fallback', reason: `the reduced search could not decide: ${v.reason}` }
  if (v.stopped || v.holds === null) return { kind: 'incomplete', stopped: !stoppedByLimit, representatives: r.states, transitions: r.transitions }
  return {
    kind: 'decided', holds: v.holds, representatives: r.states, states: orbitTotal(inst, r.store.data, r.states, fixed),
    transitions: r.transitions, productNodes: v.nodes, components: v.components,
  }
}
