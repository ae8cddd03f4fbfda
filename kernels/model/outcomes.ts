// The outcomes of one alive process in one tick (semantics.md steps 3-5), as the tick engine
// (tick.ts) pools them: for every choice of the messages it receives (forced or optional), every
// run of its handlers and step (choices enumerated by the program), the images A and B of the
// outcome, deduplicated; in record mode every run is kept, with a note of what it did.
import { StateStore } from '../base/stateset'
import type { MessageEvent } from '../result'
import type { ModelError } from './errors'
import { ExecFault, type Program } from './exec'
import type { ExpansionBound } from './expansion'
import { channelIndex, readField, type Field, type Layout } from './layout'
import type { OutcomePool } from './outcome-pool'
import { showMessage } from './show'

/** What a recorded outcome did, for tick descriptions (cold path only). */
export interface OutcomeNote {
  stepped: boolean
  /** Received messages in handling order: sender (0-based) and message value. */
  received: { from: number; value: number }[]
  /** Sends: receiver (0-based) and message value, before dropping those to crashed receivers. */
  sent: { to: number; value: number }[]
}

// A pooled outcome is `stride` words: image A (W words), image B (W words), then the slots below
// (at 2W + slot). Outcome lists are computed under the two bound settings b of semantics.md step
// 2, a tick without the timing bound (Free) and one with it (Bounded).
/** The words after the two images of a pooled outcome. */
export const enum Slot {
  /** 1 when the process ran its step, 0 when it idled. */
  Stepped = 0,
  /** The channels that delivered to the process, bit `channelIndex(n, from, to)` each. */
  Received = 1,
  Count = 2,
}

/** The bound settings of a tick. */
export const enum Bound { Free = 0, Bounded = 1 }

/** Lists the outcomes of one process of the state in `cur` into a pool; owns its scratch space. */
export class ProcessOutcomes {
  private readonly W: number
  private readonly cand: Uint32Array
  private readonly loc0: Int32Array
  /** Per process: its incoming (channel, value) fields, senders ascending then values ascending. */
  readonly inFields: { chan: number; value: number; field: Field }[][]
  /** Per process and incoming field: the mask read from the current state. */
  private readonly inVal: Int32Array
  private readonly consumed: Int32Array
  // Items in flight to the process being expanded.
  private readonly itemField: Int32Array
  private readonly itemAge: Int32Array
  private readonly itemChosen: Uint8Array
  private readonly optItems: Int32Array
  private itemCount = 0
  private readonly ageFull: number
  private readonly ageTop: number
  private readonly dedupe: StateStore
  /** Where outcomes go; the engine swaps in a private pool to record a tick's notes. */
  pool: OutcomePool
  /** In record mode, one note per pooled outcome; null otherwise. */
  recordNotes: OutcomeNote[] | null = null
  /** Whether the last `generate` cut its list (a field, not a returned object: no allocation per state). */
  lastCut = false

  /** `cur` is the engine's current state, read (never written) by `generate`. */
  constructor(readonly layout: Layout, readonly program: Program, private readonly cur: Uint32Array, pool: OutcomePool) {
    const W = layout.words
    this.W = W
    this.pool = pool
    this.cand = new Uint32Array(pool.stride)
    this.loc0 = new Int32Array(program.loc.length)
    this.inFields = []
    let maxIn = 1
    for (let p = 0; p < layout.n; p++) {
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
    this.dedupe = new StateStore(pool.stride, 64)
  }

  /** Unpacks process p's local values into `loc0` once; every run starts from a copy. */
  private unpackLocals(p: number): void {
    const { layout, program, cur, loc0 } = this
    const n = layout.n
    for (let v = 0; v < layout.vars.length; v++) {
      const info = layout.vars[v]
      if (!info.perPeer) loc0[program.slotOf[v]] = readField(cur, 0, layout.scalar[p][v]!) + info.lo
      else {
        const base = program.entryBase[v]
        for (let q = 0; q < n; q++) if (q !== p) loc0[base + q] = readField(cur, 0, layout.entry[p][v][q]!) + info.lo
      }
    }
  }

  /**
   * The items in flight to p, in handling order (sender, value, then age), into the item arrays
   * (`itemCount` of them); returns how many are optional (listed in `optItems`), the rest being
   * forced.
   */
  private gatherItems(p: number, bounded: boolean): number {
    const { layout, cur } = this
    const fields = this.inFields[p]
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
    return opt
  }

  /**
   * Appends the distinct outcomes of alive process p in the current state, under the bound when
   * b = Bound.Bounded, to the pool (with notes in record mode). Returns the first model error met; `lastCut`
   * says whether the list was cut at `cap` distinct outcomes (or abandoned on the expansion's `bound` stop).
   */
  generate(p: number, b: number, cap = Infinity, bound: ExpansionBound | null = null): ModelError | null {
    const { layout, program, loc0 } = this
    const n = layout.n
    const { cur } = this
    this.unpackLocals(p)
    const fields = this.inFields[p]
    const bounded = b === Bound.Bounded
    const opt = this.gatherItems(p, bounded)
    const items = this.itemCount
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
    const poolStart = this.pool.length
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
        this.cand[2 * this.W + Slot.Received] = recv
        this.commit(record ? this.noteOfRun(p) : null)
        if ((record ? this.pool.length - poolStart : this.dedupe.size) >= cap) {
          cut = true
          break subsetLoop
        }
      } while (program.nextChoice())
    }
    if (!record) {
      // Distinct outcomes, in first-met order, move from the dedupe set to the pool.
      const count = this.dedupe.size
      const pool = this.pool
      pool.ensure(count)
      const d = this.dedupe.data
      pool.data.set(d.subarray(0, count * pool.stride), pool.length * pool.stride)
      pool.length += count
    }
    this.lastCut = cut
    return error
  }

  private beginCandidate(): void {
    this.cand.fill(0)
  }

  private commit(note: OutcomeNote | null): void {
    if (this.recordNotes) {
      this.pool.push(this.cand)
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
    cand[2 * this.W + Slot.Stepped] = stepped ? 1 : 0
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
      const c = channelIndex(layout.n, p, q)
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
}
