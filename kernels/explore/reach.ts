// Breadth-first reachability over packed states, with an optional invariant.
//
// States are numbered in the order they are found, so each BFS level is a contiguous range of
// indices and only the level boundaries are kept: a trace is rebuilt backwards by re-expanding the
// previous level until a state reaches the current one. That costs a few levels of recomputation
// once, at a violation, and saves a parent link per state (memory is the packed states plus the
// hash table, nothing else per state).
import { canonicalState } from '../model/decode'
import { PropertyFault, type ModelError } from '../model/errors'
import type { ExpansionBound } from '../model/expansion'
import type { Instance } from '../model/instance'
import { isOutOfMemory, StateStore } from '../base/stateset'
import { TargetSet } from '../base/targetset'

/** Progress of a running exploration (reported at most every 100 ms). */
export interface ExploreProgress {
  states: number
  transitions: number
  statesPerSecond: number
  seconds: number
  /** Workers exploring the current level (parallel.ts); absent on one thread. */
  workers?: number
}

/**
 * Sees every edge of the exploration, source by source in index order (breadth-first numbering),
 * so a graph can be recorded in the same pass. Under symmetry reduction only a recorder marked
 * `reduced` is accepted: it then sees every edge out of each representative to a raw successor
 * (`dst`, in the source's process names, so marks read there are the source's), with `target` the
 * store index of that successor's representative and `perm` the index of the permutation that the
 * canonicalizer applied to reach it.
 */
export interface EdgeRecorder {
  /** Bytes held by what is recorded so far (counted against `memoryBudget`). */
  readonly bytes?: number
  /** True for a recorder of the quotient graph (see above); only such a one works with `canonicalize`. */
  readonly reduced?: boolean
  /** Source `index` (held in src[0..words)) is about to be expanded. */
  beginSource(index: number, src: Uint32Array): void
  /**
   * One successor of the current source: its store index and what `successors` reported; `fresh`
   * is true when no earlier edge of this source reached `target` (unreduced search only).
   */
  edge(target: number, dst: Uint32Array, stepped: number, receivedFrom: number, perm: number, fresh?: boolean): void
  /** Where offered: an edge whose fairness marks were computed by the caller (parallel search). */
  markedEdge?(target: number, marks: number): void
}

export interface ExploreOptions {
  /** Stop (incomplete, `limitHit`) rather than store more than this many states. */
  limit?: number
  /**
   * Checked on every state found, initial ones included; false stops with the shortest trace. A
   * PropertyFault thrown by it (division by zero in a property) is a model error on that state.
   */
  invariant?: (w: Uint32Array, off: number) => boolean
  /** Polled regularly; true stops the exploration (`stopped`, incomplete). */
  shouldStop?: () => boolean
  onProgress?: (p: ExploreProgress) => void
  /**
   * Symmetry reduction: maps every state (initial ones and successors) to the representative of
   * its orbit before it is stored, so the store holds one state per orbit. The invariant must be
   * invariant under the same permutations. Traces through representatives are not runs: a caller
   * that needs a counterexample explores again without reduction. It may return the index of the
   * permutation it applied (`canon.ts` `canonicalizer` does), which a `reduced` recorder receives.
   */
  canonicalize?: (src: Uint32Array, off: number, dst: Uint32Array) => number | void
  /**
   * Skip erroring branches and go on (for differential counts); the first error is still reported
   * (outcome 'model-error', with its trace). Default: stop at the first error.
   */
  continueOnError?: boolean
  /** Records every edge during the search (see `EdgeRecorder`); with `canonicalize`, only a `reduced` one. */
  edges?: EdgeRecorder
  /**
   * Bytes the state store (arena and hash table) and the recorded edges may take. Past it, or
   * when the runtime refuses an allocation, the search stops (`memoryHit`, incomplete) with the
   * states found so far. Default: no budget of its own (allocation failures are still caught).
   */
  memoryBudget?: number
  /**
   * Go on from a search done elsewhere (the parallel explorer, parallel.ts): `store` holds levels
   * 0..L numbered as this search numbers them, `levelStart` the starts of those levels (the last
   * is `head`, where level L starts) and `transitions` those of levels before L. Initial states
   * are not read again.
   */
  resume?: { store: StateStore; levelStart: number[]; head: number; transitions: number }
}

export interface ExploreResult {
  /** Distinct states stored (all reachable ones when complete). */
  states: number
  /** Distinct (source, target) pairs among expanded sources; a model error is not a transition. */
  transitions: number
  /** True when every reachable state was found and expanded with no violation and no error. */
  complete: boolean
  stopped: boolean
  limitHit: boolean
  /** True when the search stopped because memory ran out (the budget, or a refused allocation). */
  memoryHit: boolean
  outcome: 'ok' | 'violation' | 'model-error'
  /** Store indices from an initial state to the violating state, or to the state whose step erred (null under reduction). */
  trace: number[] | null
  error: ModelError | null
  /** The states found; state ids are store indices. */
  store: StateStore
  seconds: number
  /** Bytes held by the store (arena and hash table) per state. */
  bytesPerState: number
  /** Threads that took part (explore/parallel.ts); absent: this thread alone. */
  workers?: number
}

/** Explores the instance breadth-first from its initial states. */
export function explore(inst: Instance, opts: ExploreOptions = {}): ExploreResult {
  const t0 = performance.now()
  const W = inst.words
  const limit = opts.limit ?? Infinity
  const invariant = opts.invariant
  const resume = opts.resume
  const store = resume ? resume.store : new StateStore(W, 1024)
  const budget = opts.memoryBudget ?? Infinity
  const levelStart: number[] = resume ? resume.levelStart.slice() : [0]
  let transitions = resume ? resume.transitions : 0
  let halted = false
  const end: SearchEnd = { limitHit: false, stopped: false, memoryHit: false, violation: -1, error: null, errorSource: -1 }

  const canon = opts.canonicalize
  const rec = opts.edges
  if (rec && canon && !rec.reduced) throw new Error('internal error: edges are recorded between real states, not representatives')
  const rep = new Uint32Array(W)
  const init = resume ? new Uint32Array(0) : initialRepresentatives(inst, canon, rep)
  /** The invariant on the state just stored as idx; false when it fails or faults (then halted). */
  const check = (w: Uint32Array, off: number, idx: number): boolean => {
    try {
      if (invariant!(w, off)) return true
      end.violation = idx
    } catch (e) {
      if (!(e instanceof PropertyFault)) throw e
      if (!end.error) { end.error = e.toModelError(); end.errorSource = idx }
    }
    halted = true
    return false
  }
  const outOfMemory = (e: unknown): void => {
    if (!isOutOfMemory(e)) throw e
    end.memoryHit = halted = true
  }
  try {
    store.budget = budget
    if (storeInitial(store, init, W, limit, invariant ? check : null)) end.limitHit = halted = true
  } catch (e) {
    outOfMemory(e)
  }

  const seen = new TargetSet()
  const memo = canon ? new RawSuccessors(W, !!rec) : null
  const raw = memo ? memo.raw : null
  let perm = 0
  const emit = (succ: Uint32Array, stepped: number, receivedFrom: number): boolean => {
    let dst = succ
    if (canon) {
      const before = raw!.size
      const k = raw!.insert(succ, 0)
      if (k < before) {
        if (rec) rec.edge(memo!.rep[k], succ, stepped, receivedFrom, memo!.perm[k])
        return false
      }
      perm = canon(succ, 0, rep) ?? 0
      dst = rep
      if (rec) memo!.note(k, perm)
    }
    let idx = store.lookup(dst, 0)
    const stored = idx < 0
    if (stored) {
      if (store.size >= limit) { end.limitHit = halted = true; return true }
      idx = store.insert(dst, 0)
    }
    const fresh = seen.add(idx)
    if (fresh) transitions++
    if (rec) record(idx, succ, stepped, receivedFrom, fresh)
    // A state stored just now is checked (after its edge is recorded: a violation's edge is kept).
    return stored && invariant !== undefined && !check(dst, 0, idx)
  }

  // Unreduced, `succ` is the state stored; reduced, the raw successor (the recorder's `dst`).
  // `fresh` (idx not yet a target of this source) only speaks for real targets, not representatives.
  const record = (idx: number, succ: Uint32Array, stepped: number, receivedFrom: number, fresh: boolean) => {
    if (memo) memo.rep[raw!.size - 1] = idx
    rec!.edge(idx, succ, stepped, receivedFrom, perm, !memo && fresh)
  }

  // One bound object for the whole search (no allocation per state); see expansion.ts.
  const bound: ExpansionBound = { room: limit, stop: opts.shouldStop, stopAtError: !opts.continueOnError, interrupted: false }
  const src = new Uint32Array(W)
  let head = resume ? resume.head : 0
  let levelEnd = store.size
  const progress = { t0, last: t0 }
  let sinceCheck = 0, transitionsAtCheck = 0
  while (!halted && head < store.size) {
    if (head === levelEnd) {
      levelStart.push(head)
      levelEnd = store.size
    }
    store.get(head, src, 0)
    seen.reset()
    if (raw) raw.clear()
    bound.room = limit - store.size
    let err: ModelError | null
    try {
      if (rec) rec.beginSource(head, src)
      err = inst.successors(src, 0, emit, bound)
    } catch (e) {
      outOfMemory(e)
      break
    }
    if (bound.interrupted) { end.stopped = halted = true; break }
    if (err && !halted && !end.error) {
      end.error = err
      end.errorSource = head
      if (!opts.continueOnError) halted = true
    }
    head++
    if (++sinceCheck >= 64 || transitions - transitionsAtCheck >= 4096) {
      sinceCheck = 0
      transitionsAtCheck = transitions
      const pause = pauseReason(store, rec, budget, opts, progress, transitions)
      if (pause === 'memory') end.memoryHit = halted = true
      else if (pause === 'stop') end.stopped = halted = true
      if (halted) break
    }
  }
  return exploreResult(inst, store, levelStart, levelEnd, end, !!canon, transitions, halted, t0)
}

/** How a search stopped short of completing; written when it stops. */
interface SearchEnd {
  limitHit: boolean
  stopped: boolean
  memoryHit: boolean
  /** The state that violates the invariant, or -1. */
  violation: number
  /** The first model error, on the expansion of (or the property at) `errorSource`. */
  error: ModelError | null
  errorSource: number
}

/** The initial states, as their representatives under `canon`. */
function initialRepresentatives(inst: Instance, canon: ExploreOptions['canonicalize'], rep: Uint32Array): Uint32Array {
  const init = inst.initialStates()
  if (!canon) return init
  const W = inst.words
  const reps = new Uint32Array(init.length)
  for (let off = 0; off < init.length; off += W) { canon(init, off, rep); reps.set(rep, off) }
  return reps
}

/** Stores the initial states once each, checking each new one (`check` false stops); true when the state limit stops it. */
function storeInitial(store: StateStore, init: Uint32Array, W: number, limit: number, check: ((w: Uint32Array, off: number, idx: number) => boolean) | null): boolean {
  for (let off = 0; off < init.length; off += W) {
    if (store.lookup(init, off) >= 0) continue
    if (store.size >= limit) return true
    const idx = store.insert(init, off)
    if (check && !check(init, off, idx)) return false
  }
  return false
}

/**
 * Under reduction, the raw successors of the current source: many successor combinations (crash
 * subsets, choices) give the same state, and a repeat maps to the same representative, so it
 * skips the canonical form (the costly part: one image per permutation) and changes nothing.
 * A reduced recorder still sees a repeat (other processes stepping give other marks), with the
 * representative and permutation remembered from its first occurrence.
 */
class RawSuccessors {
  readonly raw: StateStore
  /** Per raw successor (recorded searches only): the store index of its representative, -1 until known. */
  rep: Int32Array
  /** Per raw successor (recorded searches only): the permutation that maps it to its representative. */
  perm: Int32Array
  constructor(W: number, recorded: boolean) {
    this.raw = new StateStore(W, 64)
    this.rep = new Int32Array(recorded ? 64 : 0)
    this.perm = new Int32Array(recorded ? 64 : 0)
  }

  /** Raw successor k is new, mapped by `perm`; its representative's index comes with its edge. */
  note(k: number, perm: number): void {
    if (k >= this.rep.length) {
      const a = new Int32Array(this.rep.length * 2); a.set(this.rep); this.rep = a
      const b = new Int32Array(this.perm.length * 2); b.set(this.perm); this.perm = b
    }
    this.perm[k] = perm
    this.rep[k] = -1
  }
}

/**
 * The periodic checks of a search (every 64 sources or 4096 transitions): the memory budget,
 * counting the recorder's bytes with the store's (the store's budget is what is left), a stop
 * request, and progress (at most every 100 ms). Why the search stops, or null.
 */
function pauseReason(
  store: StateStore, rec: EdgeRecorder | undefined, budget: number, opts: ExploreOptions, progress: { t0: number; last: number }, transitions: number,
): 'memory' | 'stop' | null {
  if (rec && budget !== Infinity) {
    const left = budget - (rec.bytes ?? 0)
    if (store.bytes > left) return 'memory'
    store.budget = left
  }
  if (opts.shouldStop && opts.shouldStop()) return 'stop'
  if (opts.onProgress) {
    const now = performance.now()
    if (now - progress.last >= 100) {
      progress.last = now
      const seconds = (now - progress.t0) / 1000
      opts.onProgress({ states: store.size, transitions, statesPerSecond: seconds > 0 ? store.size / seconds : 0, seconds })
    }
  }
  return null
}

/** The result of a search that ended (halted or not) with `store` and `levelStart`; traces are rebuilt here. */
function exploreResult(
  inst: Instance, store: StateStore, levelStart: number[], levelEnd: number, end: SearchEnd, reduced: boolean,
  transitions: number, halted: boolean, t0: number,
): ExploreResult {
  // States found while expanding the last level started the next one.
  if (levelStart[levelStart.length - 1] < levelEnd && levelEnd < store.size) levelStart.push(levelEnd)
  let outcome: ExploreResult['outcome'] = 'ok'
  let trace: number[] | null = null
  if (end.violation >= 0) {
    outcome = 'violation'
    trace = reduced ? null : traceTo(inst, store, levelStart, end.violation)
  } else if (end.error) {
    outcome = 'model-error'
    trace = reduced ? null : traceTo(inst, store, levelStart, end.errorSource)
  }
  const seconds = (performance.now() - t0) / 1000
  const { limitHit, stopped, memoryHit, error } = end
  return {
    states: store.size, transitions, complete: !halted, stopped, limitHit, memoryHit, outcome, trace, error, store, seconds,
    bytesPerState: store.size > 0 ? store.bytes / store.size : 0,
  }
}

/**
 * The shortest path (store indices) from an initial state to `target`: walks the levels back,
 * taking in each the first state (in index order) that has the current one as a successor.
 */
function traceTo(inst: Instance, store: StateStore, levelStart: number[], target: number): number[] {
  const W = inst.words
  // The level of the target: the last level that starts at or before it.
  let level = 0
  while (level + 1 < levelStart.length && levelStart[level + 1] <= target) level++
  const path = [target]
  const src = new Uint32Array(W)
  // Outcome lists are cut (at a size ordinary states never reach) and doubled until the successor
  // wanted comes out, so a state with billions of successors is not expanded in full to find one.
  const bound: ExpansionBound = { room: 4096, interrupted: false }
  let cur = target
  for (let L = level; L > 0; L--) {
    const from = levelStart[L - 1]
    const to = levelStart[L]
    let parent = -1
    for (let s = from; s < to && parent < 0; s++) {
      store.get(s, src, 0)
      inst.successors(src, 0, (dst) => {
        if (store.lookup(dst, 0) === cur) {
          parent = s
          return true
        }
        return false
      }, bound)
    }
    if (parent < 0) throw new Error('trace reconstruction lost its way: a state without a parent in the previous level')
    path.push(parent)
    cur = parent
  }
  return path.reverse()
}

/** Every reachable state in canonical form (DEVELOPERS.md), for differential tests. */
export function reachableCanonical(inst: Instance, limit?: number): { states: Set<string>; transitions: number; complete: boolean; modelError: ModelError | null } {
  const r = explore(inst, { limit, continueOnError: true })
  const states = new Set<string>()
  const data = r.store.data
  for (let k = 0; k < r.states; k++) states.add(canonicalState(inst, data, k * inst.words))
  return { states, transitions: r.transitions, complete: r.complete, modelError: r.error }
}
