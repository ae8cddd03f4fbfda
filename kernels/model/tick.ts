// One tick of an instance (semantics.md, steps 1-6), over packed states.
//
// The tick is split the way the semantics allows: what one alive process can do in a tick depends
// only on its own fields, its incoming channels, and whether the timing bound applies; crashes and
// the `stable` flag only decide who takes part and which outcomes are combined. So each process's
// outcomes are computed once per state (and memoized by its local configuration), and successors
// are the cartesian product of the outcome lists, for every crash subset and `stable` choice.
//
// An outcome is two word images of the whole state: A holds the process's own fields after the
// tick and what is left in its incoming channels, aged; B holds what it sent, at age 1 (age 0 plus
// the aging of step 6), on its outgoing channels. A successor is the OR of the A images, plus the
// OR of the B images masked to the channels of receivers still alive, plus the images of crashed
// processes. The OR is exact: fields of different processes are disjoint, and a sent copy (age 1)
// merges with a remaining copy of age 1 exactly as a set of (value, age) pairs does.
import type { ModelError } from './errors'
import type { Program } from './exec'
import type { ExpansionBound } from './expansion'
import { channelIndex, fieldMask, readField, type Layout } from './layout'
import { OutcomePool } from './outcome-pool'
import { Bound, ProcessOutcomes, Slot, type OutcomeNote } from './outcomes'

export type { OutcomeNote } from './outcomes'

/** The combination behind one successor, for `describeTick`. */
export interface TickChoice {
  crashed: number
  stabilized: boolean
  stepped: number
  notes: (OutcomeNote | null)[]
}

// The slots of a pooled outcome and the bound settings are named in outcomes.ts; `boundsFor` says
// which bound settings a state allows as a bit set over b, and process p's list under b sits at
// index b * n + p of `starts` and `counts`.
const FREE_BIT = 1 << Bound.Free
const BOUNDED_BIT = 1 << Bound.Bounded

/** Beyond this many pooled words the outcome memo is dropped and rebuilt (it is only a cache). */
const MEMO_POOL_LIMIT = 1 << 23

/** The successor function of one instance; owns all scratch space, so one tick runs at a time. */
export class TickEngine {
  private readonly W: number
  /** Words per pooled outcome: A (W), B (W), then the `Slot`s. */
  private readonly stride: number
  private readonly cur: Uint32Array
  private readonly dst: Uint32Array
  private readonly key: Uint32Array
  private readonly liveIn: Uint32Array
  private readonly base: Uint32Array
  /** Per process: the mask of its alive and idle fields (cleared in a crashed process's image). */
  private readonly aliveIdleMask: Uint32Array[]
  /** The outcome lists, pooled and memoized, and who fills them. */
  private readonly outcomes: ProcessOutcomes
  private readonly starts: Int32Array
  private readonly counts: Int32Array
  private readonly combo: Int32Array
  private readonly live: Int32Array
  /** The bound of the current expansion, if any; see `successors`. */
  private bound: ExpansionBound | null = null
  /** Set when an outcome list of this expansion was cut short (not memoized, pool to be reset). */
  private cut = false
  private readonly choice = { crashed: 0, stabilized: false, bound: 0, combo: new Int32Array(0) as Int32Array }
  private emit: ((dst: Uint32Array, stepped: number, receivedFrom: number) => unknown) | null = null
  /** Made once: passing a fresh closure per state would allocate in the hot loop. */
  private readonly forward = (dst: Uint32Array, _c: unknown, stepped: number, recv: number): unknown => this.emit!(dst, stepped, recv)

  constructor(readonly layout: Layout, readonly program: Program) {
    const W = layout.words
    const n = layout.n
    this.W = W
    this.stride = 2 * W + Slot.Count
    this.cur = new Uint32Array(W)
    this.dst = new Uint32Array(W)
    this.key = new Uint32Array(W + 1)
    this.liveIn = new Uint32Array(W)
    this.base = new Uint32Array(W)
    this.aliveIdleMask = []
    for (let p = 0; p < n; p++) {
      const m = new Uint32Array(W)
      m[layout.alive[p].word] |= fieldMask(layout.alive[p])
      if (layout.idle) m[layout.idle[p].word] |= fieldMask(layout.idle[p])
      this.aliveIdleMask.push(m)
    }
    this.outcomes = new ProcessOutcomes(layout, program, this.cur, new OutcomePool(this.stride, W + 1))
    this.starts = new Int32Array(2 * n)
    this.counts = new Int32Array(2 * n)
    this.combo = new Int32Array(n)
    this.live = new Int32Array(n)
  }

  /** Which bound settings a tick from the current state can run under (see semantics.md step 2). */
  private boundsFor(cur: Uint32Array): number {
    const t = this.layout.timing
    if (t === 'synchronous') return BOUNDED_BIT
    if (t === 'asynchronous') return FREE_BIT
    return readField(cur, 0, this.layout.stable!) === 1 ? BOUNDED_BIT : FREE_BIT | BOUNDED_BIT
  }

  /**
   * Calls `emit` once per combination of (crash subset, `stable` choice, one distinct outcome per
   * taking-part process) of the state at src[off..). `emit` may return true to stop early.
   * Returns the first model error met (its branch produced no successor), or null.
   *
   * With a `bound`, a wide expansion is done lazily: each process's outcome list is first cut at
   * `room + 1` distinct outcomes, which usually gives more new states than fit; only when the
   * combinations of the cut lists do not fill the room (outcomes that lead to the same states)
   * are the lists completed. `bound.stop` is polled throughout; when it says stop, nothing more is
   * emitted and `bound.interrupted` is set.
   */
  successors(src: Uint32Array, off: number, emit: (dst: Uint32Array, stepped: number, receivedFrom: number) => unknown, bound?: ExpansionBound): ModelError | null {
    const { layout, W, cur } = this
    for (let w = 0; w < W; w++) cur[w] = src[off + w]
    if (this.outcomes.pool.length * this.stride > MEMO_POOL_LIMIT) this.outcomes.pool.reset()
    const n = layout.n
    let aliveMask = 0
    for (let p = 0; p < n; p++) if (readField(cur, 0, layout.alive[p]) === 1) aliveMask |= 1 << p
    const bounds = this.boundsFor(cur)
    this.bound = bound ?? null
    this.emit = emit
    let error: ModelError | null = null
    // Cut lists that do not fill the room (outcomes leading to known states) are cut again at
    // twice the size, so the work stays within twice what the room needs. Targets emitted before
    // come again; callers count transitions on distinct targets.
    for (let cap = bound ? Math.max(1, bound.room + 1) : Infinity; ; cap *= 2) {
      this.cut = false
      const e = this.allOutcomes(aliveMask, bounds, cap)
      if (!error) error = e
      if (bound?.interrupted) break
      const ended = this.forEachCombination(aliveMask, bounds, this.outcomes.pool.data, this.forward)
      if (ended || !this.cut || bound?.interrupted || (error && bound?.stopAtError)) break
      this.outcomes.pool.reset()
    }
    this.emit = null
    this.bound = null
    // Cut or abandoned lists sit in the pool without a memo entry: start the pool afresh.
    if (this.cut || bound?.interrupted) this.outcomes.pool.reset()
    return error
  }

  /** Fills starts/counts for every alive process and allowed bound setting; the first error. */
  private allOutcomes(aliveMask: number, bounds: number, cap: number): ModelError | null {
    const n = this.layout.n
    let error: ModelError | null = null
    for (let b = Bound.Free; b <= Bound.Bounded; b++) {
      if ((bounds & (1 << b)) === 0) continue
      for (let p = 0; p < n; p++) {
        if ((aliveMask & (1 << p)) === 0) continue
        const e = this.outcomesOf(p, b, cap)
        if (e && !error) error = e
        if (this.bound?.interrupted) return error
      }
    }
    return error
  }

  /** The combination that turns src into dst, with notes on what each process did; null if none. */
  explain(src: Uint32Array, srcOff: number, dst: Uint32Array, dstOff: number, want?: { stepped: number; receivedFrom: number }): TickChoice | null {
    const { layout, W, cur } = this
    for (let w = 0; w < W; w++) cur[w] = src[srcOff + w]
    const n = layout.n
    let aliveMask = 0
    for (let p = 0; p < n; p++) if (readField(cur, 0, layout.alive[p]) === 1) aliveMask |= 1 << p
    const bounds = this.boundsFor(cur)
    // Recorded outcomes go to a private pool, undeduplicated, with one note per outcome.
    const outcomes = this.outcomes
    const savedPool = outcomes.pool
    try {
      // Outcome lists are cut at `cap` and cut again at twice the size while the successor is not
      // among their combinations, so that a tick out of a wide choice is found without listing
      // every choice (the same doubling as `successors`).
      for (let cap = 64; ; cap *= 2) {
        const notes: OutcomeNote[] = []
        outcomes.recordNotes = notes
        outcomes.pool = new OutcomePool(this.stride, this.W + 1, 64)
        let cut = false
        for (let b = Bound.Free; b <= Bound.Bounded; b++) {
          if ((bounds & (1 << b)) === 0) continue
          for (let p = 0; p < n; p++) {
            if ((aliveMask & (1 << p)) === 0) continue
            const start = outcomes.pool.length
            outcomes.generate(p, b, cap, this.bound)
            cut = cut || outcomes.lastCut
            this.starts[b * n + p] = start
            this.counts[b * n + p] = outcomes.pool.length - start
          }
        }
        const found = this.findCombination(aliveMask, bounds, notes, dst, dstOff, want)
        if (!cut || (found && (!want || found.matched))) return found?.choice ?? null
      }
    } finally {
      outcomes.recordNotes = null
      outcomes.pool = savedPool
    }
  }

  /** The combination of the recorded outcomes that gives dst (the one matching `want` first). */
  private findCombination(aliveMask: number, bounds: number, notes: OutcomeNote[], dst: Uint32Array, dstOff: number,
    want?: { stepped: number; receivedFrom: number }): { choice: TickChoice; matched: boolean } | null {
    const { W } = this
    const n = this.layout.n
    // Several combinations may reach the same state (a step that changes nothing, or idling).
    // When the caller says which processes stepped and which channels delivered (a lasso's
    // fair edge), the combination that matches is the one told; otherwise the first.
    let found = null as { choice: TickChoice; matched: boolean } | null
    this.forEachCombination(aliveMask, bounds, this.outcomes.pool.data, (out, choice, stepped) => {
      for (let w = 0; w < W; w++) if (out[w] !== dst[dstOff + w]) return false
      const ns: (OutcomeNote | null)[] = []
      for (let p = 0; p < n; p++) ns.push(choice.combo[p] >= 0 ? notes[this.starts[choice.bound * n + p] + choice.combo[p]] : null)
      const candidate = { crashed: choice.crashed, stabilized: choice.stabilized, stepped, notes: ns }
      if (!want) { found = { choice: candidate, matched: true }; return true }
      let receivedFrom = 0
      ns.forEach((note, p) => {
        for (const r of note?.received ?? []) receivedFrom |= 1 << channelIndex(n, r.from, p)
      })
      if (stepped === want.stepped && receivedFrom === want.receivedFrom) { found = { choice: candidate, matched: true }; return true }
      if (!found) found = { choice: candidate, matched: false }
      return false
    })
    return found
  }

  /**
   * Fills starts/counts for process p under bound setting b from the memo, or generates the list
   * (cut at `cap` distinct outcomes; a cut list is not memoized); returns its error.
   */
  private outcomesOf(p: number, b: number, cap: number): ModelError | null {
    const { W, cur, key, layout } = this
    const pm = layout.procMask[p]
    const im = layout.inMask[p]
    for (let w = 0; w < W; w++) key[w] = cur[w] & (pm[w] | im[w])
    key[W] = p * 2 + b
    const slot = b * layout.n + p
    const { outcomes } = this
    const pool = outcomes.pool
    const known = pool.lookup(key)
    if (known >= 0) {
      this.starts[slot] = pool.start(known)
      this.counts[slot] = pool.count(known)
      if (this.bound && this.counts[slot] > (this.bound.widest ?? 0)) this.bound.widest = this.counts[slot]
      return pool.error(known)
    }
    const start = pool.length
    const err = outcomes.generate(p, b, cap, this.bound)
    const cut = outcomes.lastCut
    this.starts[slot] = start
    this.counts[slot] = pool.length - start
    if (this.bound && this.counts[slot] > (this.bound.widest ?? 0)) this.bound.widest = this.counts[slot]
    if (cut || this.bound?.interrupted) {
      this.cut = this.cut || cut
      return err
    }
    pool.remember(key, start, pool.length - start, err)
    return err
  }

  /**
   * Runs `visit` on every successor combination: crash subsets of the alive processes (with
   * `faults crash`), then the allowed bound settings, then one pooled outcome per process that
   * takes part. `starts`/`counts` must be filled for every alive process and allowed setting.
   * Returns true when `visit` ended the enumeration (or the expansion's stop did).
   */
  private forEachCombination(
    aliveMask: number,
    bounds: number,
    pool: Uint32Array,
    visit: (dst: Uint32Array, choice: { crashed: number; stabilized: boolean; bound: number; combo: Int32Array }, stepped: number, recv: number) => unknown,
  ): boolean {
    const expansion = this.bound
    let visits = 0
    const { layout, W, cur, dst, base, liveIn, live, combo, starts, counts, stride } = this
    const n = layout.n
    const crashes = this.program.protocol.faults === 'crash'
    const wasStable = layout.stable ? readField(cur, 0, layout.stable) : 0
    const choice = this.choice
    choice.combo = combo
    // Subsets of aliveMask, from aliveMask down to 0 (only 0 without crash faults).
    let c = crashes ? aliveMask : 0
    for (;;) {
      const liveMask = aliveMask & ~c
      let L = 0
      liveIn.fill(0)
      base.fill(0)
      for (let p = 0; p < n; p++) {
        if (liveMask & (1 << p)) {
          live[L++] = p
          const im = layout.inMask[p]
          for (let w = 0; w < W; w++) liveIn[w] |= im[w]
        } else {
          // Crashed now or before: variables kept, alive and idle 0, incoming channels empty.
          const pm = layout.procMask[p]
          const ai = this.aliveIdleMask[p]
          for (let w = 0; w < W; w++) base[w] |= cur[w] & pm[w] & ~ai[w]
        }
      }
      choice.crashed = c
      for (let b = Bound.Free; b <= Bound.Bounded; b++) {
        if ((bounds & (1 << b)) === 0) continue
        choice.stabilized = layout.stable !== null && b === Bound.Bounded && wasStable === 0
        choice.bound = b
        let empty = false
        for (let k = 0; k < L; k++) {
          combo[live[k]] = 0
          if (counts[b * n + live[k]] === 0) empty = true
        }
        for (let p = 0; p < n; p++) if (!(liveMask & (1 << p))) combo[p] = -1
        if (empty) continue
        for (;;) {
          for (let w = 0; w < W; w++) dst[w] = base[w]
          let stepped = 0
          let recv = 0
          for (let k = 0; k < L; k++) {
            const p = live[k]
            const o = (starts[b * n + p] + combo[p]) * stride
            for (let w = 0; w < W; w++) dst[w] |= pool[o + w] | (pool[o + W + w] & liveIn[w])
            if (pool[o + 2 * W + Slot.Stepped] === 1) stepped |= 1 << p
            recv |= pool[o + 2 * W + Slot.Received]
          }
          if (layout.stable && b === Bound.Bounded) dst[layout.stable.word] |= 1 << layout.stable.shift
          if (visit(dst, choice, stepped, recv >>> 0) === true) return true
          if (expansion !== null && (++visits & 4095) === 0 && expansion.stop !== undefined && expansion.stop()) {
            expansion.interrupted = true
            return true
          }
          // Odometer over the live processes' outcome lists.
          let k = L - 1
          while (k >= 0) {
            const p = live[k]
            if (++combo[p] < counts[b * n + p]) break
            combo[p] = 0
            k--
          }
          if (k < 0) break
        }
      }
      if (c === 0) break
      c = (c - 1) & aliveMask
    }
    return false
  }
}
