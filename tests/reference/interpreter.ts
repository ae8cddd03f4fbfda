// The reference interpreter: the independent oracle for the packed explorer. It reads a
// `ProtocolModel` and explores an instance G_N over plain JavaScript objects, following
// shared/design/semantics.md line by line. It is deliberately simple and slow, and shares no code
// with `kernels/model` or `kernels/explore`: when the two disagree, one of them misread the
// contract, and the differential test shows a state that only one of them reaches.
import type { Expr, ProtocolModel, Stmt, Target, Type } from '../../kernels/language/model'

/** What `referenceReachable` found: canonical states (DEVELOPERS.md), distinct (source, target) pairs. */
export interface ReferenceResult {
  states: Set<string>
  transitions: number
  /** False when the state limit stopped the exploration. */
  complete: boolean
  /** The first model error met (a value outside its type, division by zero), or null. */
  modelError: string | null
}

/** A model error: it ends the branch of the tick that raised it, and only that branch. */
export class ModelError extends Error {}

/** One process: alive, idle counter, scalar values by var index, per-peer entries by var index. */
interface Proc {
  alive: number
  idle: number
  /** vals[v] is the scalar value for a scalar var, or an array of N entries (own slot unused). */
  vals: (number | number[])[]
}

/** A message in flight: kind index, field values, age (always 0 under asynchronous). */
interface Item {
  kind: number
  fields: number[]
  age: number
}

/** A global state: processes, channels indexed by sender * N + receiver, the `stable` flag (GST has passed). */
interface Global {
  procs: Proc[]
  chans: Item[][]
  stable: number
}

/** Everything a run of the instance needs that does not change from state to state. */
interface Instance {
  p: ProtocolModel
  n: number
  consts: number[]
  timing: 'synchronous' | 'eventually synchronous' | 'asynchronous'
  delay: number
  idle: number
  /** Integer bounds of every var type and every message field type, evaluated once. */
  varBounds: [number, number][]
  fieldBounds: [number, number][][]
}

/** A process's view while it runs statements: its own values (mutable copy) and what it sent. */
interface Local {
  vals: (number | number[])[]
  sent: { to: number; kind: number; fields: number[] }[]
}

/** Bindings while evaluating: the running process, binder values (peer indices), message fields. */
interface Env {
  self: number
  binders: number[]
  fields: number[] | null
}

function cloneVals(vals: (number | number[])[]): (number | number[])[] {
  return vals.map((v) => (typeof v === 'number' ? v : v.slice()))
}

function cloneLocal(l: Local): Local {
  return { vals: cloneVals(l.vals), sent: l.sent.slice() }
}

/** Evaluates a constant expression (types, timing bounds, initial values). */
function constExpr(e: Expr, consts: number[]): number {
  return evalExpr(e, null, { self: -1, binders: [], fields: null }, consts, 0)
}

function typeBounds(t: Type, consts: number[]): [number, number] {
  if (t.k === 'bool') return [0, 1]
  if (t.k === 'enum') return [0, t.labels.length - 1]
  return [constExpr(t.lo, consts), constExpr(t.hi, consts)]
}

function truth(x: number): boolean {
  return x !== 0
}

/**
 * Exact integer arithmetic: `+ - * / %` are computed on BigInt, so a rounded result cannot hide
 * here. The checker refuses every expression whose intermediate values could leave the safe
 * integers (kernels/language/bounds.ts); a result outside them is therefore a checker defect, and
 * the reference says so rather than going on with an inexact number.
 */
export function exactArith(op: '+' | '-' | '*' | '/' | '%', a: number, b: number): number {
  const x = BigInt(a)
  const y = BigInt(b)
  const r = op === '+' ? x + y : op === '-' ? x - y : op === '*' ? x * y : op === '/' ? x / y : x % y
  const v = Number(r)
  if (!Number.isSafeInteger(v) || BigInt(v) !== r) throw new Error(`the reference met ${r}, outside the safe integers: the checker should have refused this expression`)
  return v
}

/**
 * Integer arithmetic as plain mathematics (exactArith). Division truncates toward zero and `%`
 * takes the sign of the dividend (the usual machine-integer convention); both raise a model error
 * on a zero divisor.
 */
function evalExpr(e: Expr, l: Local | null, env: Env, consts: number[], n: number): number {
  const ev = (x: Expr) => evalExpr(x, l, env, consts, n)
  switch (e.k) {
    case 'lit':
      return e.value
    case 'const':
      return consts[e.index]
    case 'scalar':
      return l!.vals[e.index] as number
    case 'entry':
      return (l!.vals[e.index] as number[])[env.binders[e.binder]]
    case 'field':
      return env.fields![e.index]
    case 'neg':
      return -ev(e.arg)
    case 'not':
      return truth(ev(e.arg)) ? 0 : 1
    case 'min':
      return Math.min(ev(e.left), ev(e.right))
    case 'max':
      return Math.max(ev(e.left), ev(e.right))
    case 'ite':
      return truth(ev(e.cond)) ? ev(e.then) : ev(e.else)
    case 'agg': {
      let count = 0
      let peers = 0
      for (let q = 0; q < n; q++) {
        if (q === env.self) continue
        peers++
        const binders = env.binders.slice()
        binders[e.binder] = q
        if (truth(evalExpr(e.body, l, { ...env, binders }, consts, n))) count++
      }
      if (e.op === 'count') return count
      if (e.op === 'some') return count > 0 ? 1 : 0
      return count === peers ? 1 : 0
    }
    case 'bin': {
      const a = ev(e.left)
      const b = ev(e.right)
      switch (e.op) {
        case '+': case '-': case '*': return exactArith(e.op, a, b)
        case '/': case '%':
          if (b === 0) throw new ModelError(`division by zero at line ${e.span.line}`)
          return exactArith(e.op, a, b)
        case '=': return a === b ? 1 : 0
        case '!=': return a !== b ? 1 : 0
        case '<': return a < b ? 1 : 0
        case '<=': return a <= b ? 1 : 0
        case '>': return a > b ? 1 : 0
        case '>=': return a >= b ? 1 : 0
        case 'and': return truth(a) && truth(b) ? 1 : 0
        case 'or': return truth(a) || truth(b) ? 1 : 0
        case 'implies': return !truth(a) || truth(b) ? 1 : 0
        case 'iff': return truth(a) === truth(b) ? 1 : 0
      }
    }
  }
  throw new Error(`unknown expression ${(e as Expr).k}`)
}

/** Stores a value, raising a model error when it falls outside the variable's type. */
function store(inst: Instance, l: Local, t: Target, env: Env, value: number): void {
  const [lo, hi] = inst.varBounds[t.index]
  if (value < lo || value > hi) {
    const name = inst.p.vars[t.index].name
    throw new ModelError(`${name} := ${value} is outside ${lo}..${hi} at line ${t.span.line}`)
  }
  if (t.binder === null) l.vals[t.index] = value
  else (l.vals[t.index] as number[])[env.binders[t.binder]] = value
}

/** A branch of a process's run: a local state, or the model error that ended it. */
type Branch = Local | ModelError

/**
 * Branches that reached the same values having sent the same messages continue identically: keep
 * one of each, so that chained choices do not multiply beyond the distinct local states.
 */
function distinctLocals(ls: Local[]): Local[] {
  if (ls.length < 2) return ls
  const seen = new Map<string, Local>()
  for (const l of ls) {
    const sent = l.sent.map((x) => `${x.to}:${x.kind}(${x.fields.join(',')})`).sort().join(' ')
    seen.set(JSON.stringify(l.vals) + '/' + sent, l)
  }
  return [...seen.values()]
}

/** Runs statements from one local state; returns every branch (nondeterministic choices fan out). */
function execList(inst: Instance, stmts: Stmt[], start: Local, env: Env): Branch[] {
  let live: Local[] = [start]
  const dead: ModelError[] = []
  for (const s of stmts) {
    const next: Local[] = []
    for (const l of live) {
      for (const b of execStmt(inst, s, l, env)) {
        if (b instanceof ModelError) dead.push(b)
        else next.push(b)
      }
    }
    live = distinctLocals(next)
  }
  return [...live, ...dead]
}

function guarded(f: () => Branch[]): Branch[] {
  try {
    return f()
  } catch (err) {
    if (err instanceof ModelError) return [err]
    throw err
  }
}

function execStmt(inst: Instance, s: Stmt, l0: Local, env: Env): Branch[] {
  const ev = (e: Expr, l: Local) => evalExpr(e, l, env, inst.consts, inst.n)
  switch (s.k) {
    case 'skip':
      return [l0]
    case 'assign':
      return guarded(() => {
        const l = cloneLocal(l0)
        store(inst, l, s.target, env, ev(s.value, l0))
        return [l]
      })
    case 'choose':
    case 'chooseRange': {
      let values: number[]
      try {
        if (s.k === 'choose') values = s.options.map((o) => ev(o, l0))
        else {
          const lo = ev(s.lo, l0)
          const hi = ev(s.hi, l0)
          if (lo > hi) return [new ModelError(`one of ${lo}..${hi} is empty at line ${s.span.line}`)]
          values = []
          for (let v = lo; v <= hi; v++) values.push(v)
        }
      } catch (err) {
        if (err instanceof ModelError) return [err]
        throw err
      }
      return [...new Set(values)].flatMap((v) =>
        guarded(() => {
          const l = cloneLocal(l0)
          store(inst, l, s.target, env, v)
          return [l]
        }),
      )
    }
    case 'if':
      return guarded(() => {
        for (const br of s.branches) {
          if (truth(ev(br.cond, l0))) return execList(inst, br.body, l0, env)
        }
        return s.otherwise ? execList(inst, s.otherwise, l0, env) : [l0]
      })
    case 'for': {
      // Peers in ascending order, each iteration seeing the writes of the one before.
      let live: Local[] = [l0]
      const dead: ModelError[] = []
      for (let q = 0; q < inst.n; q++) {
        if (q === env.self) continue
        const binders = env.binders.slice()
        binders[s.binder] = q
        const next: Local[] = []
        for (const l of live) {
          for (const b of execList(inst, s.body, l, { ...env, binders })) {
            if (b instanceof ModelError) dead.push(b)
            else next.push(b)
          }
        }
        live = distinctLocals(next)
      }
      return [...live, ...dead]
    }
    case 'broadcast':
    case 'send':
      return guarded(() => {
        const fields = s.args.map((a) => ev(a, l0))
        const bounds = inst.fieldBounds[s.message]
        fields.forEach((v, i) => {
          const [lo, hi] = bounds[i]
          if (v < lo || v > hi) {
            const m = inst.p.messages[s.message]
            throw new ModelError(
              `field ${m.fields[i].name} of ${m.name} = ${v} is outside ${lo}..${hi} at line ${s.span.line}`,
            )
          }
        })
        const l = cloneLocal(l0)
        if (s.k === 'send') l.sent.push({ to: env.binders[s.to], kind: s.message, fields })
        else {
          for (let q = 0; q < inst.n; q++) if (q !== env.self) l.sent.push({ to: q, kind: s.message, fields })
        }
        return [l]
      })
  }
}

function compareValues(a: { kind: number; fields: number[] }, b: { kind: number; fields: number[] }): number {
  if (a.kind !== b.kind) return a.kind - b.kind
  for (let i = 0; i < a.fields.length; i++) if (a.fields[i] !== b.fields[i]) return a.fields[i] - b.fields[i]
  return 0
}

function itemKey(it: Item): string {
  return `${it.kind}(${it.fields.join(',')})@${it.age}`
}

/** The canonical JSON of DEVELOPERS.md: object keys sorted at every level, written by hand here. */
function sortedJson(v: unknown): string {
  if (Array.isArray(v)) return '[' + v.map(sortedJson).join(',') + ']'
  if (v !== null && typeof v === 'object') {
    const o = v as Record<string, unknown>
    return '{' + Object.keys(o).sort().map((k) => JSON.stringify(k) + ':' + sortedJson(o[k])).join(',') + '}'
  }
  return JSON.stringify(v)
}

function showMessage(inst: Instance, it: Item): string {
  const name = inst.p.messages[it.kind].name
  const body = it.fields.length > 0 ? `${name}(${it.fields.join(',')})` : name
  return inst.timing === 'asynchronous' ? body : `${body}@${it.age}`
}

/**
 * The canonical form of a global state, from the DEVELOPERS.md text:
 * `{procs: [{alive, idle?, vars: {name: value}, peers: {name: {"j": value}}}],
 *   channels: {"j->i": ["kind(v,..)@age", ...sorted]}, stable?}` with keys sorted, processes
 * 1-based in keys, `idle` and `@age` omitted under asynchronous, `stable` only under eventually synchronous.
 * Every one of the N(N-1) channels is listed, empty ones as [].
 */
function canonical(inst: Instance, g: Global): string {
  const { n } = inst
  const procs = g.procs.map((pr, i) => procObject(inst, i, pr.alive, pr.idle, pr.vals))
  const channels: Record<string, string[]> = {}
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      if (i === j) continue
      channels[`${j + 1}->${i + 1}`] = g.chans[j * n + i].map((it) => showMessage(inst, it)).sort()
    }
  }
  const o: Record<string, unknown> = { procs, channels }
  if (inst.timing === 'eventually synchronous') o.stable = g.stable
  return sortedJson(o)
}

/** One process of the canonical form: `{alive, idle?, vars: {name: v}, peers: {name: {"j": v}}}`. */
function procObject(inst: Instance, i: number, alive: number, idle: number, vals: (number | number[])[]): object {
  const vars: Record<string, number> = {}
  const peers: Record<string, Record<string, number>> = {}
  inst.p.vars.forEach((d, v) => {
    if (!d.perPeer) vars[d.name] = vals[v] as number
    else {
      const m: Record<string, number> = {}
      for (let j = 0; j < inst.n; j++) if (j !== i) m[String(j + 1)] = (vals[v] as number[])[j]
      peers[d.name] = m
    }
  })
  const o: Record<string, unknown> = { alive, vars, peers }
  if (inst.timing !== 'asynchronous') o.idle = idle
  return o
}

/** Every initial state: all alive, idle 0, channels empty, each `any` branching per process and peer. */
function initialStates(inst: Instance): Global[] {
  const { p, n } = inst
  // One slot per (process, var[, peer]) with its candidate values; the product of slots is the set.
  const slots: { i: number; v: number; j: number; values: number[] }[] = []
  for (let i = 0; i < n; i++) {
    p.vars.forEach((d, v) => {
      const [lo, hi] = inst.varBounds[v]
      let values: number[]
      if (d.init === 'any') {
        values = []
        for (let x = lo; x <= hi; x++) values.push(x)
      } else {
        const x = constExpr(d.init, inst.consts)
        if (x < lo || x > hi) throw new ModelError(`initial value ${x} of ${d.name} is outside ${lo}..${hi}`)
        values = [x]
      }
      if (!d.perPeer) slots.push({ i, v, j: -1, values })
      else for (let j = 0; j < n; j++) if (j !== i) slots.push({ i, v, j, values })
    })
  }
  const out: Global[] = []
  const pick: number[] = new Array(slots.length).fill(0)
  const build = (k: number) => {
    if (k === slots.length) {
      const procs: Proc[] = []
      for (let i = 0; i < n; i++) {
        procs.push({ alive: 1, idle: 0, vals: p.vars.map((d) => (d.perPeer ? new Array(n).fill(0) : 0)) })
      }
      slots.forEach((s, idx) => {
        const val = s.values[pick[idx]]
        if (s.j < 0) procs[s.i].vals[s.v] = val
        else (procs[s.i].vals[s.v] as number[])[s.j] = val
      })
      out.push({ procs, chans: Array.from({ length: n * n }, () => []), stable: 0 })
      return
    }
    for (let x = 0; x < slots[k].values.length; x++) {
      pick[k] = x
      build(k + 1)
    }
  }
  build(0)
  return out
}

/** What one process does in a tick: its next values, what it took out of its channels, what it sent. */
interface Move {
  stepped: boolean
  vals: (number | number[])[]
  /** Per sender j: the keys of the items it received from channel j->self. */
  taken: Set<string>[]
  sent: { to: number; kind: number; fields: number[] }[]
  /** Cached canonical text of this process after the move. */
  text?: string
  /** Cached canonical text of channel j->self after this move, by the sender's move. */
  inbox?: Map<Move | null, string>[]
}

/** Every move of an alive process i in a tick, bounded or not; model errors go to `errors`. */
function movesOf(inst: Instance, g: Global, i: number, bounded: boolean, errors: string[], budget: { left: number }): Move[] {
  const { n, p } = inst
  const me = g.procs[i]
  const moves: Move[] = []
  const nothing = () => Array.from({ length: n }, () => new Set<string>())
  const mustStep = bounded && me.idle >= inst.idle - 1
  if (!mustStep) moves.push({ stepped: false, vals: me.vals, taken: nothing(), sent: [] })
  // Messages in flight to i; under a bound the overdue ones must be received.
  const incoming: { from: number; it: Item }[] = []
  for (let j = 0; j < n; j++) if (j !== i) for (const it of g.chans[j * n + i]) incoming.push({ from: j, it })
  const forced = incoming.filter((m) => bounded && m.it.age >= inst.delay)
  const free = incoming.filter((m) => !(bounded && m.it.age >= inst.delay))
  for (let mask = 0; mask < 1 << free.length; mask++) {
    const got = forced.concat(free.filter((_, b) => (mask >> b) & 1))
    got.sort((a, b) => a.from - b.from || compareValues(a.it, b.it))
    const taken = nothing()
    for (const m of got) taken[m.from].add(itemKey(m.it))
    // Handlers once per received message in the fixed order, then the step block.
    let live: Local[] = [{ vals: cloneVals(me.vals), sent: [] }]
    for (const m of got) {
      for (const h of p.handlers) {
        if (h.message !== m.it.kind) continue
        const binders: number[] = new Array(p.binders.length).fill(-1)
        binders[h.binder] = m.from
        const env: Env = { self: i, binders, fields: m.it.fields }
        const next: Local[] = []
        for (const l of live) {
          for (const b of execList(inst, h.body, l, env)) {
            if (b instanceof ModelError) errors.push(b.message)
            else next.push(b)
          }
        }
        live = distinctLocals(next)
        budget.left -= live.length
        if (budget.left < 0) throw new OutOfBudget()
      }
    }
    const env: Env = { self: i, binders: new Array(p.binders.length).fill(-1), fields: null }
    for (const l of live) {
      for (const b of execList(inst, p.step, l, env)) {
        if (b instanceof ModelError) errors.push(b.message)
        else moves.push({ stepped: true, vals: b.vals, taken, sent: b.sent })
      }
    }
  }
  return moves
}

/** Thrown when a state's ticks exceed the exploration's budget of enumerated ticks. */
class OutOfBudget extends Error {}

/** Moves with the same effect (values, messages taken, messages sent) give the same successors. */
function distinctMoves(moves: Move[]): Move[] {
  const seen = new Map<string, Move>()
  for (const m of moves) {
    const taken = m.taken.map((t) => [...t].sort().join(' ')).join('|')
    const sent = m.sent.map((x) => `${x.to}:${x.kind}(${x.fields.join(',')})`).sort().join(' ')
    seen.set(`${m.stepped}/${JSON.stringify(m.vals)}/${taken}/${sent}`, m)
  }
  return [...seen.values()]
}

/**
 * Every successor of a state, as canonical text: one per combination of crashes, `stable`, and
 * per-process moves. The text is put together from per-process and per-channel pieces (cached per
 * move, since there are far fewer moves than combinations); `referenceReachable` checks every new
 * state's text against `canonical`, the serializer written from the contract.
 */
function successors(inst: Instance, g: Global, errors: string[], budget: { left: number }, marks?: number[]): string[] {
  const { n } = inst
  const alive: number[] = []
  for (let i = 0; i < n; i++) if (g.procs[i].alive) alive.push(i)
  const stableChoices = inst.timing === 'eventually synchronous' && !g.stable ? [0, 1] : [g.stable]
  const crashMasks = inst.p.faults === 'crash' ? 1 << alive.length : 1
  const out: string[] = []
  const movesCache = new Map<string, Move[]>()
  const downText = g.procs.map((pr, i) => sortedJson(procObject(inst, i, 0, 0, pr.vals)))
  // Channel keys in the sorted order of the canonical JSON.
  const chanOrder: [number, number, string][] = []
  for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) if (i !== j) chanOrder.push([j, i, JSON.stringify(`${j + 1}->${i + 1}`)])
  chanOrder.sort((x, y) => (x[2] < y[2] ? -1 : x[2] > y[2] ? 1 : 0))
  for (const stable of stableChoices) {
    const bounded = inst.timing === 'synchronous' || (inst.timing === 'eventually synchronous' && stable === 1)
    const tail = inst.timing === 'eventually synchronous' ? `],"stable":${stable}}` : ']}'
    for (let cm = 0; cm < crashMasks; cm++) {
      const crashed = new Set(alive.filter((_, b) => (cm >> b) & 1))
      const up = (i: number) => g.procs[i].alive === 1 && !crashed.has(i)
      // Per process: its moves (a crashed or dead process has exactly one, doing nothing).
      const options: (Move | null)[][] = []
      for (let i = 0; i < n; i++) {
        if (!up(i)) {
          options.push([null])
          continue
        }
        const key = `${i}/${bounded}`
        if (!movesCache.has(key)) movesCache.set(key, distinctMoves(movesOf(inst, g, i, bounded, errors, budget)))
        options.push(movesCache.get(key)!)
      }
      const pick: (Move | null)[] = new Array(n)
      const combine = (i: number) => {
        if (i === n) {
          if (--budget.left < 0) throw new OutOfBudget()
          const chans = chanOrder.map(([j, r, key]) => key + ':' + (up(r) ? inboxText(inst, g, pick[r]!, j, r, pick[j]) : '[]'))
          const procs = pick.map((m, r) => (m === null ? downText[r] : procText(inst, g, m, r)))
          out.push('{"channels":{' + chans.join(',') + '},"procs":[' + procs.join(',') + tail)
          if (marks) marks.push(fairMarks(inst, g, pick, stable))
          return
        }
        for (const m of options[i]) {
          pick[i] = m
          combine(i + 1)
        }
      }
      combine(0)
    }
  }
  return out
}

/**
 * The fairness conditions of semantics.md that this tick meets, as bits: bit i when process i
 * steps or is down (crashed now or before: a process down in a cycle never comes back); bit
 * n + j * n + i when channel j->i was empty at the start of the tick, or i received from it, or i is
 * down; bit n + n * n when the tick ends stable (eventually synchronous only; otherwise always set).
 */
function fairMarks(inst: Instance, g: Global, pick: (Move | null)[], stable: number): number {
  const { n } = inst
  let m = 0
  for (let i = 0; i < n; i++) {
    const mv = pick[i]
    if (mv === null || mv.stepped) m |= 1 << i
    for (let j = 0; j < n; j++) {
      if (j === i) continue
      if (mv === null || g.chans[j * n + i].length === 0 || mv.taken[j].size > 0) m |= 1 << (n + j * n + i)
    }
  }
  if (inst.timing !== 'eventually synchronous' || stable === 1) m |= 1 << (n + n * n)
  return m
}

/** Every fairness bit of `fairMarks` for n processes (bits j * n + j of channels are never used). */
export function allFairMarks(n: number): number {
  let m = 0
  for (let i = 0; i < n; i++) {
    m |= 1 << i
    for (let j = 0; j < n; j++) if (j !== i) m |= 1 << (n + j * n + i)
  }
  return m | (1 << (n + n * n))
}

/** Process i after an alive move: idle resets on a step and grows (capped) otherwise. */
function procText(inst: Instance, g: Global, m: Move, i: number): string {
  if (m.text === undefined) {
    const idle = m.stepped ? 0 : Math.min(g.procs[i].idle + 1, inst.idle - 1)
    m.text = sortedJson(procObject(inst, i, 1, inst.timing === 'asynchronous' ? 0 : idle, m.vals))
  }
  return m.text
}

/**
 * Channel j->i after the tick, for an alive receiver i: what i did not take, plus what j sent to
 * i now (age 0), all aged by one (capped at the delay); equal (value, age) copies are one.
 */
function inboxText(inst: Instance, g: Global, receiver: Move, j: number, i: number, sender: Move | null): string {
  if (receiver.inbox === undefined) receiver.inbox = Array.from({ length: inst.n }, () => new Map())
  const cache = receiver.inbox[j]
  let text = cache.get(sender)
  if (text === undefined) {
    const merged = new Map<string, Item>()
    const add = (it: Item) => {
      const aged = inst.timing === 'asynchronous' ? it : { ...it, age: Math.min(it.age + 1, inst.delay) }
      merged.set(itemKey(aged), aged)
    }
    const taken = receiver.taken[j]
    for (const it of g.chans[j * inst.n + i]) if (!taken.has(itemKey(it))) add(it)
    if (sender) for (const s of sender.sent) if (s.to === i) add({ kind: s.kind, fields: s.fields, age: 0 })
    text = sortedJson([...merged.values()].map((it) => showMessage(inst, it)).sort())
    cache.set(sender, text)
  }
  return text
}

/** Resolves the constant values: an array in declaration order, a record by name, or the defaults. */
function constantValues(p: ProtocolModel, constants?: number[] | Record<string, number>): number[] {
  if (Array.isArray(constants)) return constants.slice()
  return p.consts.map((c) => (constants && c.name in constants ? constants[c.name] : c.value))
}

/** The instance a reference exploration works on: constants, bounds and timing evaluated once. */
function makeInstance(protocol: ProtocolModel, n: number, constants?: number[] | Record<string, number>): Instance {
  const consts = constantValues(protocol, constants)
  const t = protocol.timing
  return {
    p: protocol,
    n,
    consts,
    timing: t.kind,
    delay: t.kind === 'asynchronous' ? 0 : constExpr(t.delay, consts),
    idle: t.kind === 'asynchronous' ? 0 : constExpr(t.idle, consts),
    varBounds: protocol.vars.map((v) => typeBounds(v.type, consts)),
    fieldBounds: protocol.messages.map((m) => m.fields.map((f) => typeBounds(f.type, consts))),
  }
}

/**
 * Explores G_n of `protocol` breadth-first and returns its reachable canonical states, the number
 * of distinct (source, target) pairs, whether it finished within `limit` states, and the first
 * model error met. A model error ends only the branch of the tick that raised it. `budget` bounds
 * the work: ticks enumerated (crash set, `stable`, and one move per process) plus handler branches
 * run; exceeding it stops the exploration as incomplete, like the state limit.
 */
export function referenceReachable(
  protocol: ProtocolModel,
  n: number,
  constants?: number[] | Record<string, number>,
  limit = 1_000_000,
  budget = Infinity,
): ReferenceResult {
  const inst = makeInstance(protocol, n, constants)
  const errors: string[] = []
  const states = new Set<string>()
  const byKey = new Map<string, Global>()
  let queue: string[] = []
  let inits: Global[]
  try {
    inits = initialStates(inst)
  } catch (err) {
    if (err instanceof ModelError) return { states, transitions: 0, complete: true, modelError: err.message }
    throw err
  }
  for (const g of inits) {
    const k = canonical(inst, g)
    if (states.has(k)) continue
    if (states.size >= limit) return { states, transitions: 0, complete: false, modelError: null }
    states.add(k)
    byKey.set(k, g)
    queue.push(k)
  }
  let transitions = 0
  const work = { left: budget }
  while (queue.length > 0) {
    const next: string[] = []
    for (const src of queue) {
      const targets = new Set<string>()
      let succ: string[]
      try {
        succ = successors(inst, byKey.get(src)!, errors, work)
      } catch (err) {
        if (err instanceof OutOfBudget) return { states, transitions, complete: false, modelError: errors[0] ?? null }
        throw err
      }
      for (const k of succ) targets.add(k)
      transitions += targets.size
      for (const k of targets) {
        if (states.has(k)) continue
        if (states.size >= limit) return { states, transitions, complete: false, modelError: errors[0] ?? null }
        const g = fromKey(inst, k)
        if (canonical(inst, g) !== k) throw new Error(`the reference's two serializers disagree on ${k}`)
        states.add(k)
        byKey.set(k, g)
        next.push(k)
      }
    }
    queue = next
  }
  return { states, transitions, complete: true, modelError: errors[0] ?? null }
}

/** A reachable state as the reference keeps it: plain values, processes and channels 0-based. */
export interface ReferenceState {
  procs: { alive: number; idle: number; vals: (number | number[])[] }[]
  /** Channel j->i at index j * n + i: kind (declaration index), field values, age. */
  chans: { kind: number; fields: number[]; age: number }[][]
  stable: number
}

/** The reachable state graph, with the fairness bits (see `allFairMarks`) that each edge can meet. */
export interface ReferenceGraph {
  keys: string[]
  states: ReferenceState[]
  initial: number[]
  /** edges[s]: target index -> union of the fairness bits of the ticks from s to that target. */
  edges: Map<number, number>[]
  complete: boolean
  modelError: string | null
  /** Constant values used (declaration order). */
  constants: number[]
}

/**
 * The whole reachable graph of G_n, for the reference temporal check (tests/reference/temporal.ts).
 * Same exploration as `referenceReachable` (n <= 4: the fairness bits must fit in 31).
 */
export function referenceGraph(
  protocol: ProtocolModel,
  n: number,
  constants?: number[] | Record<string, number>,
  limit = 1_000_000,
  budget = Infinity,
): ReferenceGraph {
  const inst = makeInstance(protocol, n, constants)
  const consts = inst.consts
  const out: ReferenceGraph = { keys: [], states: [], initial: [], edges: [], complete: true, modelError: null, constants: consts }
  const index = new Map<string, number>()
  const errors: string[] = []
  const add = (k: string, g: Global): number => {
    let id = index.get(k)
    if (id === undefined) {
      id = out.keys.length
      index.set(k, id)
      out.keys.push(k)
      out.states.push(g)
      out.edges.push(new Map())
    }
    return id
  }
  let inits: Global[]
  try {
    inits = initialStates(inst)
  } catch (err) {
    if (err instanceof ModelError) return { ...out, modelError: err.message }
    throw err
  }
  for (const g of inits) out.initial.push(add(canonical(inst, g), g))
  out.initial = [...new Set(out.initial)]
  const work = { left: budget }
  for (let s = 0; s < out.keys.length; s++) {
    if (out.keys.length > limit) return { ...out, complete: false, modelError: errors[0] ?? null }
    const marks: number[] = []
    let succ: string[]
    try {
      succ = successors(inst, out.states[s], errors, work, marks)
    } catch (err) {
      if (err instanceof OutOfBudget) return { ...out, complete: false, modelError: errors[0] ?? null }
      throw err
    }
    const e = out.edges[s]
    succ.forEach((k, x) => {
      const id = index.has(k) ? index.get(k)! : add(k, fromKey(inst, k))
      e.set(id, (e.get(id) ?? 0) | marks[x])
    })
  }
  return { ...out, modelError: errors[0] ?? null }
}

/** Reads a canonical state back into the working shape (the canonical text is the only copy kept). */
function fromKey(inst: Instance, key: string): Global {
  const { n, p } = inst
  const o = JSON.parse(key) as {
    procs: { alive: number; idle?: number; vars: Record<string, number>; peers: Record<string, Record<string, number>> }[]
    channels: Record<string, string[]>
    stable?: number
  }
  const procs: Proc[] = o.procs.map((pr, i) => ({
    alive: pr.alive,
    idle: pr.idle ?? 0,
    vals: p.vars.map((d) => {
      if (!d.perPeer) return pr.vars[d.name]
      const arr = new Array(n).fill(0)
      for (let j = 0; j < n; j++) if (j !== i) arr[j] = pr.peers[d.name][String(j + 1)]
      return arr
    }),
  }))
  const kinds = new Map(p.messages.map((m, k) => [m.name, k]))
  const chans: Item[][] = []
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      if (i === j) {
        chans.push([])
        continue
      }
      chans.push(
        o.channels[`${j + 1}->${i + 1}`].map((s) => {
          const m = /^([^(@]+)(?:\(([^)]*)\))?(?:@(\d+))?$/.exec(s)!
          return {
            kind: kinds.get(m[1])!,
            fields: m[2] === undefined || m[2] === '' ? [] : m[2].split(',').map(Number),
            age: m[3] === undefined ? 0 : Number(m[3]),
          }
        }),
      )
    }
  }
  return { procs, chans, stable: o.stable ?? 0 }
}
