// Counterexamples for records.md: a shortest trace (invariant violation), a trace ending in the
// step that raised a model error, or a lasso (a fair run that repeats a loop forever), told tick by
// tick with processes 1-based, with the property's atoms along the states.
import type { Counterexample, TickRecord } from '../result'
import { instantiatedText } from '../language/instantiate'
import type { PropertyModel, Term } from '../language/model'
import type { ModelError } from '../model/errors'
import type { Instance } from '../model/instance'
import { compileTerm } from '../model/observe'
import { lassoTicks } from './fairgraph'
import type { ExploreResult } from './reach'
import type { StateStore } from '../base/stateset'

/** The ticks along `trace` (store indices), numbered from 1. */
export function describeTrace(inst: Instance, store: StateStore, trace: number[]): TickRecord[] {
  const data = store.data
  const ticks: TickRecord[] = []
  for (let k = 0; k + 1 < trace.length; k++) {
    ticks.push(inst.describeTick(data, store.offset(trace[k]), data, store.offset(trace[k + 1]), k + 1))
  }
  return ticks
}

/** A `trace` counterexample: `message` says what was violated (for example the property's name). */
export function traceCounterexample(inst: Instance, store: StateStore, trace: number[], message: string): Counterexample {
  return {
    kind: 'trace',
    message,
    initial: inst.describeInitial(store.data, store.offset(trace[0])),
    ticks: describeTrace(inst, store, trace),
  }
}

/**
 * A `model-error` counterexample: the trace to the state whose step failed, then that failing
 * tick, which lists the erring process as stepping with what it had received (nothing changed:
 * the branch has no successor state). An error of a property's term (process 0) ends at the
 * state on which the term failed, with no further tick.
 */
export function modelErrorCounterexample(inst: Instance, store: StateStore, trace: number[], error: ModelError): Counterexample {
  const ticks = describeTrace(inst, store, trace)
  if (error.process > 0) ticks.push({ tick: ticks.length + 1, crashed: [], stepped: [error.process], received: error.received, sent: [], changes: [] })
  return {
    kind: 'model-error',
    message: error.message,
    initial: inst.describeInitial(store.data, store.offset(trace[0])),
    ticks,
  }
}

/** The counterexample of an exploration result, or null when it found nothing wrong. */
export function counterexampleOf(inst: Instance, result: ExploreResult, message: string): Counterexample | null {
  if (!result.trace) return null
  if (result.outcome === 'model-error' && result.error) return modelErrorCounterexample(inst, result.store, result.trace, result.error)
  if (result.outcome === 'violation') return traceCounterexample(inst, result.store, result.trace, message)
  return null
}

/**
 * The property's atoms along `path` (store indices): each atom's text with the processes of
 * assignment `a` written in, and whether it holds in each state of the path.
 */
export function atomBands(inst: Instance, store: StateStore, path: number[], prop: PropertyModel, terms: Term[], a: number[]): { text: string; values: boolean[] }[] {
  const data = store.data
  return terms.map((t) => {
    const f = compileTerm(inst, t, a)
    return { text: instantiatedText(prop, t, t.span, a), values: path.map((s) => f(data, store.offset(s)) !== 0) }
  })
}

/**
 * A `lasso` counterexample: the states `prefix` then `cycle` (store indices; the run returns to
 * cycle[0] forever), each loop edge told with the fairness marks `cycleMarks` the fair cycle used.
 */
export function lassoCounterexample(inst: Instance, store: StateStore, prefix: number[], cycle: number[], cycleMarks: number[], message: string): Counterexample {
  const path = [...prefix, ...cycle, cycle[0]]
  return {
    kind: 'lasso',
    message,
    initial: inst.describeInitial(store.data, store.offset(path[0])),
    ticks: lassoTicks(inst, store, path, prefix.length, cycleMarks),
    loopStart: prefix.length,
  }
}
