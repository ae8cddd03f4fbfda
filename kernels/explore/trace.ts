// Counterexamples for records.md: a shortest trace (invariant violation) or a trace ending in the
// step that raised a model error, told tick by tick with processes 1-based.
import type { Counterexample, TickRecord } from '../result'
import type { ModelError } from '../model/errors'
import type { Instance } from '../model/instance'
import type { ExploreResult } from './reach'
import type { StateStore } from './stateset'

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
