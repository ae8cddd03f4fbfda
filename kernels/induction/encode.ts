// One tick of G_N (semantics.md, steps 1-6) as a formula over two copies of the state, s and t.
//
// The tick's free choices are solver variables: who crashes, whether `stable` is set, who steps,
// which (sender, value, age) copies each stepping process receives, and every `one of`. Handlers are
// unrolled per sender, message value and age in the order of semantics.md ("Order of values"),
// then the `step` block; statements become guarded single assignments (each write is
// `if path then value else old`), so a process sees its own earlier writes and nobody else's. Peer
// binders (`from q`, `for q`, aggregates) are unrolled, so they are always known numbers here;
// only values are symbolic. A model error (a value outside its type, division by zero, an empty
// range, a field outside its type) is collected as a condition; a tick is a successor only when
// none holds, exactly as the explicit successor function (model/tick.ts) drops a faulting branch.
import type { Arith, Bool } from 'z3-solver'
import type { Expr, ProtocolModel, Span, Stmt, Target } from '../language/model'
import { channelIndex, type Layout } from '../model/layout'
import type { StateVars } from './space'
import type { Z3 } from './solver'

type B = Bool<'twofold'>
type I = Arith<'twofold'>
type V = B | I

/** A model error a tick can make: when `when` holds, process `process` (0-based) faults at `span`. */
export interface EncodedError { when: B; process: number; span: Span; what: string }

/** The tick from s to t: `relation` holds exactly for the successors (when no error holds). */
export interface EncodedTick {
  /** Choices well-formed and t the result, assuming no error. */
  relation: B
  /** Every way the tick can fault. */
  errors: EncodedError[]
  /** How many guarded handler runs were unrolled (the encoding's size, for the budget). */
  runs: number
}

/** The peer-local view of one process while its statements run. */
interface Local {
  scalar: (I | null)[]
  entry: (I | null)[][]
}

/** Shared state of one process's unrolling. */
interface Run {
  p: number
  loc: Local
  bind: number[]
  fields: number[]
  /** sent[to][value]: the run sends that value to that peer. */
  sent: B[][]
  errors: EncodedError[]
  /** Constraints on the run's own choice variables. */
  assume: B[]
  fresh: () => string
}

/** Encodes one tick from s to t of the instance laid out by `layout` under `constants`. */
export function encodeTick(z: Z3, protocol: ProtocolModel, layout: Layout, constants: number[], s: StateVars, t: StateVars, tag = 'k'): EncodedTick {
  const n = layout.n
  const V = layout.messageValues
  const ages = layout.tracksAges ? layout.delay : 1
  const F = z.Bool.val(false)
  const parts: B[] = []
  const errors: EncodedError[] = []
  let counter = 0
  const fresh = () => `${tag}.c${counter++}`
  let runs = 0

  // 1. Crashes; 2. the `stable` flag: the bound applies in this tick exactly when t is stable.
  const crash = Array.from({ length: n }, (_, p) => (protocol.faults === 'crash' ? z.Bool.const(`${tag}.crash${p}`) : F))
  const live = s.alive.map((a, p) => z.And(a, z.Not(crash[p])))
  crash.forEach((c, p) => parts.push(z.Implies(c, s.alive[p])))
  let bound: B
  if (layout.timing === 'synchronous') bound = z.Bool.val(true)
  else if (layout.timing === 'asynchronous') bound = F
  else {
    parts.push(z.Implies(s.stable!, t.stable!))
    bound = t.stable!
  }
  // 3. Who steps; 4. what a stepping process receives.
  const step = Array.from({ length: n }, (_, p) => z.Bool.const(`${tag}.step${p}`))
  const recv = layout.channel.map((_, c) => Array.from({ length: V }, (_, v) => Array.from({ length: ages }, (_, a) => z.Bool.const(`${tag}.recv${c}.${v}@${a + 1}`))))
  for (let p = 0; p < n; p++) {
    parts.push(z.Implies(step[p], live[p]))
    if (s.idle) parts.push(z.Implies(z.And(bound, live[p], s.idle[p].eq(z.Int.val(layout.idleBound - 1))), step[p]))
  }
  layout.channel.forEach((_, c) => {
    const to = layout.channelTo[c]
    for (let v = 0; v < V; v++) {
      for (let a = 0; a < ages; a++) {
        parts.push(z.Implies(recv[c][v][a], z.And(step[to], s.chan[c][v][a])))
        // Under the bound an overdue copy (age = delay) must be received by a stepping receiver.
        if (layout.tracksAges && a === ages - 1) parts.push(z.Implies(z.And(bound, step[to], s.chan[c][v][a]), recv[c][v][a]))
      }
    }
  })

  // 5. Each process's handlers in order, then its step block, from its own state at tick start.
  const sentBy: B[][][] = []
  for (let p = 0; p < n; p++) {
    const loc: Local = {
      scalar: s.scalar[p].slice(),
      entry: s.entry[p].map((row) => row.slice()),
    }
    const sent = Array.from({ length: n }, () => Array.from({ length: V }, () => F))
    const run: Run = { p, loc, bind: new Array(protocol.binders.length).fill(-1), fields: [], sent, errors, assume: parts, fresh }
    for (let q = 0; q < n; q++) {
      if (q === p) continue
      const c = channelIndex(n, q, p)
      for (let v = 0; v < V; v++) {
        const kind = layout.valueKind[v]
        const hs = protocol.handlers.filter((h) => h.message === kind)
        if (hs.length === 0) continue
        const nf = layout.messages[kind].fieldLo.length
        const fields = Array.from({ length: nf }, (_, f) => layout.valueFields[v * layout.maxFields + f])
        for (let a = 0; a < ages; a++) {
          runs++
          for (const h of hs) {
            run.bind[h.binder] = q
            run.fields = fields
            block(z, protocol, layout, constants, run, h.body, recv[c][v][a])
          }
        }
      }
    }
    run.fields = []
    block(z, protocol, layout, constants, run, protocol.step, step[p])
    runs++
    sentBy.push(sent)

    // 6 (own fields): a live process keeps its results (unchanged when it idled), a crashed one
    // keeps its values with alive and idle 0 (semantics.md, pinned encoding choices).
    parts.push(z.Iff(t.alive[p], live[p]))
    if (s.idle && t.idle) {
      const top = z.Int.val(layout.idleBound - 1)
      const up = s.idle[p].add(z.Int.val(1))
      const grown = z.If(up.gt(top), top, up) as I
      parts.push(t.idle[p].eq(z.If(z.And(live[p], z.Not(step[p])), grown, z.Int.val(0)) as I))
    }
    layout.vars.forEach((_, v) => {
      const x = t.scalar[p][v]
      if (x) parts.push(x.eq(z.If(live[p], loc.scalar[v]!, s.scalar[p][v]!) as I))
      t.entry[p][v].forEach((e, q) => { if (e) parts.push(e.eq(z.If(live[p], loc.entry[v][q]!, s.entry[p][v][q]!) as I)) })
    })
  }

  // 6 (channels): what is left ages by one, capped at the delay; sends arrive at age 1; a channel
  // to a process that is not alive after the crashes is empty.
  layout.channel.forEach((_, c) => {
    const from = layout.channelFrom[c]
    const to = layout.channelTo[c]
    for (let v = 0; v < V; v++) {
      const rem = s.chan[c][v].map((b, a) => z.And(b, z.Not(recv[c][v][a])))
      const sent = sentBy[from][to][v]
      for (let a = 0; a < ages; a++) {
        let next: B
        if (!layout.tracksAges) next = z.Or(rem[0], sent)
        else {
          const older = a === 0 ? sent : rem[a - 1]
          next = a === ages - 1 ? z.Or(older, rem[a]) : older
          if (ages === 1) next = z.Or(sent, rem[0])
        }
        parts.push(z.Iff(t.chan[c][v][a], z.And(live[to], next)))
      }
    }
  })
  return { relation: z.And(...parts), errors, runs }
}

/** Runs statements under path condition `pc`. */
function block(z: Z3, protocol: ProtocolModel, layout: Layout, constants: number[], run: Run, stmts: Stmt[], pc: B): void {
  for (const st of stmts) statement(z, protocol, layout, constants, run, st, pc)
}

function statement(z: Z3, protocol: ProtocolModel, layout: Layout, constants: number[], run: Run, st: Stmt, pc: B): void {
  const ex = (e: Expr, guard: B) => toInt(z, expr(z, layout, constants, run, e, guard, st.span))
  switch (st.k) {
    case 'skip':
      return
    case 'assign':
      store(z, layout, run, st.target, ex(st.value, pc), pc, st.span)
      return
    case 'choose': {
      const k = z.Int.const(run.fresh())
      let value: I = ex(st.options[st.options.length - 1], z.And(pc, k.eq(z.Int.val(st.options.length - 1))))
      for (let i = st.options.length - 2; i >= 0; i--) value = z.If(k.eq(z.Int.val(i)), ex(st.options[i], z.And(pc, k.eq(z.Int.val(i)))), value) as I
      run.assume.push(k.ge(z.Int.val(0)), k.lt(z.Int.val(st.options.length)))
      store(z, layout, run, st.target, value, pc, st.span)
      return
    }
    case 'chooseRange': {
      const lo = ex(st.lo, pc)
      const hi = ex(st.hi, pc)
      run.errors.push({ when: z.And(pc, hi.lt(lo)), process: run.p, span: st.span, what: 'empty' })
      const x = z.Int.const(run.fresh())
      run.assume.push(z.Implies(lo.le(hi), z.And(x.ge(lo), x.le(hi))))
      store(z, layout, run, st.target, x, pc, st.span)
      return
    }
    case 'if': {
      // Conditions are evaluated in order until one holds, before any branch runs.
      let none: B = pc
      const guards: B[] = []
      for (const br of st.branches) {
        const c = toBool(z, expr(z, layout, constants, run, br.cond, none, st.span))
        guards.push(z.And(none, c))
        none = z.And(none, z.Not(c))
      }
      st.branches.forEach((br, k) => block(z, protocol, layout, constants, run, br.body, guards[k]))
      if (st.otherwise) block(z, protocol, layout, constants, run, st.otherwise, none)
      return
    }
    case 'for':
      for (let q = 0; q < layout.n; q++) {
        if (q === run.p) continue
        run.bind[st.binder] = q
        block(z, protocol, layout, constants, run, st.body, pc)
      }
      return
    case 'broadcast':
    case 'send': {
      const m = layout.messages[st.message]
      const args = st.args.map((a) => ex(a, pc))
      args.forEach((a, f) => {
        run.errors.push({ when: z.And(pc, z.Or(a.lt(z.Int.val(m.fieldLo[f])), a.gt(z.Int.val(m.fieldHi[f])))), process: run.p, span: st.span, what: 'field' })
      })
      const targets = st.k === 'send' ? [run.bind[st.to]] : Array.from({ length: layout.n }, (_, q) => q).filter((q) => q !== run.p)
      for (let x = 0; x < m.count; x++) {
        const v = m.base + x
        const match = args.map((a, f) => a.eq(z.Int.val(layout.valueFields[v * layout.maxFields + f])))
        const when = match.length ? z.And(pc, ...match) : pc
        for (const q of targets) run.sent[q][v] = z.Or(run.sent[q][v], when)
      }
      return
    }
  }
}

/** A guarded write with its type check. */
function store(z: Z3, layout: Layout, run: Run, target: Target, value: I, pc: B, span: Span): void {
  const info = layout.vars[target.index]
  run.errors.push({ when: z.And(pc, z.Or(value.lt(z.Int.val(info.lo)), value.gt(z.Int.val(info.hi)))), process: run.p, span, what: 'range' })
  if (target.binder === null) {
    run.loc.scalar[target.index] = z.If(pc, value, run.loc.scalar[target.index]!) as I
  } else {
    const q = run.bind[target.binder]
    run.loc.entry[target.index][q] = z.If(pc, value, run.loc.entry[target.index][q]!) as I
  }
}

/** An integer view of a value (booleans are 0/1). */
export function toInt(z: Z3, v: V): I {
  return z.isBool(v) ? (z.If(v, z.Int.val(1), z.Int.val(0)) as I) : v
}

/** A boolean view of a value (nonzero is true). */
export function toBool(z: Z3, v: V): B {
  return z.isBool(v) ? v : v.neq(z.Int.val(0))
}

/** Integer division and remainder as the explicit engine computes them (truncated, JavaScript's). */
export function truncDiv(z: Z3, x: I, y: I): I {
  const ax = z.If(x.ge(z.Int.val(0)), x, x.neg()) as I
  const ay = z.If(y.ge(z.Int.val(0)), y, y.neg()) as I
  const q = z.Div(ax, ay)
  return z.If(x.ge(z.Int.val(0)).eq(y.ge(z.Int.val(0))), q, q.neg()) as I
}

/** `x % y` with the sign of x. */
export function truncMod(z: Z3, x: I, y: I): I {
  return x.sub(y.mul(truncDiv(z, x, y)))
}

/** A protocol expression; division faults are recorded under `guard`. */
function expr(z: Z3, layout: Layout, constants: number[], run: Run, e: Expr, guard: B, span: Span): V {
  const sub = (x: Expr, g: B = guard) => expr(z, layout, constants, run, x, g, span)
  const int = (x: Expr, g: B = guard) => toInt(z, sub(x, g))
  switch (e.k) {
    case 'lit': return z.Int.val(e.value)
    case 'const': return z.Int.val(constants[e.index])
    case 'scalar': return run.loc.scalar[e.index]!
    case 'entry': return run.loc.entry[e.index][run.bind[e.binder]]!
    case 'field': return z.Int.val(run.fields[e.index])
    case 'neg': return int(e.arg).neg()
    case 'not': return z.Not(toBool(z, sub(e.arg)))
    case 'min': case 'max': {
      const a = int(e.left), b = int(e.right)
      return z.If(e.k === 'min' ? a.le(b) : a.ge(b), a, b) as I
    }
    case 'ite': {
      const c = toBool(z, sub(e.cond))
      const a = int(e.then, z.And(guard, c)), b = int(e.else, z.And(guard, z.Not(c)))
      return z.If(c, a, b) as I
    }
    case 'agg': {
      const saved = run.bind[e.binder]
      const hits: B[] = []
      for (let q = 0; q < layout.n; q++) {
        if (q === run.p) continue
        run.bind[e.binder] = q
        hits.push(toBool(z, sub(e.body)))
      }
      run.bind[e.binder] = saved
      if (e.op === 'some') return hits.length ? z.Or(...hits) : z.Bool.val(false)
      if (e.op === 'every') return hits.length ? z.And(...hits) : z.Bool.val(true)
      return hits.length ? z.Sum(toInt(z, hits[0]), ...hits.slice(1).map((h) => toInt(z, h))) : z.Int.val(0)
    }
    case 'bin': {
      const op = e.op
      if (op === 'and' || op === 'or' || op === 'implies' || op === 'iff') {
        const a = toBool(z, sub(e.left)), b = toBool(z, sub(e.right))
        if (op === 'and') return z.And(a, b)
        if (op === 'or') return z.Or(a, b)
        if (op === 'implies') return z.Implies(a, b)
        return z.Iff(a, b)
      }
      const a = int(e.left), b = int(e.right)
      switch (op) {
        case '+': return a.add(b)
        case '-': return a.sub(b)
        case '*': return a.mul(b)
        case '/': case '%':
          run.errors.push({ when: z.And(guard, b.eq(z.Int.val(0))), process: run.p, span: e.span, what: op === '/' ? 'division' : 'modulo' })
          return op === '/' ? truncDiv(z, a, b) : truncMod(z, a, b)
        case '=': return a.eq(b)
        case '!=': return a.neq(b)
        case '<': return a.lt(b)
        case '<=': return a.le(b)
        case '>': return a.gt(b)
        case '>=': return a.ge(b)
      }
    }
  }
  throw new Error(`unknown expression ${(e as Expr).k}`)
}
