// Parallel breadth-first exploration: a level-synchronous search over one shared lock-free hash
// table, with results identical to the sequential explorer (reach.ts) for any number of workers.
//
// Every buffer lives in a growable SharedArrayBuffer made once per pool (`createSharedBuffers`)
// and handed to the workers when they start, so the coordinator never posts a message during a
// search: it writes a phase into `ctrl`, wakes the workers with Atomics.notify and sleeps in
// Atomics.wait until the last one is done (the coordinator runs in Node's main thread or in the
// workbench's kernel worker, where blocking waits are allowed). A level is expanded in phases:
// - EXPAND: workers take blocks of the level's sources from a shared counter. A successor is
//   looked up in the table (linear probing, the slot format of StateStore); a new one is written
//   to a staging slot and published by compare-and-swap of the empty table slot to -(p + 1), p its
//   staging slot. Each pending state keeps the smallest source that emitted it (atomic minimum),
//   and each source the list of pending states it reached first in its own order.
// - COUNT: per block, the pending states whose smallest source lies in the block.
// - ASSIGN: with the blocks' prefix sums, every pending state gets the index the sequential
//   search gives it (in order of its first source, then of that source's successors), is copied
//   to the arena, and its table slot becomes index + 1.
// So states are numbered exactly as reach.ts numbers them, level after level. A level in which
// anything stops the sequential search (an invariant fails, a model error, the state limit, an
// outcome list as wide as the room, where reach.ts's lazy expansion depends on the room) is undone
// (its pending slots cleared) and handed to `explore` with `resume`, which redoes that level on
// this thread exactly as it would have: same states, transitions, verdict and shortest trace.
import { PropertyFault } from '../model/errors'
import type { ExpansionBound } from '../model/expansion'
import type { Instance } from '../model/instance'
import type { Formula, ProtocolModel, Term } from '../language/model'
import { explore, type ExploreOptions, type ExploreResult } from './reach'
import { StateStore, hashWords } from '../base/stateset'
import { TargetSet } from '../base/targetset'
import { RowSet, fairMarks, type FairMarks } from './fairgraph'
import type { EdgeRecorder } from './reach'

/** What a worker needs to rebuild the instance and the invariant (plain data). */
export interface ParallelJob {
  protocol: ProtocolModel
  n: number
  constants: number[]
  /** The `always P` body with the property's atoms and the assignments checked, or null. */
  invariant: { formula: Formula; terms: Term[]; chosen: number[][] } | null
  /** Record every edge with its fairness marks (a temporal row's fair graph, fed to `ExploreOptions.edges`). */
  edges?: boolean
  /** Test hook: worker `worker` throws (or, with `exit`, ends its thread without a word) after expanding `after` sources. */
  fault?: { worker: number; after: number; exit?: boolean }
}

/** The shared buffers of a pool (structured-cloneable: only SharedArrayBuffers). */
export interface SharedBuffers {
  ctrl: SharedArrayBuffer
  err: SharedArrayBuffer
  job: SharedArrayBuffer
  table: SharedArrayBuffer
  arena: SharedArrayBuffer
  stage: SharedArrayBuffer
  minSrc: SharedArrayBuffer
  slotOf: SharedArrayBuffer
  blocks: SharedArrayBuffer
  /** Recorded edges: (target or pending id, marks) pairs, one region per worker. */
  edges: SharedArrayBuffer
  /** Per level: each source's edge count, then each block's worker and first edge in its region. */
  rows: SharedArrayBuffer
}

/** A started pool: `size` workers serving `buffers` (see `serveExploration`). */
export interface ExplorePool {
  size: number
  buffers: SharedBuffers
  /** Starts the workers if they are not running (synchronous: they may be started ahead). */
  start(): void
  /** The largest size of each buffer. */
  caps: BufferCaps
  /**
   * True once a worker of this pool has died without reporting (its thread ended: killed, out of
   * memory). Such a pool is never used again; its provider makes a new one.
   */
  readonly dead?: boolean
  /**
   * Where workers can take new buffers between phases (Node: a message port read synchronously),
   * buffers are plain SharedArrayBuffers, replaced to grow: `buffers[name] = sab`, and the workers
   * are told. Without it, buffers are growable and grow in place (views of growable buffers index
   * more slowly in V8, about 2x in a micro-benchmark here).
   */
  replace?(name: BufferName, sab: SharedArrayBuffer): void
}

/** The buffers that grow. */
export type BufferName = 'job' | 'table' | 'arena' | 'stage' | 'minSrc' | 'slotOf' | 'blocks' | 'edges' | 'rows'

/**
 * Levels narrower than `minFrontier` sources are expanded on the coordinator's thread with the
 * same code (a tiny search never starts the workers, and the first levels cost no wake-ups).
 * Tests set it to 0 to run every level on the workers.
 */
export const parallelTuning = { minFrontier: 2048, edgesPerSource: 16 }

/** Counts for tests: levels expanded again because a worker's edge region was too small. */
export const parallelCounters = { edgeRedos: 0 }

/** Where pools come from: Node (pool-node.ts) and the workbench register their own. */
export type PoolProvider = (workers: number) => ExplorePool | null
let provider: PoolProvider | null = null
/** Registers how to get a pool of n workers (null: parallel search unavailable here). */
export function setPoolProvider(p: PoolProvider | null): void {
  provider = p
}

/** The most workers a pool can have (`--workers` accepts 1..256). */
export const MAX_POOL = 256

// ctrl layout (Int32 words). The two counters every worker adds to during a level (NEXT, the block
// counter; RESERVE, the staging slots) each have a cache line (16 words) of their own, so that
// their traffic does not evict the words the workers read (HALT, STOPREQ, the level's bounds).
export const C = {
  GEN: 0, PHASE: 1, DONE: 2, HALT: 5, OVERFLOW: 6, FAULT: 7, STOPREQ: 8, DEAD: 9,
  A: 10, B: 11, SIZE: 12, MASK: 13, MAXPEND: 14, ROOM: 15, JOBLEN: 16, BLOCK: 17, TLEN: 18,
  CLEAR_TO: 19, STAGE_FROM: 20, STAGE_TO: 21, ARENA_FROM: 22, ARENA_TO: 23, WORKERS: 24, READY: 25,
  BAR: 26, BARGEN: 27, SKIP: 28, FRESH: 29, ARENACAP: 30, EPOCH: 31,
  NEXT: 32, RESERVE: 48, EDGEOVER: 49, EDGECAP: 50,
  TRANS: 64, PUB: 64 + MAX_POOL, WIDEST: 64 + 2 * MAX_POOL,
} as const
const CTRL_WORDS = 64 + 3 * MAX_POOL
/** Staging slots a worker reserves at a time (one atomic add per batch, not per new state). */
const SPARE_BATCH = 32
export const PHASE = { JOB: 1, CLEAR: 2, REHASH: 3, LEVEL: 4, QUIT: 7 } as const
/** Sources per block of work. */
const BLOCK = 32

type GrowableOptions = { maxByteLength: number }
type GrowableConstructor = new (length: number, opts: GrowableOptions) => SharedArrayBuffer
type Grow = SharedArrayBuffer & { grow(n: number): void; maxByteLength: number }

/** Largest buffers (bytes) reserved per pool; reserved address space, committed as used. */
export interface BufferCaps { arena: number; table: number; stage: number; perState: number; job: number }
export const NODE_CAPS: BufferCaps = { arena: 2 ** 31, table: 2 ** 30, stage: 2 ** 31, perState: 2 ** 29, job: 2 ** 26 }

/** Allocates a pool's buffers (nothing committed until a search grows them). */
export function createSharedBuffers(caps: BufferCaps = NODE_CAPS, growable = true): SharedBuffers {
  if (!growable) {
    const b = () => new SharedArrayBuffer(65536)
    return { ctrl: new SharedArrayBuffer(CTRL_WORDS * 4), err: new SharedArrayBuffer(4096), job: b(), table: b(), arena: b(), stage: b(), minSrc: b(), slotOf: b(), blocks: b(), edges: b(), rows: b() }
  }
  // Named here, not when the module loads: a page that is not cross-origin isolated has no
  // SharedArrayBuffer at all, and still loads this module (through the kernel's facade).
  const Growable = SharedArrayBuffer as unknown as GrowableConstructor
  return {
    ctrl: new SharedArrayBuffer(CTRL_WORDS * 4),
    err: new SharedArrayBuffer(4096),
    job: new Growable(0, { maxByteLength: caps.job }),
    table: new Growable(0, { maxByteLength: caps.table }),
    arena: new Growable(0, { maxByteLength: caps.arena }),
    stage: new Growable(0, { maxByteLength: caps.stage }),
    minSrc: new Growable(0, { maxByteLength: caps.perState }),
    slotOf: new Growable(0, { maxByteLength: caps.perState }),
    blocks: new Growable(0, { maxByteLength: caps.perState }),
    edges: new Growable(0, { maxByteLength: caps.stage }),
    rows: new Growable(0, { maxByteLength: caps.perState }),
  }
}

/** Grows a buffer to at least `bytes` (by half again, to a 64 KiB multiple); false beyond its cap. */
function ensure(sab: SharedArrayBuffer, bytes: number): boolean {
  const g = sab as Grow
  if (g.byteLength >= bytes) return true
  if (bytes > g.maxByteLength) return false
  const want = Math.min(g.maxByteLength, Math.ceil(Math.max(bytes, g.byteLength * 1.5) / 65536) * 65536)
  g.grow(want)
  return true
}

/** Smallest power-of-two table that holds `states` at most 3/4 full. */
function tableFor(states: number): number {
  let t = 1024
  while (states * 4 > t * 3) t *= 2
  return t
}

/**
 * `explore` on `workers` workers when a pool is available and the search is one the parallel
 * explorer does (no reduction, no edge recording, stopping at the first error); otherwise, or
 * with one worker, `explore` itself.
 */
export function exploreWith(inst: Instance, opts: ExploreOptions, workers: number | undefined, job: ParallelJob): ExploreResult {
  // Edges are recorded in parallel for real states only, and only when the job says so.
  const edgesOk = !opts.edges || (job.edges === true && !opts.edges.reduced && opts.edges.markedEdge !== undefined)
  if (!workers || workers <= 1 || opts.canonicalize || !edgesOk || opts.continueOnError || opts.resume || opts.memoryBudget !== undefined || !provider) return explore(inst, opts)
  const pool = provider(workers)
  if (!pool) return explore(inst, opts)
  return exploreParallel(inst, opts, job, pool)
}

/** Which worker died and what its host saw (the host writes both before it sets DEAD). */
function deadMessage(ctrl: Int32Array, err: Uint8Array): string {
  return `worker ${Atomics.load(ctrl, C.DEAD)} stopped: ${faultMessage(err.subarray(DEATH_AT))}`
}

/** Where in `err` a host writes why a worker died (the first half is a thrown fault's message). */
const DEATH_AT = 2048

/**
 * What a pool's host calls when worker `index` ended without reporting (its thread exited, was
 * killed or ran out of memory): the message is kept for the row, the search is halted, and every
 * waiter (the coordinator, workers in a barrier) is woken to see it.
 */
export function reportDeath(buffers: SharedBuffers, index: number, why: string): void {
  const ctrl = new Int32Array(buffers.ctrl)
  const err = new Uint8Array(buffers.err).subarray(DEATH_AT)
  const msg = new TextEncoder().encode(why).slice(0, err.length - 1)
  if (Atomics.compareExchange(ctrl, C.DEAD, 0, index + 1) === 0) {
    err.fill(0)
    err.set(msg)
  }
  Atomics.store(ctrl, C.HALT, 1)
  for (const word of [C.DONE, C.BARGEN]) Atomics.notify(ctrl, word)
}

/** Raised in a worker waiting in a barrier when another worker of the pool died. */
class PoolDead extends Error {}

/** The message a worker left in `err`. */
function faultMessage(err: Uint8Array): string {
  let end = 0
  while (end < err.length && err[end] !== 0) end++
  return new TextDecoder().decode(err.slice(0, end)) || 'no message'
}

/** The parallel search on `pool` (any size, one worker included); see the file comment. */
export function exploreParallel(inst: Instance, opts: ExploreOptions, job: ParallelJob, pool: ExplorePool): ExploreResult {
  const t0 = performance.now()
  // Level 0 on this thread: the initial states, deduplicated and checked as explore() does; if
  // anything stops the search there, explore() does it all (it costs one level).
  const first = firstLevel(inst, opts)
  if (!first) return explore(inst, opts)
  const search = new ParallelSearch(inst, opts, job, pool, t0, first.size)
  return search.run(first)
}

/** The initial states, deduplicated and checked as explore() does; null when anything stops the search there. */
function firstLevel(inst: Instance, opts: ExploreOptions): StateStore | null {
  const W = inst.words
  const limit = opts.limit ?? Infinity
  const invariant = opts.invariant
  const init = inst.initialStates()
  const first = new StateStore(W, Math.max(16, init.length / W))
  for (let off = 0; off < init.length; off += W) {
    if (first.lookup(init, off) >= 0) continue
    if (first.size >= limit) return null
    first.insert(init, off)
    if (invariant) {
      let ok: boolean
      try { ok = invariant(init, off) } catch (e) { if (e instanceof PropertyFault) return null; throw e }
      if (!ok) return null
    }
  }
  return first
}

/** The coordinator of one parallel search: the pool's buffers, the committed table, and the phases it runs. */
class ParallelSearch {
  private readonly W: number
  private readonly limit: number
  private readonly buf: SharedBuffers
  private readonly ctrl: Int32Array
  private readonly err: Uint8Array
  /** Workers taking part: 1 (this thread) until a level is wide enough, then the pool's. */
  private P = 1
  private pooled = false
  private T = 0
  private lastReport: number
  private stopped = false
  private transitions = 0
  private touchedStage = 0
  private touchedArena = 0
  private readonly levelStart: number[] = [0]
  private a = 0
  // This thread's own level record, for the levels it expands itself.
  private readonly localJob: CompiledJob
  private readonly localState: LevelState

  constructor(
    private readonly inst: Instance, private readonly opts: ExploreOptions, private readonly job: ParallelJob,
    private readonly pool: ExplorePool, private readonly t0: number, private size: number,
  ) {
    this.W = inst.words
    this.limit = opts.limit ?? Infinity
    this.buf = pool.buffers
    this.ctrl = new Int32Array(this.buf.ctrl)
    this.err = new Uint8Array(this.buf.err)
    this.lastReport = t0
    this.localJob = { inst, invariant: opts.invariant, marks: opts.edges && job.edges ? fairMarks(inst) : undefined }
    this.localState = new LevelState(this.W)
  }

  /** Level after level from the first, on this thread until a level is wide enough, then on the pool. */
  run(first: StateStore): ExploreResult {
    const { W, buf, ctrl, pool, limit } = this
    ctrl[C.STOPREQ] = 0
    if (!this.grow('arena', this.size * W * 4)) return explore(this.inst, this.opts)
    u32(buf.arena).set(first.data.subarray(0, this.size * W))
    if (!this.setTable(tableFor(this.size * 4), this.size * 4 * W, this.size * 4 * W)) return explore(this.inst, this.opts)

    let ratio = 4
    // Edges per source expected (recorded searches): from the last level, grown on overflow.
    let edgeRatio = parallelTuning.edgesPerSource
    while (this.a < this.size) {
      const a = this.a
      const b = this.size
      const frontier = b - a
      const expected = Math.ceil(frontier * ratio * 1.25) + 1024
      if (!this.pooled && frontier >= parallelTuning.minFrontier && !this.startPool()) return this.handover()
      let redo = true
      while (redo) {
        redo = false
        const size = this.size
        const need = tableFor(size + expected)
        if (!this.setTable(Math.max(need, this.T), expected * W, (size + expected) * W)) return this.handover()
        const stageCap = Math.floor(Math.min(buf.stage.byteLength / 4 / W, buf.minSrc.byteLength / 4, buf.slotOf.byteLength / 4))
        const maxPending = Math.min(Math.floor(this.T * 3 / 4) - size, limit - size, 2 ** 31 - 1)
        const pend = Math.max(0, Math.min(maxPending, Math.floor(pool.caps.stage / 4 / W), pool.caps.perState / 4))
        if (pend > stageCap) {
          if (!this.grow('stage', pend * W * 4) || !this.grow('minSrc', pend * 4) || !this.grow('slotOf', pend * 4)) return this.handover()
        }
        if (!this.grow('blocks', (Math.ceil(frontier / BLOCK) + 1) * 4)) return this.handover()
        if (this.localJob.marks && !this.sizeEdges(frontier, edgeRatio)) return this.handover()
        // Room in the arena for every state this level may add, as far as the buffer allows.
        this.grow('arena', Math.min(pool.caps.arena, (size + pend) * W * 4))
        ctrl[C.ARENACAP] = Math.floor(buf.arena.byteLength / 4 / W)
        ctrl[C.A] = a; ctrl[C.B] = b; ctrl[C.SIZE] = size; ctrl[C.MAXPEND] = pend; ctrl[C.ROOM] = this.room(); ctrl[C.BLOCK] = BLOCK
        ctrl[C.HALT] = 0; ctrl[C.OVERFLOW] = 0; ctrl[C.RESERVE] = 0; ctrl[C.SKIP] = 0; ctrl[C.BAR] = 0; ctrl[C.EDGEOVER] = 0
        this.phase(PHASE.LEVEL)
        if (this.stopped) { this.discard(); return this.finish(false) }
        if (ctrl[C.EDGEOVER] !== 0 && ctrl[C.OVERFLOW] === 0) {
          // A worker's edge region was too small for this level: twice the room, and again.
          this.discard()
          parallelCounters.edgeRedos++
          edgeRatio *= 2
          redo = true
          continue
        }
        if (ctrl[C.OVERFLOW] !== 0) {
          const reserved = Atomics.load(ctrl, C.RESERVE)
          this.discard()
          // The state limit falls in this level, or the buffers are full: the sequential search goes on.
          if (pend >= limit - size || pend < maxPending) return this.handover()
          // The table was too small for this level: grow it and expand the level again.
          if (!this.setTable(tableFor(size + reserved * 2), reserved * 2 * W, (size + reserved * 2) * W)) return this.handover()
          redo = true
          continue
        }
        // An invariant failed, a model error, the state limit, or lists as wide as the room.
        if (ctrl[C.SKIP] !== 0) { this.discard(); return this.handover() }
      }
      const fresh = ctrl[C.FRESH]
      let levelTransitions = 0
      for (let w = 0; w < this.P; w++) levelTransitions += ctrl[C.TRANS + w] >>> 0
      Atomics.store(ctrl, C.RESERVE, 0)
      this.transitions += levelTransitions
      ratio = Math.max(0.25, fresh / frontier)
      if (this.localJob.marks) edgeRatio = Math.max(parallelTuning.edgesPerSource, feedEdges(this.localViews(), this.opts.edges!, this.W, this.P) / frontier)
      this.a = b
      this.size = b + fresh
      if (fresh > 0) this.levelStart.push(b)
      if (this.stopped) return this.finish(false)
    }
    return this.finish(true)
  }

  /** Edge regions for `frontier` sources at `ratio` edges each, split among the workers; false past the cap. */
  private sizeEdges(frontier: number, ratio: number): boolean {
    const { ctrl, pool } = this
    const perWorker = Math.ceil((frontier * ratio * 1.25) / this.P) + 4096
    const cap = Math.min(perWorker, Math.floor(pool.caps.stage / 8 / this.P))
    if (cap < perWorker && ratio > 64) return false
    if (!this.grow('edges', cap * 8 * this.P)) return false
    if (!this.grow('rows', (frontier + 2 * (Math.ceil(frontier / BLOCK) + 1)) * 4)) return false
    ctrl[C.EDGECAP] = cap
    return true
  }

  private capOf(name: BufferName): number {
    if (name === 'edges') return this.pool.caps.stage
    return name === 'minSrc' || name === 'slotOf' || name === 'blocks' || name === 'rows' ? this.pool.caps.perState : this.pool.caps[name]
  }

  /** Grows a buffer to at least `bytes`: in place, or by a new buffer the workers are given. */
  private grow(name: BufferName, bytes: number): boolean {
    const { pool, buf } = this
    if (!pool.replace) return ensure(buf[name], bytes)
    const old = buf[name]
    if (old.byteLength >= bytes) return true
    const cap = this.capOf(name)
    if (bytes > cap) return false
    const next = new SharedArrayBuffer(Math.min(cap, Math.ceil(Math.max(bytes, old.byteLength * 1.5) / 65536) * 65536))
    new Uint8Array(next).set(new Uint8Array(old))
    pool.replace(name, next)
    return true
  }

  /** Stop requests and progress (at most every 100 ms). */
  private poll(kind: number): void {
    const { opts, ctrl } = this
    if (!this.stopped && opts.shouldStop && opts.shouldStop()) {
      this.stopped = true
      Atomics.store(ctrl, C.STOPREQ, 1)
    }
    if (opts.onProgress) {
      const now = performance.now()
      if (now - this.lastReport >= 100) {
        this.lastReport = now
        const seconds = (now - this.t0) / 1000
        const states = this.size + (kind === PHASE.LEVEL ? Math.max(0, Atomics.load(ctrl, C.RESERVE)) : 0)
        opts.onProgress({ states, transitions: this.transitions, statesPerSecond: seconds > 0 ? states / seconds : 0, seconds, workers: this.P })
      }
    }
  }

  /** Runs one phase on every worker; polls stop requests and progress while it waits. */
  private phase(kind: number): void {
    if (!this.pooled) return this.runLocal(kind)
    const ctrl = this.ctrl
    Atomics.store(ctrl, C.DONE, 0)
    Atomics.store(ctrl, C.NEXT, 0)
    Atomics.store(ctrl, C.PHASE, kind)
    Atomics.add(ctrl, C.GEN, 1)
    Atomics.notify(ctrl, C.GEN)
    for (;;) {
      const d = Atomics.load(ctrl, C.DONE)
      if (d >= this.P) break
      // A worker whose thread ended (its host saw it exit) never reports: the search ends here.
      if (Atomics.load(ctrl, C.DEAD) !== 0) throw new Error(`parallel exploration ${deadMessage(ctrl, this.err)}`)
      Atomics.wait(ctrl, C.DONE, d, 50)
      this.poll(kind)
    }
    const f = Atomics.load(ctrl, C.FAULT)
    if (f !== 0) {
      Atomics.store(ctrl, C.FAULT, 0)
      throw new Error(`parallel exploration worker ${f} failed: ${faultMessage(this.err)}`)
    }
  }

  /** This thread's own views of the buffers. */
  private localViews(): WorkerViews {
    const { ctrl, err, buf } = this
    return { ctrl, err, job: buf.job, table: buf.table, arena: buf.arena, stage: buf.stage, minSrc: buf.minSrc, slotOf: buf.slotOf, blocks: buf.blocks, edges: buf.edges, rows: buf.rows }
  }

  private runLocal(kind: number): void {
    Atomics.store(this.ctrl, C.NEXT, 0)
    switch (kind) {
      case PHASE.CLEAR: clearPhase(this.localViews()); break
      case PHASE.REHASH: rehashPhase(this.localViews(), this.W); break
      case PHASE.LEVEL: levelPhase(this.localViews(), 0, 1, this.localJob, this.localState, true); break
    }
    this.poll(kind)
  }

  /** Hands the search to the pool: each worker compiles its own instance and invariant from plain data. */
  private startPool(): boolean {
    const { pool, buf, ctrl } = this
    if (Atomics.load(ctrl, C.DEAD) !== 0) throw new Error(`parallel exploration ${deadMessage(ctrl, this.err)}`)
    const jobBytes = new TextEncoder().encode(JSON.stringify(this.job))
    if (!this.grow('job', jobBytes.length)) return false
    pool.start()
    new Uint8Array(buf.job).set(jobBytes)
    ctrl[C.JOBLEN] = jobBytes.length
    ctrl[C.WORKERS] = pool.size
    this.err.fill(0)
    this.pooled = true
    this.P = pool.size
    this.phase(PHASE.JOB)
    return true
  }

  /** A table of `len` slots holding the committed states; false when it does not fit the buffers. */
  private setTable(len: number, stageWords: number, arenaWords: number): boolean {
    const { pool, ctrl } = this
    const stageTo = Math.min(stageWords, pool.caps.stage / 4)
    const arenaTo = Math.min(arenaWords, pool.caps.arena / 4)
    if (!this.grow('table', len * 4) || !this.grow('stage', stageTo * 4) || !this.grow('arena', arenaTo * 4)) return false
    // Memory is touched here, by every worker, before the search needs it: page faults serialize.
    if (len <= this.T && this.touchedStage >= stageTo && this.touchedArena >= arenaTo) return true
    ctrl[C.CLEAR_TO] = len > this.T ? len : 0
    ctrl[C.STAGE_FROM] = Math.min(this.touchedStage, stageTo); ctrl[C.STAGE_TO] = stageTo
    ctrl[C.ARENA_FROM] = Math.min(this.touchedArena, arenaTo); ctrl[C.ARENA_TO] = arenaTo
    this.touchedStage = Math.max(this.touchedStage, stageTo)
    this.touchedArena = Math.max(this.touchedArena, arenaTo)
    this.phase(PHASE.CLEAR)
    if (len > this.T) {
      this.T = len
      ctrl[C.TLEN] = this.T
      ctrl[C.MASK] = this.T - 1
      ctrl[C.SIZE] = this.size
      this.phase(PHASE.REHASH)
    }
    return true
  }

  private room(): number { return Math.min(2 ** 31 - 1, Math.max(0, this.limit - this.size)) }

  private tableVFixed(): Int32Array { return new Int32Array(this.buf.table, 0, this.T) }

  /** Clears the pending slots of an undone level. */
  private discard(): void {
    const ctrl = this.ctrl
    const table = this.tableVFixed()
    const slotOf = i32(this.buf.slotOf)
    const reserved = Math.min(Math.max(0, Atomics.load(ctrl, C.RESERVE)), ctrl[C.MAXPEND])
    for (let p = 0; p < reserved; p++) {
      const s = slotOf[p]
      // Published states only (others keep -1); assigned ones too, if the level was numbered.
      if (s >= 0) table[s] = 0
    }
    Atomics.store(ctrl, C.RESERVE, 0)
  }

  /** The states found so far as a StateStore of this thread (copies: the pool's buffers are reused). */
  private storeOf(): StateStore {
    return StateStore.adopt(this.W, new Uint32Array(this.buf.arena, 0, this.size * this.W).slice(), this.tableVFixed().slice(), this.size)
  }

  /** Level `a` (the last in `levelStart`) is redone by the sequential search, which goes on from there. */
  private handover(): ExploreResult {
    const r = explore(this.inst, { ...this.opts, resume: { store: this.storeOf(), levelStart: this.levelStart, head: this.a, transitions: this.transitions } })
    r.seconds = (performance.now() - this.t0) / 1000
    r.workers = this.P
    return r
  }

  private finish(complete: boolean): ExploreResult {
    const store = this.storeOf()
    const size = this.size
    return {
      states: size, transitions: this.transitions, complete, stopped: !complete, limitHit: false, memoryHit: false, outcome: 'ok', trace: null, error: null, store,
      seconds: (performance.now() - this.t0) / 1000, bytesPerState: size > 0 ? store.bytes / size : 0, workers: this.P,
    }
  }
}

/** The buffers a worker reads, as views. */
interface WorkerViews {
  ctrl: Int32Array
  err: Uint8Array
  job: SharedArrayBuffer
  table: SharedArrayBuffer
  arena: SharedArrayBuffer
  stage: SharedArrayBuffer
  minSrc: SharedArrayBuffer
  slotOf: SharedArrayBuffer
  blocks: SharedArrayBuffer
  edges: SharedArrayBuffer
  rows: SharedArrayBuffer
}

// Views of the growable buffers are made at their current length for each phase: a
// length-tracking view is many times slower to index in V8.
function i32(sab: SharedArrayBuffer): Int32Array { return new Int32Array(sab, 0, sab.byteLength >> 2) }
function u32(sab: SharedArrayBuffer): Uint32Array { return new Uint32Array(sab, 0, sab.byteLength >> 2) }

/** Writes a fault message for the coordinator. */
export function reportFault(buffers: SharedBuffers, index: number, e: unknown): void {
  const ctrl = new Int32Array(buffers.ctrl)
  const err = new Uint8Array(buffers.err).subarray(0, DEATH_AT)
  const msg = new TextEncoder().encode(e instanceof Error ? e.message : String(e)).slice(0, err.length - 1)
  if (Atomics.compareExchange(ctrl, C.FAULT, 0, index + 1) === 0) {
    err.fill(0)
    err.set(msg)
  }
  Atomics.store(ctrl, C.HALT, 1)
}

/** What a worker compiles from a job (kernels/model and the row's invariant). */
export interface CompiledJob {
  inst: Instance
  invariant: ((w: Uint32Array, off: number) => boolean) | undefined
  /** The fairness marks, when the search records edges. */
  marks?: FairMarks
  fault?: { worker: number; after: number; exit?: boolean }
}

/**
 * A worker's loop: waits for phases and runs them, forever (until QUIT). `compile` builds the
 * instance and invariant from a job (passed in so that this file does not import the runner).
 */
export function serveExploration(buffers: SharedBuffers, index: number, compile: (job: ParallelJob) => CompiledJob, refresh?: () => void): void {
  let v: WorkerViews = {
    ctrl: new Int32Array(buffers.ctrl), err: new Uint8Array(buffers.err), job: buffers.job, table: buffers.table,
    arena: buffers.arena, stage: buffers.stage, minSrc: buffers.minSrc, slotOf: buffers.slotOf,
    blocks: buffers.blocks, edges: buffers.edges, rows: buffers.rows,
  }
  const ctrl = v.ctrl
  // A pool's workers start before its first phase: generation 0.
  let gen = 0
  let job: CompiledJob | null = null
  let state: LevelState | null = null
  for (;;) {
    Atomics.wait(ctrl, C.GEN, gen)
    gen = Atomics.load(ctrl, C.GEN)
    const kind = Atomics.load(ctrl, C.PHASE)
    if (kind === PHASE.QUIT) return
    if (refresh) {
      // Buffers replaced since the last phase (pools with `replace`).
      refresh()
      v = { ...v, job: buffers.job, table: buffers.table, arena: buffers.arena, stage: buffers.stage, minSrc: buffers.minSrc, slotOf: buffers.slotOf, blocks: buffers.blocks, edges: buffers.edges, rows: buffers.rows }
    }
    try {
      switch (kind) {
        case PHASE.JOB: {
          const text = new TextDecoder().decode(new Uint8Array(v.job, 0, ctrl[C.JOBLEN]).slice())
          job = null
          job = compile(JSON.parse(text) as ParallelJob)
          state = new LevelState(job.inst.words)
          break
        }
        case PHASE.CLEAR: clearPhase(v); break
        case PHASE.REHASH: rehashPhase(v, job!.inst.words); break
        case PHASE.LEVEL: levelPhase(v, index, ctrl[C.WORKERS], job!, state!); break
      }
    } catch (e) {
      // A worker that left a barrier because another died has nothing of its own to report.
      if (!(e instanceof PoolDead)) reportFault(buffers, index, e)
    }
    if (Atomics.add(ctrl, C.DONE, 1) + 1 >= ctrl[C.WORKERS]) Atomics.notify(ctrl, C.DONE)
  }
}

/** Work items of `count` units in chunks of `chunk`, taken from the shared counter. */
function* chunks(ctrl: Int32Array, count: number, chunk: number): Generator<[number, number]> {
  for (;;) {
    const k = Atomics.add(ctrl, C.NEXT, 1)
    const from = k * chunk
    if (from >= count) return
    yield [from, Math.min(count, from + chunk)]
  }
}

const PAGE_WORDS = 1024
/** Zeroes the table for a new size and touches the next stretch of staging and arena (rewriting each page's first word as it is), so no page fault waits for the search. */
function clearPhase(v: WorkerViews): void {
  const ctrl = v.ctrl
  const clearTo = ctrl[C.CLEAR_TO]
  const table = i32(v.table)
  const stage = u32(v.stage)
  const arena = u32(v.arena)
  const sf = ctrl[C.STAGE_FROM], st = ctrl[C.STAGE_TO], af = ctrl[C.ARENA_FROM], at = ctrl[C.ARENA_TO]
  const CH = 1 << 16
  const n1 = Math.ceil(clearTo / CH), n2 = Math.ceil((st - sf) / CH), n3 = Math.ceil((at - af) / CH)
  for (const [from, to] of chunks(ctrl, n1 + n2 + n3, 1)) {
    for (let k = from; k < to; k++) {
      if (k < n1) table.fill(0, k * CH, Math.min(clearTo, (k + 1) * CH))
      else if (k < n1 + n2) { const s = sf + (k - n1) * CH, e = Math.min(st, s + CH); for (let i = s; i < e; i += PAGE_WORDS) stage[i] = stage[i] }
      else { const s = af + (k - n1 - n2) * CH, e = Math.min(at, s + CH); for (let i = s; i < e; i += PAGE_WORDS) arena[i] = arena[i] }
    }
  }
}

function rehashPhase(v: WorkerViews, W: number): void {
  const ctrl = v.ctrl
  const size = ctrl[C.SIZE], mask = ctrl[C.MASK]
  const table = i32(v.table)
  const arena = u32(v.arena)
  for (const [from, to] of chunks(ctrl, size, 4096)) {
    for (let idx = from; idx < to; idx++) {
      let slot = hashWords(arena, idx * W, W) & mask
      while (Atomics.compareExchange(table, slot, 0, idx + 1) !== 0) slot = (slot + 1) & mask
    }
  }
}

/** A worker's record of one level: its blocks, per source the end of its list of first-reached pending states. */
class LevelState {
  blockIds: number[] = []
  segEnd = new Int32Array(1024)
  segs = 0
  emits = new Int32Array(4096)
  nEmits = 0
  src: Uint32Array
  constructor(readonly W: number) { this.src = new Uint32Array(W) }
  reset(): void { this.blockIds.length = 0; this.segs = 0; this.nEmits = 0 }
  pushEmit(p: number): void {
    if (this.nEmits === this.emits.length) { const e = new Int32Array(this.emits.length * 2); e.set(this.emits); this.emits = e }
    this.emits[this.nEmits++] = p
  }
  pushSeg(): void {
    if (this.segs === this.segEnd.length) { const e = new Int32Array(this.segEnd.length * 2); e.set(this.segEnd); this.segEnd = e }
    this.segEnd[this.segs++] = this.nEmits
  }
}

/**
 * Waits until all `P` workers arrive; the last one runs `last` first (a sense-reversing barrier
 * among the workers, so a level costs one round trip to the coordinator, not three).
 */
function barrier(ctrl: Int32Array, P: number, last: () => void): void {
  const g = Atomics.load(ctrl, C.BARGEN)
  if (Atomics.add(ctrl, C.BAR, 1) + 1 >= P) {
    try { last() } finally {
      Atomics.store(ctrl, C.BAR, 0)
      Atomics.add(ctrl, C.BARGEN, 1)
      Atomics.notify(ctrl, C.BARGEN)
    }
    return
  }
  while (Atomics.load(ctrl, C.BARGEN) === g) {
    // A dead worker never arrives: leave (the pool is not used again).
    if (Atomics.load(ctrl, C.DEAD) !== 0) throw new PoolDead('another worker of the pool died')
    Atomics.wait(ctrl, C.BARGEN, g, 200)
  }
}

/**
 * One level: EXPAND, then (the last worker decides whether the level stands) COUNT, then (the
 * last worker computes the blocks' first indices) ASSIGN. A worker that throws still takes part
 * in both barriers, so the others are never left waiting; its fault skips the rest.
 */
function levelPhase(v: WorkerViews, index: number, P: number, job: CompiledJob, st: LevelState, local = false): void {
  const ctrl = v.ctrl
  let fault: unknown = null
  // On the coordinator's own thread (no other worker to release), a failure is thrown as it is.
  if (local) expandPhase(v, index, job, st)
  else try { expandPhase(v, index, job, st) } catch (e) { fault = e; reportFaultOn(v, index, e) }
  barrier(ctrl, P, () => {
    let fresh = 0
    let widest = 0
    for (let w = 0; w < P; w++) {
      fresh += ctrl[C.PUB + w]
      widest = Math.max(widest, ctrl[C.WIDEST + w])
    }
    ctrl[C.FRESH] = fresh
    const room = ctrl[C.ROOM]
    // reach.ts cuts outcome lists at the room left (it shrinks during a level) and completes them
    // lazily, which changes their order: where that could happen, the level is redone there.
    const stands = ctrl[C.HALT] === 0 && ctrl[C.OVERFLOW] === 0 && ctrl[C.STOPREQ] === 0 && ctrl[C.FAULT] === 0 &&
      fresh <= room && widest < room - fresh && ctrl[C.SIZE] + fresh <= ctrl[C.ARENACAP]
    ctrl[C.SKIP] = stands ? 0 : 1
  })
  if (ctrl[C.SKIP] !== 0) return
  try { countPhase(v, st) } catch (e) { fault = e; reportFaultOn(v, index, e) }
  barrier(ctrl, P, () => {
    if (ctrl[C.FAULT] !== 0) { ctrl[C.SKIP] = 1; return }
    const blocks = i32(v.blocks)
    const nb = Math.ceil((ctrl[C.B] - ctrl[C.A]) / ctrl[C.BLOCK])
    const size = ctrl[C.SIZE]
    let base = size
    for (let k = 0; k < nb; k++) { const c = blocks[k]; blocks[k] = base; base += c }
    if (base !== size + ctrl[C.FRESH]) {
      reportFaultOn(v, index, new Error(`internal error: the parallel search numbered ${base - size} of ${ctrl[C.FRESH]} new states`))
      ctrl[C.SKIP] = 1
    }
  })
  if (ctrl[C.SKIP] !== 0 || fault) return
  assignPhase(v, st)
}

function reportFaultOn(v: WorkerViews, index: number, e: unknown): void {
  const err = v.err.subarray(0, DEATH_AT)
  const msg = new TextEncoder().encode(e instanceof Error ? e.message : String(e)).slice(0, err.length - 1)
  if (Atomics.compareExchange(v.ctrl, C.FAULT, 0, index + 1) === 0) {
    err.fill(0)
    err.set(msg)
  }
  Atomics.store(v.ctrl, C.HALT, 1)
}

function expandPhase(v: WorkerViews, index: number, job: CompiledJob, st: LevelState): void {
  const ctrl = v.ctrl
  const { inst, invariant } = job
  const W = inst.words
  const a = ctrl[C.A], b = ctrl[C.B], mask = ctrl[C.MASK], maxPend = ctrl[C.MAXPEND], B = ctrl[C.BLOCK]
  const table = i32(v.table)
  const arena = u32(v.arena)
  const stage = u32(v.stage)
  const minSrc = i32(v.minSrc), slotOf = i32(v.slotOf)
  st.reset()
  const seen = new TargetSet()
  let transitions = 0
  let published = 0
  // This worker's reserved staging slots not used yet: [spare, spareEnd).
  let spare = 0
  let spareEnd = 0
  let s = 0
  let stop = false
  let expanded = 0
  const fault = job.fault && job.fault.worker === index ? job.fault.after : -1
  const notes = job.marks ? new EdgeNotes(v, index, job.marks) : null
  const emit = (succ: Uint32Array, stepped: number, receivedFrom: number): boolean => {
    let slot = hashWords(succ, 0, W) & mask
    let id: number
    let fresh = false
    for (;;) {
      // A plain read: committed entries and their states were written before this phase; an
      // empty or pending entry is read again atomically below.
      let e = table[slot]
      if (e <= 0) e = Atomics.load(table, slot)
      if (e === 0) {
        if (spare === spareEnd) {
          spare = Atomics.add(ctrl, C.RESERVE, SPARE_BATCH)
          if (spare >= maxPend) { Atomics.store(ctrl, C.OVERFLOW, 1); Atomics.store(ctrl, C.HALT, 2); stop = true; spare = spareEnd = 0; return true }
          spareEnd = Math.min(maxPend, spare + SPARE_BATCH)
          // Unused slots stay unpublished (-1): an undone level clears published ones only.
          slotOf.fill(-1, spare, spareEnd)
        }
        const base = spare * W
        for (let k = 0; k < W; k++) stage[base + k] = succ[k]
        minSrc[spare] = s
        if (Atomics.compareExchange(table, slot, 0, -(spare + 1)) === 0) {
          slotOf[spare] = slot
          id = -(spare + 1)
          spare++
          fresh = true
          break
        }
        continue
      }
      let same = true
      if (e > 0) {
        const base = (e - 1) * W
        for (let k = 0; k < W; k++) if (arena[base + k] !== succ[k]) { same = false; break }
        if (same) { id = e - 1; break }
      } else {
        const p = -e - 1
        const base = p * W
        for (let k = 0; k < W; k++) if (stage[base + k] !== succ[k]) { same = false; break }
        if (same) {
          // The smallest source that reaches p.
          let cur = Atomics.load(minSrc, p)
          while (s < cur) {
            const prev = Atomics.compareExchange(minSrc, p, cur, s)
            if (prev === cur) break
            cur = prev
          }
          id = e
          break
        }
      }
      slot = (slot + 1) & mask
    }
    if (fresh) {
      published++
      if (invariant) {
        let ok = false
        try { ok = invariant(succ, 0) } catch (e) { if (!(e instanceof PropertyFault)) throw e }
        if (!ok) { Atomics.store(ctrl, C.HALT, 1); stop = true; return true }
      }
    }
    const first = seen.add(id)
    if (first) {
      transitions++
      if (id < 0) st.pushEmit(-id - 1)
    }
    if (notes && !notes.edge(id, succ, stepped, receivedFrom, first)) { stop = true; return true }
    return false
  }
  const bound: ExpansionBound = {
    room: ctrl[C.ROOM], stopAtError: true, interrupted: false, widest: 0,
    stop: () => Atomics.load(ctrl, C.HALT) !== 0 || Atomics.load(ctrl, C.STOPREQ) !== 0,
  }
  const src = st.src
  for (;;) {
    if (stop || Atomics.load(ctrl, C.HALT) !== 0 || Atomics.load(ctrl, C.STOPREQ) !== 0) break
    const blk = Atomics.add(ctrl, C.NEXT, 1)
    const s0 = a + blk * B
    if (s0 >= b) break
    const s1 = Math.min(b, s0 + B)
    st.blockIds.push(blk)
    if (notes) notes.block(blk)
    for (s = s0; s < s1; s++) {
      const off = s * W
      for (let k = 0; k < W; k++) src[k] = arena[off + k]
      seen.reset()
      if (notes) notes.source(src)
      if (expanded++ === fault) testFault(job)
      const err = inst.successors(src, 0, emit, bound)
      if (notes) notes.endSource(s)
      st.pushSeg()
      if (err || bound.interrupted) { Atomics.store(ctrl, C.HALT, 1); stop = true }
      if (stop) break
    }
  }
  ctrl[C.TRANS + index] = transitions
  ctrl[C.PUB + index] = published
  ctrl[C.WIDEST + index] = bound.widest ?? 0
}

/** The test hook's failure: the thread ends at once, as a killed worker's would (Node's worker_threads; elsewhere it throws). */
function testFault(job: CompiledJob): never {
  if (job.fault!.exit) (globalThis as { process?: { exit(code: number): void } }).process?.exit(70)
  throw new Error('test fault: this worker was told to fail')
}

/** Walks a worker's blocks, calling `owned(p, blk)` for each pending state first reached in that block, in order. */
function walkOwned(v: WorkerViews, st: LevelState, begin: (blk: number) => void, owned: (p: number) => void): void {
  const ctrl = v.ctrl
  const a = ctrl[C.A], b = ctrl[C.B], B = ctrl[C.BLOCK]
  const minSrc = i32(v.minSrc)
  let e = 0
  let seg = 0
  for (const blk of st.blockIds) {
    begin(blk)
    const s0 = a + blk * B, s1 = Math.min(b, s0 + B)
    for (let s = s0; s < s1; s++) {
      const end = st.segEnd[seg++]
      for (; e < end; e++) {
        const p = st.emits[e]
        if (minSrc[p] === s) owned(p)
      }
    }
  }
}

function countPhase(v: WorkerViews, st: LevelState): void {
  let cur = -1
  let count = 0
  const blocks = i32(v.blocks)
  walkOwned(v, st, (blk) => { if (cur >= 0) blocks[cur] = count; cur = blk; count = 0 }, () => { count++ })
  if (cur >= 0) blocks[cur] = count
}

function assignPhase(v: WorkerViews, st: LevelState): void {
  const table = i32(v.table)
  const arena = u32(v.arena)
  const stage = u32(v.stage)
  const W = st.W
  let next = 0
  const blocks = i32(v.blocks), slotOf = i32(v.slotOf)
  walkOwned(v, st, (blk) => { next = blocks[blk] }, (p) => {
    const to = next++ * W, from = p * W
    for (let k = 0; k < W; k++) arena[to + k] = stage[from + k]
    Atomics.store(table, slotOf[p], next)
  })
}

/**
 * A worker's recorded edges of one level: (id, marks) pairs in its region of `edges` (ids as the
 * level's search knows them: an index, or -(p + 1) for pending state p), distinct per row as the
 * sequential recorder keeps them; per source its count, per block its worker and first edge.
 */
class EdgeNotes {
  private readonly edges: Int32Array
  private readonly rows: Int32Array
  private readonly cap: number
  private readonly base: number
  private readonly a: number
  private readonly frontier: number
  private readonly row = new RowSet()
  private n = 0
  private rowStart = 0
  private marks = 0
  /** Pairs at the end of the row not added to `row` yet (their ids were new in the row). */
  private unhashed = 0
  constructor(private readonly v: WorkerViews, private readonly index: number, private readonly fm: FairMarks) {
    const ctrl = v.ctrl
    this.edges = i32(v.edges)
    this.rows = i32(v.rows)
    this.cap = ctrl[C.EDGECAP]
    this.base = index * this.cap * 2
    this.a = ctrl[C.A]
    this.frontier = ctrl[C.B] - this.a
  }
  block(blk: number): void {
    this.rows[this.frontier + 2 * blk] = this.index
    this.rows[this.frontier + 2 * blk + 1] = this.n
  }
  source(src: Uint32Array): void {
    this.row.reset()
    this.unhashed = 0
    this.rowStart = this.n
    this.marks = this.fm.sourceMarks(src, 0)
  }
  /** False when the region is full (the level is expanded again with more room). `first`: id is new in this row. */
  edge(id: number, succ: Uint32Array, stepped: number, receivedFrom: number, first: boolean): boolean {
    const m = this.fm.edgeMarks(this.marks, succ, 0, stepped, receivedFrom)
    if (first) {
      // As in FairGraphRecorder.edge: a new target's pair joins the row's set only when needed.
      this.unhashed++
    } else {
      if (this.unhashed > 0) {
        const edges = this.edges, base = this.base
        for (let k = this.n - this.unhashed; k < this.n; k++) this.row.add(edges[base + 2 * k], edges[base + 2 * k + 1])
        this.unhashed = 0
      }
      if (!this.row.add(id, m)) return true
    }
    if (this.n === this.cap) {
      Atomics.store(this.v.ctrl, C.EDGEOVER, 1)
      Atomics.store(this.v.ctrl, C.HALT, 2)
      return false
    }
    this.edges[this.base + 2 * this.n] = id
    this.edges[this.base + 2 * this.n + 1] = m
    this.n++
    return true
  }
  endSource(s: number): void {
    this.rows[s - this.a] = this.n - this.rowStart
  }
}

/**
 * After a level stands (its pending states numbered): hands every source's recorded edges to the
 * search's recorder, sources in index order and each row in the order its worker found it, with
 * pending ids resolved to their indices, exactly as the sequential search records them. Returns
 * the level's edge count.
 */
function feedEdges(v: WorkerViews, rec: EdgeRecorder, W: number, P: number): number {
  const ctrl = v.ctrl
  const a = ctrl[C.A], b = ctrl[C.B], B = ctrl[C.BLOCK], cap = ctrl[C.EDGECAP]
  const frontier = b - a
  const rows = i32(v.rows), edges = i32(v.edges), table = i32(v.table), slotOf = i32(v.slotOf), arena = u32(v.arena)
  const src = new Uint32Array(W)
  let k = 0
  let total = 0
  for (let s = a; s < b; s++) {
    const blk = ((s - a) / B) | 0
    if ((s - a) % B === 0) {
      const w = rows[frontier + 2 * blk]
      if (w < 0 || w >= P) throw new Error(`internal error: block ${blk} of the level has no worker`)
      k = (w * cap + rows[frontier + 2 * blk + 1]) * 2
    }
    for (let j = 0; j < W; j++) src[j] = arena[s * W + j]
    rec.beginSource(s, src)
    const n = rows[s - a]
    total += n
    for (let e = 0; e < n; e++, k += 2) {
      const id = edges[k]
      rec.markedEdge!(id >= 0 ? id : table[slotOf[-id - 1]] - 1, edges[k + 1])
    }
  }
  return total
}
