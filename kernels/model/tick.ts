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
import { StateStore } from '../explore/stateset'
import type { MessageEvent } from '../result'
import type { ModelError } from './errors'
import { ExecFault, type Program } from './exec'
import type { ExpansionBound } from './expansion'
import { fieldMask, readField, type Field, type Layout } from './layout'
import { showMessage } from './show'

/** What a recorded outcome did, for tick descriptions (cold path only). */
export interface OutcomeNote {
  stepped: boolean
  /** Received messages in handling order: sender (0-based) and message value. */
  received: { from: number; value: number }[]
  /** Sends: receiver (0-based) and message value, before dropping those to crashed receivers. */
  sent: { to: number; value: number }[]
}

/** The combination behind one successor, for `describeTick`. */
export interface TickChoice {
  crashed: number
  stabilized: boolean
  stepped: number
  notes: (OutcomeNote | null)[]
}

/** Beyond this many pooled words the outcome memo is dropped and rebuilt (it is only a cache). */
const MEMO_POOL_LIMIT = 1 << 23

/** The successor function of one instance; owns all scratch space, so one tick runs at a time. */
export class TickEngine {
  private readonly W: number
  /** Words per pooled outcome: A (W), B (W), stepped, received-channel mask. */
  private readonly stride: number
  private readonly cur: Uint32Array
  private readonly dst: Uint32Array
  private readonly cand: Uint32Array
  private readonly key: Uint32Array
  private readonly loc0: Int32Array
  private readonly liveIn: Uint32Array
  private readonly base: Uint32Array
  /** Per process: the mask of its alive and idle fields (cleared in a crashed process's image). */
  private readonly aliveIdleMask: Uint32Array[]
  /** Per process: its incoming (channel, value) fields, senders ascending then values ascending. */
  private readonly inFields: { chan: number; value: number; field: Field }[][]
  /** Per process and incoming field: the mask read from the current state. */
  private readonly inVal: Int32Array
  private readonly consumed: Int32Array
  // Items in flight to the process being expanded.
  private itemField: Int32Array
  private itemAge: Int32Array
  private itemChosen: Uint8Array
  private optItems: Int32Array
  private itemCount = 0
  private readonly ageFull: number
  private readonly ageTop: number
  private memo: StateStore
  private memoStart: Int32Array
  private memoCount: Int32Array
  private memoError = new Map<number, ModelError>()
  private pool: Uint32Array
  private poolLen = 0
  private readonly dedupe: StateStore
  private readonly starts: Int32Array
  private readonly counts: Int32Array
  private readonly combo: Int32Array
  private readonly live: Int32Array
  private recordNotes: OutcomeNote[] | null = null
  /** The bound of the current expansion, if any; see `successors`. */
  private bound: ExpansionBound | null = null
  /** Set when an outcome list of this expansion was cut short (not memoized, pool to be reset). */
  private cut = false
  /** Whether the last `generate` cut its list (a field, not a returned object: no allocation per state). */
  private lastCut = false
  private readonly choice = { crashed: 0, stabilized: false, bound: 0, combo: new Int32Array(0) as Int32Array }
  private emit: ((dst: Uint32Array, stepped: number, receivedFrom: number) => unknown) | null = null
  /** Made once: passing a fresh closure per state would allocate in the hot loop. */
  private readonly forward = (dst: Uint32Array, _c: unknown, stepped: number, recv: number): unknown => this.emit!(dst, stepped, recv)

  constructor(readonly layout: Layout, readonly program: Program) {
    const W = layout.words
    const n = layout.n
    this.W = W
    this.stride = 2 * W + 2
    this.cur = new Uint32Array(W)
    this.dst = new Uint32Array(W)
    this.cand = new Uint32Array(this.stride)
    this.key = new Uint32Array(W + 1)
    this.loc0 = new Int32Array(program.loc.length)
    this.liveIn = new Uint32Array(W)
    this.base = new Uint32Array(W)
    this.aliveIdleMask = []
    this.inFields = []
    let maxIn = 1
    for (let p = 0; p < n; p++) {
      const m = new Uint32Array(W)
      m[layout.alive[p].word] |= fieldMask(layout.alive[p])
      if (layout.idle) m[layout.idle[p].word] |= fieldMask(layout.idle[p])
      this.aliveIdleMask.push(m)
      const list: { chan: number; value: number; field: Field }[] = []
      for (let c = 0; c < layout.channel.length; c++) {
        if (layout.channelTo[c] !== p) continue
        for (let v = 0; v < layout.messageValues; v++) list.push({ chan: c, value: v, field: layout.channel[c][v] })
      }
      list.sort((a, b) => layout.channelFrom[a.chan] - layout.channelFrom[b.chan] || a.value - b.value)
      this.inFields.push(list)
      maxIn = Math.max(maxIn, list.length)
    }
    this.inVal = new Int32Array(maxIn)
    this.consumed = new Int32Array(maxIn)
    const maxItems = maxIn * Math.max(1, layout.delay)
    this.itemField = new Int32Array(maxItems)
    this.itemAge = new Int32Array(maxItems)
    this.itemChosen = new Uint8Array(maxItems)
    this.optItems = new Int32Array(maxItems)
    this.ageFull = layout.tracksAges ? 0xffffffff >>> (32 - layout.delay) : 1
    this.ageTop = layout.tracksAges ? 1 << (layout.delay - 1) : 0
    this.memo = new StateStore(W + 1, 256)
    this.memoStart = new Int32Array(256)
    this.memoCount = new Int32Array(256)
    this.pool = new Uint32Array(this.stride * 256)
    this.dedupe = new StateStore(this.stride, 64)
    this.starts = new Int32Array(2 * n)
    this.counts = new Int32Array(2 * n)
    this.combo = new Int32Array(n)
    this.live = new Int32Array(n)
  }

  /** Which bound settings a tick from the current state can run under (see semantics.md step 2). */
  private boundsFor(cur: Uint32Array): number {
    // Bit 0: a tick without the bound; bit 1: a tick with it.
    const t = this.layout.timing
    if (t === 'synchronous') return 2
    if (t === 'asynchronous') return 1
    return readField(cur, 0, this.layout.stable!) === 1 ? 2 : 3
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
    if (this.poolLen * this.stride > MEMO_POOL_LIMIT) this.resetMemo()
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
      const ended = this.forEachCombination(aliveMask, bounds, this.pool, this.forward)
      if (ended || !this.cut || bound?.interrupted || (error && bound?.stopAtError)) break
      this.resetMemo()
    }
    this.emit = null
    this.bound = null
    // Cut or abandoned lists sit in the pool without a memo entry: start the pool afresh.
    if (this.cut || bound?.interrupted) this.resetMemo()
    return error
  }

  /** Fills starts/counts for every alive process and allowed bound setting; the first error. */
  private allOutcomes(aliveMask: number, bounds: number, cap: number): ModelError | null {
    const n = this.layout.n
    let error: ModelError | null = null
    for (let b = 0; b < 2; b++) {
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
    const savedPool = this.pool
    const savedLen = this.poolLen
    try {
      // Outcome lists are cut at `cap` and cut again at twice the size while the successor is not
      // among their combinations, so that a tick out of a wide choice is found without listing
      // every choice (the same doubling as `successors`).
      for (let cap = 64; ; cap *= 2) {
        const notes: OutcomeNote[] = []
        this.recordNotes = notes
        this.pool = new Uint32Array(this.stride * 64)
        this.poolLen = 0
        let cut = false
        for (let b = 0; b < 2; b++) {
          if ((bounds & (1 << b)) === 0) continue
          for (let p = 0; p < n; p++) {
            if ((aliveMask & (1 << p)) === 0) continue
            const start = this.poolLen
            this.generate(p, b, cap)
            cut = cut || this.lastCut
            this.starts[b * n + p] = start
            this.counts[b * n + p] = this.poolLen - start
          }
        }
        const found = this.findCombination(aliveMask, bounds, notes, dst, dstOff, want)
        if (!cut || (found && (!want || found.matched))) return found?.choice ?? null
      }
    } finally {
      this.recordNotes = null
      this.pool = savedPool
      this.poolLen = savedLen
    }
  }

  /** The combination of the recorded outcomes that gives dst (the one matching `want` first). */
  private findCombination(aliveMask: number, bounds: number, notes: OutcomeNote[], dst: Uint32Array, dstOff: number,
    want?: { stepped: number; receivedFrom: number }): { choice: TickChoice; matched: boolean } | null {
    const { W } = this
    const n = this.layout.n
    {
      // Several combinations may reach the same state (a step that changes nothing, or idling).
      // When the caller says which processes stepped and which channels delivered (a lasso's
      // fair edge), the combination that matches is the one told; otherwise the first.
      let found = null as { choice: TickChoice; matched: boolean } | null
      this.forEachCombination(aliveMask, bounds, this.pool, (out, choice, stepped) => {
        for (let w = 0; w < W; w++) if (out[w] !== dst[dstOff + w]) return false
        const ns: (OutcomeNote | null)[] = []
        for (let p = 0; p < n; p++) ns.push(choice.combo[p] >= 0 ? notes[this.starts[choice.bound * n + p] + choice.combo[p]] : null)
        const candidate = { crashed: choice.crashed, stabilized: choice.stabilized, stepped, notes: ns }
        if (!want) { found = { choice: candidate, matched: true }; return true }
        let receivedFrom = 0
        ns.forEach((note, p) => {
          for (const r of note?.received ?? []) receivedFrom |= 1 << (r.from * (n - 1) + (p < r.from ? p : p - 1))
        })
        if (stepped === want.stepped && receivedFrom === want.receivedFrom) { found = { choice: candidate, matched: true }; return true }
        if (!found) found = { choice: candidate, matched: false }
        return false
      })
      return found
    }
  }

  private resetMemo(): void {
    this.memo.clear()
    this.memoError.clear()
    this.poolLen = 0
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
    const known = this.memo.lookup(key, 0)
    if (known >= 0) {
      this.starts[slot] = this.memoStart[known]
      this.counts[slot] = this.memoCount[known]
      if (this.bound && this.counts[slot] > (this.bound.widest ?? 0)) this.bound.widest = this.counts[slot]
      return this.memoError.get(known) ?? null
    }
    const start = this.poolLen
    const err = this.generate(p, b, cap)
    const cut = this.lastCut
    this.starts[slot] = start
    this.counts[slot] = this.poolLen - start
    if (this.bound && this.counts[slot] > (this.bound.widest ?? 0)) this.bound.widest = this.counts[slot]
    if (cut || this.bound?.interrupted) {
      this.cut = this.cut || cut
      return err
    }
    const idx = this.memo.insert(key, 0)
    if (idx >= this.memoStart.length) {
      const s = new Int32Array(this.memoStart.length * 2)
      s.set(this.memoStart)
      this.memoStart = s
      const c = new Int32Array(this.memoCount.length * 2)
      c.set(this.memoCount)
      this.memoCount = c
    }
    this.memoStart[idx] = start
    this.memoCount[idx] = this.poolLen - start
    if (err) this.memoError.set(idx, err)
    return err
  }

  /**
   * Appends the distinct outcomes of alive process p in the current state, under the bound when
   * b = 1, to the pool (with notes in record mode). Returns the first model error met; `lastCut`
   * says whether the list was cut at `cap` distinct outcomes (or abandoned on the expansion's stop).
   */
  private generate(p: number, b: number, cap = Infinity): ModelError | null {
    const { layout, program, cur, loc0 } = this
    const n = layout.n
    // Unpack the process's local values once; every run starts from a copy.
    for (let v = 0; v < layout.vars.length; v++) {
      const info = layout.vars[v]
      if (!info.perPeer) loc0[program.slotOf[v]] = readField(cur, 0, layout.scalar[p][v]!) + info.lo
      else {
        const base = program.entryBase[v]
        for (let q = 0; q < n; q++) if (q !== p) loc0[base + q] = readField(cur, 0, layout.entry[p][v][q]!) + info.lo
      }
    }
    // The items in flight to p, in handling order (sender, value, then age).
    const fields = this.inFields[p]
    const bounded = b === 1
    const delay = layout.delay
    let items = 0
    let opt = 0
    for (let k = 0; k < fields.length; k++) {
      const mask = readField(cur, 0, fields[k].field)
      this.inVal[k] = mask
      if (mask === 0) continue
      if (!layout.tracksAges) {
        this.itemField[items] = k
        this.itemAge[items] = 0
        this.optItems[opt++] = items
        items++
        continue
      }
      for (let a = 1; a <= delay; a++) {
        if ((mask & (1 << (a - 1))) === 0) continue
        this.itemField[items] = k
        this.itemAge[items] = a
        // Under the bound an overdue copy must be received by a stepping receiver.
        if (!(bounded && a === delay)) this.optItems[opt++] = items
        items++
      }
    }
    this.itemCount = items
    const record = this.recordNotes !== null
    if (!record) this.dedupe.clear()

    // Idling: allowed unless the bound forces a step now.
    const idleNow = layout.idle ? readField(cur, 0, layout.idle[p]) : 0
    if (!bounded || idleNow < layout.idleBound - 1) {
      this.beginCandidate()
      this.writeOwn(p, loc0, layout.idle ? Math.min(idleNow + 1, layout.idleBound - 1) : 0, false)
      this.consumed.fill(0, 0, fields.length)
      this.writeIncoming(p)
      this.commit(record ? { stepped: false, received: [], sent: [] } : null)
    }

    let error: ModelError | null = null
    let cut = false
    let runs = 0
    const poolStart = this.poolLen
    const bound = this.bound
    const subsets = 2 ** opt
    subsetLoop: for (let s = 0; s < subsets; s++) {
      // Everything not optional is forced; optional item x is taken when bit x of s is set.
      for (let x = 0; x < items; x++) this.itemChosen[x] = 1
      for (let x = 0; x < opt; x++) this.itemChosen[this.optItems[x]] = (s / 2 ** x) & 1 ? 1 : 0
      this.consumed.fill(0, 0, fields.length)
      let recv = 0
      for (let x = 0; x < items; x++) {
        if (!this.itemChosen[x]) continue
        const k = this.itemField[x]
        this.consumed[k] |= layout.tracksAges ? 1 << (this.itemAge[x] - 1) : 1
        recv |= 1 << fields[k].chan
      }
      program.self = p
      program.resetChoices()
      do {
        // A wide choice (`one of 0..2147483647`) or many choices in one step are runs of this loop.
        if (bound !== null && (++runs & 1023) === 0 && bound.stop !== undefined && bound.stop()) {
          bound.interrupted = true
          cut = true
          break subsetLoop
        }
        program.loc.set(loc0)
        program.resetRun()
        try {
          for (let x = 0; x < items; x++) {
            if (!this.itemChosen[x]) continue
            const f = fields[this.itemField[x]]
            program.runHandler(f.value, layout.channelFrom[f.chan])
          }
          program.runStep()
        } catch (e) {
          if (!(e instanceof ExecFault)) throw e
          if (!error) error = this.faultToError(e, p)
          // Every other run may fault too (`one of 0..2147483647` into a small type): stop here
          // when the caller stops at the first error anyway.
          if (bound !== null && bound.stopAtError === true) {
            cut = true
            break subsetLoop
          }
          continue
        }
        this.beginCandidate()
        this.writeOwn(p, program.loc, 0, true)
        this.writeIncoming(p)
        this.writeSends(p)
        this.cand[2 * this.W + 1] = recv
        this.commit(record ? this.noteOfRun(p) : null)
        if ((record ? this.poolLen - poolStart : this.dedupe.size) >= cap) {
          cut = true
          break subsetLoop
        }
      } while (program.nextChoice())
    }
    if (!record) {
      // Distinct outcomes, in first-met order, move from the dedupe set to the pool.
      const count = this.dedupe.size
      this.ensurePool(count)
      const d = this.dedupe.data
      this.pool.set(d.subarray(0, count * this.stride), this.poolLen * this.stride)
      this.poolLen += count
    }
    this.lastCut = cut
    return error
  }

  private beginCandidate(): void {
    this.cand.fill(0)
  }

  private ensurePool(extra: number): void {
    const need = (this.poolLen + extra) * this.stride
    if (need <= this.pool.length) return
    const next = new Uint32Array(Math.max(need, this.pool.length * 2))
    next.set(this.pool.subarray(0, this.poolLen * this.stride))
    this.pool = next
  }

  private commit(note: OutcomeNote | null): void {
    if (this.recordNotes) {
      this.ensurePool(1)
      this.pool.set(this.cand, this.poolLen * this.stride)
      this.poolLen++
      this.recordNotes.push(note!)
    } else this.dedupe.insert(this.cand, 0)
  }

  /** Own fields into image A: alive, idle counter, variables from `loc`; marks the step bit. */
  private writeOwn(p: number, loc: Int32Array, idle: number, stepped: boolean): void {
    const { layout, program, cand } = this
    const put = (f: Field, v: number) => {
      if (f.bits > 0) cand[f.word] |= v << f.shift
    }
    put(layout.alive[p], 1)
    if (layout.idle) put(layout.idle[p], idle)
    for (let v = 0; v < layout.vars.length; v++) {
      const info = layout.vars[v]
      if (!info.perPeer) put(layout.scalar[p][v]!, loc[program.slotOf[v]] - info.lo)
      else {
        const base = program.entryBase[v]
        for (let q = 0; q < layout.n; q++) if (q !== p) put(layout.entry[p][v][q]!, loc[base + q] - info.lo)
      }
    }
    cand[2 * this.W] = stepped ? 1 : 0
  }

  /** Remaining incoming copies (current minus consumed), aged by one tick, into image A. */
  private writeIncoming(p: number): void {
    const fields = this.inFields[p]
    const { cand, ageFull, ageTop } = this
    const ages = this.layout.tracksAges
    for (let k = 0; k < fields.length; k++) {
      const r = this.inVal[k] & ~this.consumed[k]
      if (r === 0) continue
      const aged = ages ? ((r << 1) & ageFull) | (r & ageTop) : r
      const f = fields[k].field
      cand[f.word] |= aged << f.shift
    }
  }

  /** This run's sends, each as a copy of age 1 on the outgoing channel, into image B. */
  private writeSends(p: number): void {
    const { layout, program, cand, W } = this
    const V = layout.messageValues
    for (let k = 0; k < program.sentCount; k++) {
      const x = program.sentList[k]
      const q = (x / V) | 0
      const v = x - q * V
      const c = p * (layout.n - 1) + (q < p ? q : q - 1)
      const f = layout.channel[c][v]
      cand[W + f.word] |= 1 << f.shift
    }
  }

  private receivedOfRun(p: number): { from: number; value: number }[] {
    const out: { from: number; value: number }[] = []
    const fields = this.inFields[p]
    for (let x = 0; x < this.itemCount; x++) {
      if (!this.itemChosen[x]) continue
      const f = fields[this.itemField[x]]
      out.push({ from: this.layout.channelFrom[f.chan], value: f.value })
    }
    return out
  }

  private noteOfRun(p: number): OutcomeNote {
    const V = this.layout.messageValues
    const sent: { to: number; value: number }[] = []
    for (let k = 0; k < this.program.sentCount; k++) {
      const x = this.program.sentList[k]
      sent.push({ to: Math.floor(x / V), value: x % V })
    }
    sent.sort((a, b) => a.to - b.to || a.value - b.value)
    return { stepped: true, received: this.receivedOfRun(p), sent }
  }

  private faultToError(e: ExecFault, p: number): ModelError {
    const received: MessageEvent[] = this.receivedOfRun(p).map((r) => ({ from: r.from + 1, to: p + 1, message: showMessage(this.layout, r.value) }))
    return {
      message: e.describe(p + 1),
      span: e.span,
      line: e.span.line,
      column: e.span.column,
      process: p + 1,
      variable: e.variable,
      value: e.value,
      type: e.type,
      received,
    }
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
      for (let b = 0; b < 2; b++) {
        if ((bounds & (1 << b)) === 0) continue
        choice.stabilized = layout.stable !== null && b === 1 && wasStable === 0
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
            if (pool[o + 2 * W] === 1) stepped |= 1 << p
            recv |= pool[o + 2 * W + 1]
          }
          if (layout.stable && b === 1) dst[layout.stable.word] |= 1 << layout.stable.shift
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
