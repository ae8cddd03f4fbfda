// The layout of one global state of an instance G_N as a few 32-bit words. Every field has a name,
// a word and a bit position; fields never straddle a word, so reading one is a shift and a mask.
//
// What a state holds (semantics.md): per process its alive bit, its idle counter (0..idle-1, only
// under a timing bound), its scalars and its per-peer entries; per channel j->i and per message
// value one field of `delay` bits, bit a-1 set when a copy of age a is in flight (one bit, present,
// under asynchronous: copies are a set, so a mask is exact); and the `stable` flag under
// eventually synchronous. Values are stored minus their type's lower bound.
import type { ProtocolModel, Type } from '../language/model'
import { evalConst, typeBounds, typeText } from './constants'
import { ModelSetupError } from './errors'
import { protocolProblems } from '../language/bounds'
import { MAX_PROCESSES } from '../language/limits'

/** One packed field: `bits` bits at `shift` in word `word` of a state. A 0-bit field always reads 0. */
export interface Field {
  readonly name: string
  readonly word: number
  readonly shift: number
  readonly bits: number
}

/** A protocol variable with its bounds under this instance's constants. */
export interface VarInfo {
  readonly name: string
  readonly perPeer: boolean
  readonly type: Type
  readonly lo: number
  readonly hi: number
  /** The type as people read it, bounds evaluated. */
  readonly typeText: string
}

/**
 * A message kind and its values. Values of all kinds are numbered 0..messageValues-1: kinds in
 * declaration order, then field values in lexicographic order of the declared fields (DEVELOPERS.md).
 */
export interface MessageInfo {
  readonly name: string
  /** Number of the kind's first value. */
  readonly base: number
  /** How many values the kind has (1 for a kind without fields). */
  readonly count: number
  readonly fieldNames: string[]
  readonly fieldTypes: Type[]
  readonly fieldLo: number[]
  readonly fieldHi: number[]
}

/** Which timing model an instance runs, with its bounds evaluated (0 under asynchronous). */
export type TimingKind = 'synchronous' | 'eventually synchronous' | 'asynchronous'

/** The packed shape of every state of one instance. Plain data. */
export interface Layout {
  readonly n: number
  readonly words: number
  readonly timing: TimingKind
  readonly delay: number
  readonly idleBound: number
  /** Whether ages and idle counters are part of the state (every timing but asynchronous). */
  readonly tracksAges: boolean
  readonly vars: VarInfo[]
  readonly messages: MessageInfo[]
  readonly messageValues: number
  /** Kind of each message value. */
  readonly valueKind: Int32Array
  /** Field values of each message value, `maxFields` slots per value. */
  readonly valueFields: Int32Array
  readonly maxFields: number
  readonly fields: Field[]
  /** Per process. */
  readonly alive: Field[]
  /** Per process; null under asynchronous. */
  readonly idle: Field[] | null
  /** [process][var]: the field of a scalar var, null for per-peer vars. */
  readonly scalar: (Field | null)[][]
  /** [process][var][peer]: the field of an entry, null for scalar vars and for the process itself. */
  readonly entry: (Field | null)[][][]
  /** [channel][message value]: the age mask of that value in that channel. */
  readonly channel: Field[][]
  /** Sender and receiver (0-based) of each channel; see `channelIndex`. */
  readonly channelFrom: number[]
  readonly channelTo: number[]
  readonly stable: Field | null
  /** Per process: the word masks of its own fields (alive, idle, vars) and of its incoming channels. */
  readonly procMask: Uint32Array[]
  readonly inMask: Uint32Array[]
}

/**
 * The index of channel j->i (0-based processes, j != i): j*(n-1) + (i < j ? i : i-1). Channels of
 * one sender are contiguous; n(n-1) channels fit in a 32-bit mask for n <= 6 (what temporal checks
 * use: MAX_TEMPORAL_PROCESSES).
 */
export function channelIndex(n: number, j: number, i: number): number {
  return j * (n - 1) + (i < j ? i : i - 1)
}

/**
 * Bits needed for `size` distinct values (0 for a single value). Counted without 32-bit
 * arithmetic, so a size of 2^32 or more gives 33 or more bits, never a wrapped small number.
 */
export function bitsFor(size: number): number {
  let bits = 0
  while (2 ** bits < size) bits++
  return bits
}

/** Reads a field of the state at `off`. */
export function readField(w: Uint32Array, off: number, f: Field): number {
  if (f.bits === 0) return 0
  return (w[off + f.word] >>> f.shift) & (0xffffffff >>> (32 - f.bits))
}

/** Writes a field of the state at `off` (the value must fit). */
export function writeField(w: Uint32Array, off: number, f: Field, v: number): void {
  if (f.bits === 0) return
  const m = (0xffffffff >>> (32 - f.bits)) << f.shift
  w[off + f.word] = (w[off + f.word] & ~m) | ((v << f.shift) & m)
}

/** The word mask of a field, shifted into place. */
export function fieldMask(f: Field): number {
  return f.bits === 0 ? 0 : ((0xffffffff >>> (32 - f.bits)) << f.shift) >>> 0
}

export { MAX_PROCESSES }

/**
 * The message values of a protocol, numbered: kinds in declaration order, then field values in
 * lexicographic order of the declared fields (DEVELOPERS.md, "Stage contracts").
 */
function messageNumbering(protocol: ProtocolModel, constants: number[]) {
  const messages: MessageInfo[] = []
  let messageValues = 0
  let maxFields = 0
  for (const m of protocol.messages) {
    const fieldLo: number[] = []
    const fieldHi: number[] = []
    let count = 1
    for (const f of m.fields) {
      const [lo, hi] = typeBounds(f.type, constants, f.span)
      fieldLo.push(lo)
      fieldHi.push(hi)
      count *= hi - lo + 1
    }
    if (count > 1 << 16) throw new ModelSetupError(`message '${m.name}' has ${count} values, too many to track per channel (line ${m.span.line})`, m.span)
    messages.push({ name: m.name, base: messageValues, count, fieldNames: m.fields.map((f) => f.name), fieldTypes: m.fields.map((f) => f.type), fieldLo, fieldHi })
    messageValues += count
    maxFields = Math.max(maxFields, m.fields.length)
  }
  const valueKind = new Int32Array(messageValues)
  const valueFields = new Int32Array(messageValues * Math.max(1, maxFields))
  for (let k = 0; k < messages.length; k++) {
    const m = messages[k]
    for (let x = 0; x < m.count; x++) {
      const v = m.base + x
      valueKind[v] = k
      // Mixed radix, first field most significant: numbering follows lexicographic order.
      let rest = x
      for (let f = m.fieldLo.length - 1; f >= 0; f--) {
        const size = m.fieldHi[f] - m.fieldLo[f] + 1
        valueFields[v * Math.max(1, maxFields) + f] = m.fieldLo[f] + (rest % size)
        rest = Math.floor(rest / size)
      }
    }
  }
  return { messages, messageValues, maxFields, valueKind, valueFields }
}

/** Per process: the mask of its own fields (procMask) and of its incoming channels (inMask). */
function processMasks(n: number, words: number, alive: Field[], idle: Field[] | null, scalar: (Field | null)[][], entry: (Field | null)[][][],
  channel: Field[][], channelTo: number[]): { procMask: Uint32Array[]; inMask: Uint32Array[] } {
  const procMask: Uint32Array[] = []
  const inMask: Uint32Array[] = []
  for (let p = 0; p < n; p++) {
    const pm = new Uint32Array(words)
    const add = (f: Field | null) => {
      if (f) pm[f.word] |= fieldMask(f)
    }
    add(alive[p])
    if (idle) add(idle[p])
    for (const f of scalar[p]) add(f)
    for (const row of entry[p]) for (const f of row) add(f)
    procMask.push(pm)
    const im = new Uint32Array(words)
    for (let c = 0; c < channel.length; c++) {
      if (channelTo[c] !== p) continue
      for (const f of channel[c]) im[f.word] |= fieldMask(f)
    }
    inMask.push(im)
  }
  return { procMask, inMask }
}

/**
 * Lays out the states of G_n of `protocol` under `constants` (one value per `protocol.consts`, in
 * order). Throws `ModelSetupError` for a non-positive delay or idle bound or an empty range.
 */
export function makeLayout(protocol: ProtocolModel, n: number, constants: number[]): Layout {
  if (!Number.isInteger(n) || n < 1 || n > MAX_PROCESSES) {
    throw new ModelSetupError(`an instance needs 1 to ${MAX_PROCESSES} processes, not ${n}`, protocol.span)
  }
  if (constants.length !== protocol.consts.length) {
    throw new ModelSetupError(`expected ${protocol.consts.length} constant values, got ${constants.length}`, protocol.span)
  }
  // The checker refused these already for the declared constants; a check's sweep may set others.
  const problem = protocolProblems(protocol, constants)[0]
  if (problem) throw new ModelSetupError(`${problem.message} (line ${problem.span.line}, column ${problem.span.column})`, problem.span)
  const t = protocol.timing
  let delay = 0
  let idleBound = 0
  if (t.kind !== 'asynchronous') {
    delay = evalConst(t.delay, constants)
    idleBound = evalConst(t.idle, constants)
    if (delay < 1) throw new ModelSetupError(`the delay bound must be positive, but it is ${delay} (line ${t.span.line}, column ${t.span.column})`, t.span)
    if (idleBound < 1) throw new ModelSetupError(`the idle bound must be positive, but it is ${idleBound} (line ${t.span.line}, column ${t.span.column})`, t.span)
    if (delay > 31) throw new ModelSetupError(`a delay bound above 31 ticks is not supported (it is ${delay}, line ${t.span.line})`, t.span)
  }
  const tracksAges = t.kind !== 'asynchronous'

  const vars: VarInfo[] = protocol.vars.map((d) => {
    const [lo, hi] = typeBounds(d.type, constants, d.span)
    if (bitsFor(hi - lo + 1) > 31) throw new ModelSetupError(`the type of '${d.name}' has too many values to pack (line ${d.span.line})`, d.span)
    return { name: d.name, perPeer: d.perPeer, type: d.type, lo, hi, typeText: typeText(d.type, [lo, hi]) }
  })

  const { messages, messageValues, maxFields, valueKind, valueFields } = messageNumbering(protocol, constants)

  const fields: Field[] = []
  let word = 0
  let used = 0
  const place = (name: string, bits: number): Field => {
    if (bits === 0) {
      const f = { name, word: 0, shift: 0, bits: 0 }
      fields.push(f)
      return f
    }
    if (used + bits > 32) {
      word++
      used = 0
    }
    const f = { name, word, shift: used, bits }
    used += bits
    fields.push(f)
    return f
  }

  const alive: Field[] = []
  const idle: Field[] | null = tracksAges ? [] : null
  const scalar: (Field | null)[][] = []
  const entry: (Field | null)[][][] = []
  for (let p = 0; p < n; p++) {
    alive.push(place(`alive[${p + 1}]`, 1))
    if (idle) idle.push(place(`idle[${p + 1}]`, bitsFor(idleBound)))
    const sc: (Field | null)[] = []
    const en: (Field | null)[][] = []
    for (const v of vars) {
      const bits = bitsFor(v.hi - v.lo + 1)
      if (!v.perPeer) {
        sc.push(place(`${p + 1}.${v.name}`, bits))
        en.push([])
      } else {
        sc.push(null)
        const row: (Field | null)[] = []
        for (let q = 0; q < n; q++) row.push(q === p ? null : place(`${p + 1}.${v.name}[${q + 1}]`, bits))
        en.push(row)
      }
    }
    scalar.push(sc)
    entry.push(en)
  }
  const ageBits = tracksAges ? delay : 1
  const channel: Field[][] = []
  const channelFrom: number[] = []
  const channelTo: number[] = []
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      if (i === j) continue
      channelFrom.push(j)
      channelTo.push(i)
      const row: Field[] = []
      for (let v = 0; v < messageValues; v++) row.push(place(`${j + 1}->${i + 1}:${v}`, ageBits))
      channel.push(row)
    }
  }
  const stable = t.kind === 'eventually synchronous' ? place('stable', 1) : null
  const words = used === 0 && word === 0 ? 1 : word + 1

  const { procMask, inMask } = processMasks(n, words, alive, idle, scalar, entry, channel, channelTo)

  return {
    n, words, timing: t.kind, delay, idleBound, tracksAges, vars, messages, messageValues, valueKind, valueFields,
    maxFields: Math.max(1, maxFields), fields, alive, idle, scalar, entry, channel, channelFrom, channelTo, stable, procMask, inMask,
  }
}
