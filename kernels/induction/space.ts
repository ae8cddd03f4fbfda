// The type space of G_N as solver variables (induction.md): one copy of every field of a global
// state, with the range constraints that make a model of them a state of the type space. Integers
// are solver Ints with bounds (so an arithmetic overflow in a step is seen as the value it is, and
// checked against the type, never wrapped); channels are one Bool per (message value, age).
import type { Arith, Bool, Model } from 'z3-solver'
import type { ProtocolModel } from '../language/model'
import { evalConst } from '../model/constants'
import { readField, writeField, type Layout } from '../model/layout'
import type { Z3 } from './solver'

/** One copy of a global state's fields. */
export interface StateVars {
  alive: Bool<'twofold'>[]
  /** Per process; null under asynchronous. */
  idle: Arith<'twofold'>[] | null
  /** [process][var]: the value of a scalar (null for per-peer vars). */
  scalar: (Arith<'twofold'> | null)[][]
  /** [process][var][peer]: the value of an entry (null for scalars and for the process itself). */
  entry: (Arith<'twofold'> | null)[][][]
  /** [channel][message value][age - 1]: a copy of that age is in flight (one slot under asynchronous). */
  chan: Bool<'twofold'>[][][]
  stable: Bool<'twofold'> | null
}

/** Fresh variables for one copy of the state, named with `tag` (e.g. `s` and `t`). */
export function stateVars(z: Z3, layout: Layout, tag: string): StateVars {
  const n = layout.n
  const ages = layout.tracksAges ? layout.delay : 1
  return {
    alive: Array.from({ length: n }, (_, p) => z.Bool.const(`${tag}.alive${p}`)),
    idle: layout.idle ? Array.from({ length: n }, (_, p) => z.Int.const(`${tag}.idle${p}`)) : null,
    scalar: Array.from({ length: n }, (_, p) => layout.vars.map((v) => (v.perPeer ? null : z.Int.const(`${tag}.${p}.${v.name}`)))),
    entry: Array.from({ length: n }, (_, p) => layout.vars.map((v) =>
      v.perPeer ? Array.from({ length: n }, (_, q) => (q === p ? null : z.Int.const(`${tag}.${p}.${v.name}[${q}]`))) : [])),
    chan: layout.channel.map((_, c) => Array.from({ length: layout.messageValues }, (_, v) =>
      Array.from({ length: ages }, (_, a) => z.Bool.const(`${tag}.ch${c}.${v}@${a + 1}`)))),
    stable: layout.stable ? z.Bool.const(`${tag}.stable`) : null,
  }
}

/** The constraints that keep a copy inside the type space: every integer in its range. */
export function typeSpace(z: Z3, layout: Layout, s: StateVars): Bool<'twofold'> {
  const parts: Bool<'twofold'>[] = []
  const within = (x: Arith<'twofold'>, lo: number, hi: number) => parts.push(x.ge(z.Int.val(lo)), x.le(z.Int.val(hi)))
  for (let p = 0; p < layout.n; p++) {
    if (s.idle) within(s.idle[p], 0, layout.idleBound - 1)
    layout.vars.forEach((info, v) => {
      const x = s.scalar[p][v]
      if (x) within(x, info.lo, info.hi)
      for (const e of s.entry[p][v]) if (e) within(e, info.lo, info.hi)
    })
  }
  return z.And(...parts)
}

/** The packed state that a model gives to a copy (its fields read back into layout words). */
export function readState(z: Z3, layout: Layout, s: StateVars, model: Model<'twofold'>): Uint32Array {
  const w = new Uint32Array(layout.words)
  const bool = (b: Bool<'twofold'>) => z.isTrue(model.eval(b, true))
  const int = (x: Arith<'twofold'>) => Number((model.eval(x, true) as unknown as { value(): bigint }).value())
  for (let p = 0; p < layout.n; p++) {
    writeField(w, 0, layout.alive[p], bool(s.alive[p]) ? 1 : 0)
    if (s.idle) writeField(w, 0, layout.idle![p], int(s.idle[p]))
    layout.vars.forEach((info, v) => {
      const x = s.scalar[p][v]
      if (x) writeField(w, 0, layout.scalar[p][v]!, int(x) - info.lo)
      s.entry[p][v].forEach((e, q) => { if (e) writeField(w, 0, layout.entry[p][v][q]!, int(e) - info.lo) })
    })
  }
  layout.channel.forEach((row, c) => row.forEach((f, v) => {
    let mask = 0
    s.chan[c][v].forEach((b, a) => { if (bool(b)) mask |= 1 << a })
    writeField(w, 0, f, mask)
  }))
  if (s.stable) writeField(w, 0, layout.stable!, bool(s.stable) ? 1 : 0)
  return w
}

/** The formula saying that a copy equals the packed state at words[off..] (tests and replay). */
export function isState(z: Z3, layout: Layout, s: StateVars, words: Uint32Array, off: number): Bool<'twofold'> {
  const parts: Bool<'twofold'>[] = []
  const bool = (b: Bool<'twofold'>, on: boolean) => parts.push(on ? b : z.Not(b))
  for (let p = 0; p < layout.n; p++) {
    bool(s.alive[p], readField(words, off, layout.alive[p]) === 1)
    if (s.idle) parts.push(s.idle[p].eq(z.Int.val(readField(words, off, layout.idle![p]))))
    layout.vars.forEach((info, v) => {
      const x = s.scalar[p][v]
      if (x) parts.push(x.eq(z.Int.val(readField(words, off, layout.scalar[p][v]!) + info.lo)))
      s.entry[p][v].forEach((e, q) => { if (e) parts.push(e.eq(z.Int.val(readField(words, off, layout.entry[p][v][q]!) + info.lo))) })
    })
  }
  layout.channel.forEach((row, c) => row.forEach((f, v) => {
    const mask = readField(words, off, f)
    s.chan[c][v].forEach((b, a) => bool(b, ((mask >> a) & 1) === 1))
  }))
  if (s.stable) bool(s.stable, readField(words, off, layout.stable!) === 1)
  return z.And(...parts)
}

/** Every variable of a copy, for blocking clauses when a test enumerates models. */
export function allVars(s: StateVars): (Bool<'twofold'> | Arith<'twofold'>)[] {
  const out: (Bool<'twofold'> | Arith<'twofold'>)[] = [...s.alive, ...(s.idle ?? [])]
  for (const row of s.scalar) for (const x of row) if (x) out.push(x)
  for (const row of s.entry) for (const es of row) for (const e of es) if (e) out.push(e)
  for (const row of s.chan) for (const ages of row) out.push(...ages)
  if (s.stable) out.push(s.stable)
  return out
}

/** The initial states (semantics.md): all alive, idle 0, initial values (`any`: any value of the type), channels empty, not stable. */
export function initialState(z: Z3, protocol: ProtocolModel, layout: Layout, constants: number[], s: StateVars): Bool<'twofold'> {
  const parts: Bool<'twofold'>[] = [typeSpace(z, layout, s)]
  for (let p = 0; p < layout.n; p++) {
    parts.push(s.alive[p])
    if (s.idle) parts.push(s.idle[p].eq(z.Int.val(0)))
    protocol.vars.forEach((d, v) => {
      if (d.init === 'any') return
      const x = z.Int.val(evalConst(d.init, constants))
      const sc = s.scalar[p][v]
      if (sc) parts.push(sc.eq(x))
      for (const e of s.entry[p][v]) if (e) parts.push(e.eq(x))
    })
  }
  for (const row of s.chan) for (const ages of row) for (const b of ages) parts.push(z.Not(b))
  if (s.stable) parts.push(z.Not(s.stable))
  return z.And(...parts)
}
