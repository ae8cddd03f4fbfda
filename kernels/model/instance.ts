// An instance G_N of a protocol, compiled: its layout, its initial states, its successor function
// and the descriptions of ticks that counterexamples need. Everything hot lives in TickEngine.
import type { ProtocolModel } from '../language/model'
import type { Change, InitialProcess, MessageEvent, ShownValue, TickRecord } from '../result'
import { evalConst } from './constants'
import { ModelSetupError, type ModelError } from './errors'
import { Program } from './exec'
import type { ExpansionBound } from './expansion'
import { channelIndex, makeLayout, readField, writeField, type Field, type Layout } from './layout'
import { showMessage, showValue } from './show'
import { TickEngine } from './tick'

/** The most initial states an exploration starts from (they are listed before the search). */
export const MAX_INITIAL_STATES = 1 << 22

/** A compiled instance. Not thread-safe: one call at a time (it owns its scratch space). */
export interface Instance {
  readonly protocol: ProtocolModel
  readonly n: number
  readonly constants: number[]
  readonly layout: Layout
  /** 32-bit words per state. */
  readonly words: number
  /** n(n-1); channel j->i has index `channelIndex(n, j, i)` = j*(n-1) + (i < j ? i : i-1). */
  readonly channelCount: number
  /** Every initial state, concatenated, `words` each. */
  initialStates(): Uint32Array
  /**
   * Calls emit once per distinct successor combination of the state at src[off..off+words): a
   * crash subset, a `stable` choice, and one distinct outcome per process that takes part. The
   * same target may come from several combinations; count transitions on targets. `dst` is
   * scratch (copy it to keep it). `stepped` is a bitmask of the processes (bit p, 0-based) that
   * stepped; `receivedFrom` a bitmask over channels (bit `channelIndex(n, j, i)`) that delivered
   * at least one message in this tick (meaningful up to 6 processes, where n(n-1) channels fit in
   * 32 bits; temporal checks, the only readers, stop at 5). If emit returns true, enumeration
   * stops. Returns the first model error met (that branch has no successor), or null. A `bound`
   * carries the room left under the state limit and a stop request into the expansion
   * (expansion.ts).
   */
  successors(src: Uint32Array, off: number, emit: (dst: Uint32Array, stepped: number, receivedFrom: number) => unknown, bound?: ExpansionBound): ModelError | null
  /**
   * The tick from one state to a given successor, described as records.md says (`tick` is its
   * number). Where several ticks lead there, `want` picks the one in which exactly these processes
   * stepped and these channels delivered (as `successors` reports them), when there is one.
   */
  describeTick(src: Uint32Array, srcOff: number, dst: Uint32Array, dstOff: number, tick?: number, want?: { stepped: number; receivedFrom: number }): TickRecord
  /** Process variable values as people see them (booleans, numbers, enum labels), `x` and `x[j]`. */
  describeInitial(src: Uint32Array, off: number): InitialProcess[]
}

/** Compiles G_n of `protocol` with `constants` (one per `protocol.consts`). Throws ModelSetupError. */
export function compileInstance(protocol: ProtocolModel, n: number, constants: number[]): Instance {
  const layout = makeLayout(protocol, n, constants)
  const program = new Program(protocol, layout, constants)
  const engine = new TickEngine(layout, program)
  const words = layout.words

  // Initial values per var: one value, or every value of the type for `any`.
  const initValues: number[][] = protocol.vars.map((d, v) => {
    const info = layout.vars[v]
    if (d.init === 'any') {
      const all: number[] = []
      for (let x = info.lo; x <= info.hi; x++) all.push(x)
      return all
    }
    const x = evalConst(d.init, constants)
    if (x < info.lo || x > info.hi) {
      throw new ModelSetupError(`the initial value ${x} of '${d.name}' (line ${d.span.line}, column ${d.span.column}) is outside its type ${info.typeText}`, d.span)
    }
    return [x]
  })

  const varFields = (p: number): { field: Field; v: number; name: string }[] => {
    const out: { field: Field; v: number; name: string }[] = []
    protocol.vars.forEach((d, v) => {
      if (!d.perPeer) out.push({ field: layout.scalar[p][v]!, v, name: d.name })
      else for (let q = 0; q < n; q++) if (q !== p) out.push({ field: layout.entry[p][v][q]!, v, name: `${d.name}[${q + 1}]` })
    })
    return out
  }
  const shownVar = (w: Uint32Array, off: number, f: Field, v: number): ShownValue =>
    showValue(protocol.vars[v].type, readField(w, off, f) + layout.vars[v].lo)

  return {
    protocol, n, constants: constants.slice(), layout, words,
    channelCount: n * (n - 1),

    initialStates(): Uint32Array {
      const slots: { field: Field; values: number[]; lo: number }[] = []
      for (let p = 0; p < n; p++) for (const s of varFields(p)) slots.push({ field: s.field, values: initValues[s.v], lo: layout.vars[s.v].lo })
      let total = 1
      for (const s of slots) total *= s.values.length
      if (total > MAX_INITIAL_STATES) {
        // Each `any` multiplies the initial states per process and per peer entry.
        const first = protocol.vars.find((d) => d.init === 'any')!
        throw new ModelSetupError(`the \`any\` initial values give ${Number.isSafeInteger(total) ? total : `about ${total.toPrecision(3)}`} initial states for ${n} processes, more than the ${MAX_INITIAL_STATES} an exploration may start from (\`${first.name}\`, line ${first.span.line}, column ${first.span.column}); give fixed initial values or narrower types`, first.span)
      }
      const out = new Uint32Array(total * words)
      const one = new Uint32Array(words)
      for (let p = 0; p < n; p++) writeField(one, 0, layout.alive[p], 1)
      const pick = new Int32Array(slots.length)
      for (let k = 0; k < total; k++) {
        const st = out.subarray(k * words, (k + 1) * words)
        st.set(one)
        for (let s = 0; s < slots.length; s++) writeField(st, 0, slots[s].field, slots[s].values[pick[s]] - slots[s].lo)
        // Odometer, last slot fastest.
        for (let s = slots.length - 1; s >= 0; s--) {
          if (++pick[s] < slots[s].values.length) break
          pick[s] = 0
        }
      }
      return out
    },

    successors(src, off, emit, bound) {
      return engine.successors(src, off, emit, bound)
    },

    describeTick(src, srcOff, dst, dstOff, tick = 0, want): TickRecord {
      const choice = engine.explain(src, srcOff, dst, dstOff, want)
      if (!choice) throw new Error('describeTick: the second state is not a successor of the first')
      const crashed: number[] = []
      const stepped: number[] = []
      const received: MessageEvent[] = []
      const sent: MessageEvent[] = []
      for (let p = 0; p < n; p++) {
        if (choice.crashed & (1 << p)) crashed.push(p + 1)
        const note = choice.notes[p]
        if (!note || !note.stepped) continue
        stepped.push(p + 1)
        for (const r of note.received) received.push({ from: r.from + 1, to: p + 1, message: showMessage(layout, r.value) })
        for (const s of note.sent) {
          // Sends to a receiver that is not alive after this tick's crashes are dropped.
          if (readField(dst, dstOff, layout.alive[s.to]) === 1) sent.push({ from: p + 1, to: s.to + 1, message: showMessage(layout, s.value) })
        }
      }
      const changes: Change[] = []
      for (let p = 0; p < n; p++) {
        for (const s of varFields(p)) {
          const a = readField(src, srcOff, s.field)
          const b = readField(dst, dstOff, s.field)
          if (a !== b) changes.push({ process: p + 1, variable: s.name, from: shownVar(src, srcOff, s.field, s.v), to: shownVar(dst, dstOff, s.field, s.v) })
        }
      }
      const rec: TickRecord = { tick, crashed, stepped, received, sent, changes }
      if (layout.timing === 'eventually synchronous') rec.stabilized = choice.stabilized
      return rec
    },

    describeInitial(src, off): InitialProcess[] {
      const out: InitialProcess[] = []
      for (let p = 0; p < n; p++) {
        const values: Record<string, ShownValue> = {}
        for (const s of varFields(p)) values[s.name] = shownVar(src, off, s.field, s.v)
        out.push({ process: p + 1, values })
      }
      return out
    },
  }
}

export { channelIndex }
