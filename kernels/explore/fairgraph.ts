// The fair state graph that the temporal product reads: every edge of an explored instance with
// its fairness marks (semantics.md). It is recorded during the one exploration pass: states are
// numbered breadth-first, so the sources come in index order and each row is appended whole, in
// chunked typed arrays. Above a size budget (or when asked) nothing is stored and each row is
// recomputed from the successor function when the product asks for it: slower, but the memory is
// the store's alone.
import type { EdgeSink } from '../logic/emptiness'
import type { System } from '../logic/product'
import { channelIndex, type Instance } from '../model/instance'
import { isStable, type StateTerm } from '../model/observe'
import { fieldMask } from '../model/layout'
import { ChunkedInt32 } from '../base/chunked'
import type { EdgeRecorder, ExploreResult } from './reach'
import type { StateStore } from '../base/stateset'

/**
 * Fairness sets (semantics.md) as transition marks: bit i, process i steps or is down (crashed in
 * this tick or before); then one bit per channel j->i: i is down, or the channel is empty at the
 * source, or i receives from it in the tick; last, under eventually synchronous, the edge ends in
 * a stable state. "Down" is judged at the target for both kinds of bit, so the tick in which i
 * crashes carries i's process bit and the bits of every channel into i. (Which of the two it
 * carries cannot change a verdict: a crash edge lies on no cycle, since a crashed process never
 * comes back, and acceptance only counts edges taken infinitely often. The marks are kept equal
 * to the reference interpreter's all the same: tests/explore/fairgraph.test.ts compares them.)
 */
export interface FairMarks {
  fairnessSets: number
  /** The marks every edge out of this source carries (crashes and empty channels). */
  sourceMarks(src: Uint32Array, off: number): number
  /** The marks of one edge, given its source marks and what `successors` reported. */
  edgeMarks(base: number, dst: Uint32Array, dstOff: number, stepped: number, receivedFrom: number): number
}

/** The fairness marks of the instance's edges; see `FairMarks`. */
export function fairMarks(inst: Instance): FairMarks {
  const n = inst.n
  // Process i is down where its alive field reads 0 (observe.ts isCrashed), tested inline here:
  // the marks are computed for every edge of the search.
  const aliveWord = Int32Array.from(inst.layout.alive.slice(0, n), (f) => f.word)
  const aliveMask = Uint32Array.from(inst.layout.alive.slice(0, n), (f) => fieldMask(f))
  const channels: { i: number; bit: number; index: number }[] = []
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      // Channel index of j->i as the instance numbers it (see Instance.channelCount).
      if (i !== j) channels.push({ i, bit: n + channels.length, index: channelIndex(n, j, i) })
    }
  }
  // The mark of the channel with each index, so an edge reads only the channels that delivered.
  const markOfIndex = new Int32Array(Math.max(1, channels.length))
  for (const c of channels) markOfIndex[c.index] = 1 << c.bit
  // Per process i: its own mark and the marks of every channel into it. A process that is down at
  // the end of a tick (crashed in it or before) meets all of them on that tick's edges.
  const downMarks = new Int32Array(Math.max(1, n))
  for (let i = 0; i < n; i++) downMarks[i] = 1 << i
  for (const c of channels) downMarks[c.i] |= 1 << c.bit
  // Channel k is empty where none of its words w[chanWord[x]] & chanMask[x], x in
  // chanFrom[k] .. chanFrom[k + 1], is set (observe.ts channelEmpty, flattened for the same reason).
  const chanFrom = new Int32Array(channels.length + 1)
  const chanWord: number[] = [], chanMask: number[] = []
  channels.forEach((c, k) => {
    chanFrom[k] = chanWord.length
    const byWord = new Map<number, number>()
    for (const f of inst.layout.channel[c.index]) byWord.set(f.word, ((byWord.get(f.word) ?? 0) | fieldMask(f)) >>> 0)
    for (const [w, mask] of byWord) { chanWord.push(w); chanMask.push(mask) }
  })
  chanFrom[channels.length] = chanWord.length
  const cw = Int32Array.from(chanWord), cm = Uint32Array.from(chanMask)
  const chanDest = Int32Array.from(channels, (c) => c.i)
  const chanBit = Int32Array.from(channels, (c) => 1 << c.bit)
  const stab = inst.protocol.timing.kind === 'eventually synchronous' ? isStable(inst) : null
  const fairnessSets = n + channels.length + (stab ? 1 : 0)
  // Channel c's mark is bit n + c (channels are listed in index order), so the marks of the
  // channels an edge delivered from are `receivedFrom << n`, while they fit in 31 bits.
  for (const c of channels) if (c.bit !== n + c.index) throw new Error('internal error: channel marks out of index order')
  const shifted = n + channels.length <= 31
  return {
    fairnessSets,
    sourceMarks(src, off) {
      let base = 0
      for (let i = 0; i < n; i++) if ((src[off + aliveWord[i]] & aliveMask[i]) === 0) base |= 1 << i
      for (let k = 0; k < chanDest.length; k++) {
        if ((base >> chanDest[k]) & 1) { base |= chanBit[k]; continue }
        let empty = true
        for (let x = chanFrom[k]; x < chanFrom[k + 1]; x++) if ((src[off + cw[x]] & cm[x]) !== 0) { empty = false; break }
        if (empty) base |= chanBit[k]
      }
      return base
    },
    edgeMarks(base, dst, dstOff, stepped, receivedFrom) {
      let m = base | stepped
      if (shifted) m |= receivedFrom << n
      else for (let rest = receivedFrom; rest !== 0; rest &= rest - 1) m |= markOfIndex[31 - Math.clz32(rest & -rest)]
      for (let i = 0; i < n; i++) if ((m & downMarks[i]) !== downMarks[i] && (dst[dstOff + aliveWord[i]] & aliveMask[i]) === 0) m |= downMarks[i]
      if (stab && stab(dst, dstOff)) m |= 1 << (fairnessSets - 1)
      return m
    },
  }
}

/**
 * The distinct (target, marks) pairs of one row, first occurrence first: an edge that reaches the
 * same target with other marks (other processes stepping) is a separate edge. Open addressing
 * with slots invalidated by a stamp, so a new row costs nothing.
 *
 * A caller that already knows a pair's target to be new in the row (the explorer keeps the set of
 * a source's targets anyway) need not add it: it only has to add the row's pairs it skipped before
 * it asks about a pair whose target repeats (`FairGraphRecorder.edge`). Most rows have none (every
 * edge of a synchronous tick reaches another state), so most rows are never hashed at all.
 */
export class RowSet {
  private targets = new Int32Array(64)
  private marks = new Int32Array(64)
  private stamps = new Int32Array(64)
  private stamp = 1
  private size = 0

  reset(): void {
    this.stamp++
    this.size = 0
  }

  /** True when (t, m) is new in this row. */
  add(t: number, m: number): boolean {
    let mask = this.targets.length - 1
    let slot = (Math.imul(t, 0x9e3779b1) ^ Math.imul(m, 0x85ebca6b)) >>> 7 & mask
    while (this.stamps[slot] === this.stamp) {
      if (this.targets[slot] === t && this.marks[slot] === m) return false
      slot = (slot + 1) & mask
    }
    if ((this.size + 1) * 2 > this.targets.length) {
      this.grow()
      mask = this.targets.length - 1
      slot = (Math.imul(t, 0x9e3779b1) ^ Math.imul(m, 0x85ebca6b)) >>> 7 & mask
      while (this.stamps[slot] === this.stamp) slot = (slot + 1) & mask
    }
    this.targets[slot] = t
    this.marks[slot] = m
    this.stamps[slot] = this.stamp
    this.size++
    return true
  }

  private grow(): void {
    const { targets, marks, stamps, stamp } = this
    this.targets = new Int32Array(targets.length * 2)
    this.marks = new Int32Array(targets.length * 2)
    this.stamps = new Int32Array(targets.length * 2)
    this.stamp = 1
    const mask = this.targets.length - 1
    for (let k = 0; k < targets.length; k++) {
      if (stamps[k] !== stamp) continue
      let slot = (Math.imul(targets[k], 0x9e3779b1) ^ Math.imul(marks[k], 0x85ebca6b)) >>> 7 & mask
      while (this.stamps[slot] === 1) slot = (slot + 1) & mask
      this.targets[slot] = targets[k]
      this.marks[slot] = marks[k]
      this.stamps[slot] = 1
    }
  }
}

/**
 * The recorded graph: the successors of s are cells start[s] .. start[s+1]) of `target`, each with
 * its marks, in the order the successor function first produced them.
 */
export interface FairGraph {
  start: ChunkedInt32
  target: ChunkedInt32
  marks: ChunkedInt32
  fairnessSets: number
  /** Bytes held by the three arrays. */
  bytes: number
}

/** Edges recorded before the recorder gives up and the product recomputes rows instead (8 bytes each). */
export const RECORD_EDGE_BUDGET = 48_000_000

/**
 * Records the fair graph while `explore` runs (pass it as `ExploreOptions.edges`). `graph()` is
 * the graph once the exploration is complete, or null when the budget was exceeded.
 */
export class FairGraphRecorder implements EdgeRecorder {
  private readonly fm: FairMarks
  private start: ChunkedInt32 | null = new ChunkedInt32()
  private target = new ChunkedInt32()
  private marks = new ChunkedInt32()
  private readonly row = new RowSet()
  private base = 0
  private baseKnown = false
  /** Pairs at the end of the row not added to `row` yet (their targets were new in the row). */
  private unhashed = 0
  private src: Uint32Array = new Uint32Array(0)

  /** `budget`: edges kept at most; 0 records nothing (rows are then recomputed on demand). */
  constructor(inst: Instance, private readonly budget = RECORD_EDGE_BUDGET) {
    this.fm = fairMarks(inst)
    if (budget <= 0) this.abandon()
  }

  /** Bytes held by the edges recorded so far. */
  get bytes(): number {
    return this.start ? this.start.bytes + this.target.bytes + this.marks.bytes : 0
  }

  /** Whether the budget was exceeded (nothing is kept then). */
  get abandoned(): boolean {
    return this.start === null
  }

  beginSource(index: number, src: Uint32Array): void {
    if (!this.start) return
    // Rows arrive in index order (breadth-first numbering); an out-of-order source is a bug.
    if (index !== this.start.length) throw new Error(`internal error: fair graph row ${index} out of order`)
    if (this.target.length > this.budget) { this.abandon(); return }
    this.start.push(this.target.length)
    // The source's marks are computed at its first `edge` (rows fed by `markedEdge` need none);
    // the caller keeps `src` unchanged while the row lasts.
    this.src = src
    this.baseKnown = false
    this.row.reset()
    this.unhashed = 0
  }

  /**
   * One edge of the current source whose marks were computed elsewhere (the parallel explorer's
   * workers), already distinct in its row: as `edge` with the same marks would record it.
   */
  markedEdge(target: number, marks: number): void {
    if (!this.start) return
    this.target.push(target)
    this.marks.push(marks)
  }

  edge(target: number, dst: Uint32Array, stepped: number, receivedFrom: number, _perm: number, fresh?: boolean): void {
    if (!this.start) return
    if (!this.baseKnown) { this.base = this.fm.sourceMarks(this.src, 0); this.baseKnown = true }
    const m = this.fm.edgeMarks(this.base, dst, 0, stepped, receivedFrom)
    if (fresh) {
      // A target new in the row: the pair is new; it joins the row's set only when a repeated
      // target needs the set (see RowSet).
      this.unhashed++
    } else {
      if (this.unhashed > 0) {
        const end = this.target.length
        for (let k = end - this.unhashed; k < end; k++) this.row.add(this.target.get(k), this.marks.get(k))
        this.unhashed = 0
      }
      if (!this.row.add(target, m)) return
    }
    this.target.push(target)
    this.marks.push(m)
  }

  /** The graph of a complete exploration with `states` states, or null when abandoned. */
  graph(states: number): FairGraph | null {
    const start = this.start
    if (!start) return null
    if (start.length !== states) throw new Error(`internal error: fair graph has ${start.length} rows for ${states} states`)
    start.push(this.target.length)
    return { start, target: this.target, marks: this.marks, fairnessSets: this.fm.fairnessSets, bytes: start.bytes + this.target.bytes + this.marks.bytes }
  }

  private abandon(): void {
    this.start = null
    this.target = new ChunkedInt32()
    this.marks = new ChunkedInt32()
  }
}

/** Store indices of the initial states, each once, in the order the instance lists them. */
function initialIds(inst: Instance, store: StateStore): number[] {
  const W = inst.words
  const initial: number[] = []
  const init = inst.initialStates()
  for (let off = 0; off < init.length; off += W) {
    const k = store.lookup(init, off)
    if (k >= 0 && !initial.includes(k)) initial.push(k)
  }
  return initial
}

/**
 * The system the temporal product reads, for one assignment's compiled atoms: rows of the recorded
 * graph `g` (read in place, `System.rows`), or, when `g` is null, rows recomputed on demand from
 * the successor function (the same edges in the same order).
 *
 * An atom that faults (a division by zero) on any reachable state throws here, before the search,
 * as the runner expects, unless `mayFault` is false (see `termMayFault`): every state's atoms are
 * then computed only when the product first reads them, so a product that meets a few states
 * pays for those alone.
 */
export function systemOf(inst: Instance, r: ExploreResult, g: FairGraph | null, atoms: StateTerm[], mayFault = true): System {
  return new FairSystem(inst, r.store, g, atoms, mayFault)
}

/**
 * `systemOf`'s system. A class, so that the product's hot loop calls the same `atoms` on every
 * system it reads (a closure per system would be a new call target each time).
 *
 * The atoms: with at most 31 of them a state's row is one entry of a small table (bytes for up to
 * 7 atoms, so that the table of a few hundred thousand states stays in a core's cache while the
 * product reads it at random) with a high "known" bit, filled in when first read (or all before
 * the search when an atom may fault). More atoms: rows of ceil(atoms / 32) words, all filled now.
 */
class FairSystem implements System {
  readonly fairnessSets: number
  readonly states: number
  readonly atomWords: number
  readonly rows: FairGraph | undefined
  private readonly initialIds: number[]
  private readonly table: Uint8Array | Int32Array
  private readonly known: number
  private readonly data: Uint32Array
  private readonly W: number
  private readonly fm: FairMarks
  private readonly row = new RowSet()
  private readonly src: Uint32Array

  constructor(private readonly inst: Instance, private readonly store: StateStore, g: FairGraph | null, private readonly terms: StateTerm[], mayFault: boolean) {
    const W = this.W = inst.words
    const states = this.states = store.size
    this.fm = fairMarks(inst)
    this.fairnessSets = g ? g.fairnessSets : this.fm.fairnessSets
    this.rows = g ?? undefined
    this.initialIds = initialIds(inst, store)
    this.src = new Uint32Array(W)
    this.data = store.data
    const K = terms.length
    this.atomWords = Math.max(1, Math.ceil(K / 32))
    if (K <= 31) {
      this.table = K <= 7 ? new Uint8Array(states) : new Int32Array(states)
      this.known = K <= 7 ? 0x80 : 0x80000000 | 0
      if (mayFault) for (let s = 0; s < states; s++) this.fill(s)
    } else {
      // A row of atomWords words per state: atom k is bit k % 32 of word k / 32.
      const AW = this.atomWords
      const t = this.table = new Int32Array(states * AW)
      this.known = 0
      for (let s = 0; s < states; s++) {
        for (let k = 0; k < K; k++) if (terms[k](this.data, s * W)) t[s * AW + (k >>> 5)] |= 1 << (k & 31)
      }
    }
  }

  initial(): number[] {
    return this.initialIds
  }

  atoms(s: number, w = 0): number {
    if (this.known !== 0) {
      const m = this.table[s]
      return (m !== 0 ? m : this.fill(s)) & ~this.known
    }
    return w < this.atomWords ? this.table[s * this.atomWords + w] : 0
  }

  /** Computes the atoms of s into its one-word row, with the known bit. */
  private fill(s: number): number {
    const { terms, data } = this
    let m = this.known
    for (let k = 0; k < terms.length; k++) if (terms[k](data, s * this.W)) m |= 1 << k
    this.table[s] = m
    return m
  }

  successors(s: number, to: EdgeSink, fair: EdgeSink): void {
    const g = this.rows
    if (g) {
      const { start, target, marks } = g
      for (let k = start.get(s), e = start.get(s + 1); k < e; k++) {
        to.push(target.get(k))
        fair.push(marks.get(k))
      }
      return
    }
    const { store, fm, row, src } = this
    store.get(s, src, 0)
    const sm = fm.sourceMarks(src, 0)
    row.reset()
    this.inst.successors(src, 0, (dst, stepped, receivedFrom) => {
      const t = store.lookup(dst, 0)
      if (t < 0) return false
      const m = fm.edgeMarks(sm, dst, 0, stepped, receivedFrom)
      if (row.add(t, m)) { to.push(t); fair.push(m) }
      return false
    })
  }
}

/**
 * The ticks of a lasso (states `path`, the last equal to path[loopStart]). Each edge of the loop is
 * told as the tick that carries the marks the fair cycle used, so that the loop shown is fair:
 * processes that must step infinitely often are seen stepping.
 */
export function lassoTicks(inst: Instance, store: StateStore, path: number[], loopStart: number, cycleMarks: number[]) {
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
