// Statement execution for one process, compiled once per instance into closures over a few typed
// arrays: no object is made per step. A process's local values live in `loc` (scalars at their
// slot, per-peer entries at base + peer, the process's own slot unused), binders in `bind`, the
// fields of the message being handled in `fields`.
//
// Nondeterminism (`one of`) is enumerated by re-running the whole step with a choice vector that
// advances like an odometer: the choices met so far are replayed, the last one that can advance
// does, and everything after it starts again from its first option. Choices met later depend only
// on earlier ones, so this visits every combination exactly once.
import type { Expr, ProtocolModel, Span, Stmt, Target } from '../language/model'
import type { Layout } from './layout'

/** Where each variable of a process lives in `loc`: scalars at their slot, per-peer entries from their base. */
function localSlots(protocol: ProtocolModel, n: number): { slotOf: Int32Array; entryBase: Int32Array; size: number } {
  const slotOf = new Int32Array(protocol.vars.length).fill(-1)
  const entryBase = new Int32Array(protocol.vars.length).fill(-1)
  let size = 0
  protocol.vars.forEach((d, v) => {
    if (d.perPeer) {
      entryBase[v] = size
      size += n
    } else slotOf[v] = size++
  })
  return { slotOf, entryBase, size }
}

/** Why a step failed; thrown inside the compiled closures and caught by the tick engine. */
export class ExecFault {
  constructor(
    readonly span: Span,
    readonly what: 'range' | 'division' | 'modulo' | 'field' | 'empty',
    readonly variable: string | null,
    readonly value: number | null,
    readonly type: string | null,
  ) {}

  /** The sentence for a ModelError, naming the process (1-based). */
  describe(process: number): string {
    const at = `line ${this.span.line}, column ${this.span.column}`
    switch (this.what) {
      case 'range':
        return `model error at ${at}: process ${process} sets ${this.variable} to ${this.value}, outside its type ${this.type}`
      case 'field':
        return `model error at ${at}: process ${process} sends ${this.variable} = ${this.value}, outside its type ${this.type}`
      case 'empty':
        return `model error at ${at}: process ${process} chooses ${this.variable} from the empty range ${this.type}`
      default:
        return `model error at ${at}: ${this.what} by zero in a step of process ${process}`
    }
  }
}

type Num = () => number
type Run = () => void

/**
 * The compiled protocol of one instance: its closures and the scratch they run on. One process
 * runs at a time: set `self`, fill `loc` (see `slotOf`/`entryBase`), `resetRun()`, call
 * `runHandler`/`runStep`, read `loc` and the sends, then `nextChoice()` until it returns false.
 */
export class Program {
  readonly loc: Int32Array
  readonly bind: Int32Array
  readonly fields: Int32Array
  /** Slot of each scalar var in `loc` (-1 for per-peer vars). */
  readonly slotOf: Int32Array
  /** First slot of each per-peer var in `loc` (-1 for scalars); entry for peer q at base + q. */
  readonly entryBase: Int32Array
  /** sent[q * messageValues + v] is 1 when message value v was sent to q in this run. */
  readonly sent: Uint8Array
  /** The indices into `sent` that are set, `sentCount` of them. */
  readonly sentList: Int32Array
  sentCount = 0
  self = 0
  /** handlers[kind]: the handler bodies for that message kind, in source order, with their binder. */
  private readonly handlers: { binder: number; body: Run }[][]
  private readonly step: Run
  private choice: number[] = []
  private choiceMax: number[] = []
  private choiceLen = 0
  private depth = 0

  constructor(readonly protocol: ProtocolModel, readonly layout: Layout, readonly constants: number[]) {
    const n = layout.n
    const { slotOf, entryBase, size } = localSlots(protocol, n)
    this.slotOf = slotOf
    this.entryBase = entryBase
    this.loc = new Int32Array(Math.max(1, size))
    this.bind = new Int32Array(Math.max(1, protocol.binders.length))
    this.fields = new Int32Array(layout.maxFields)
    this.sent = new Uint8Array(Math.max(1, n * layout.messageValues))
    this.sentList = new Int32Array(Math.max(1, n * layout.messageValues))
    this.handlers = protocol.messages.map(() => [])
    for (const h of protocol.handlers) this.handlers[h.message].push({ binder: h.binder, body: this.block(h.body) })
    this.step = this.block(protocol.step)
  }

  /** Starts a run: the choice vector is replayed from the start and the sends are cleared. */
  resetRun(): void {
    this.depth = 0
    for (let k = 0; k < this.sentCount; k++) this.sent[this.sentList[k]] = 0
    this.sentCount = 0
  }

  /** Starts the enumeration of a fresh step (first option of every choice). */
  resetChoices(): void {
    this.choiceLen = 0
  }

  /** Advances the choice vector; false when every combination has been run. */
  nextChoice(): boolean {
    // Only the choices actually met in the last run count: a fault may have cut it short.
    let d = Math.min(this.choiceLen, this.depth) - 1
    while (d >= 0 && this.choice[d] + 1 >= this.choiceMax[d]) d--
    if (d < 0) return false
    this.choice[d]++
    this.choiceLen = d + 1
    return true
  }

  /** Runs the handlers of message value `value` received from peer `from`. */
  runHandler(value: number, from: number): void {
    const kind = this.layout.valueKind[value]
    const hs = this.handlers[kind]
    if (hs.length === 0) return
    const mf = this.layout.maxFields
    const nf = this.layout.messages[kind].fieldLo.length
    for (let f = 0; f < nf; f++) this.fields[f] = this.layout.valueFields[value * mf + f]
    for (let k = 0; k < hs.length; k++) {
      this.bind[hs[k].binder] = from
      hs[k].body()
    }
  }

  /** Runs the `step` block. */
  runStep(): void {
    this.step()
  }

  private choose(m: number): number {
    const d = this.depth++
    if (d < this.choiceLen) return this.choice[d]
    this.choice[d] = 0
    this.choiceMax[d] = m
    this.choiceLen = d + 1
    return 0
  }

  private block(stmts: Stmt[]): Run {
    const runs = stmts.map((s) => this.stmt(s))
    if (runs.length === 0) return () => {}
    if (runs.length === 1) return runs[0]
    return () => {
      for (let k = 0; k < runs.length; k++) runs[k]()
    }
  }

  /** Stores `value` into a target after checking it against the variable's type. */
  private store(t: Target, span: Span): (value: number) => void {
    const loc = this.loc
    const bind = this.bind
    const info = this.layout.vars[t.index]
    const lo = info.lo
    const hi = info.hi
    if (t.binder === null) {
      const slot = this.slotOf[t.index]
      return (value) => {
        if (value < lo || value > hi) throw new ExecFault(span, 'range', info.name, value, info.typeText)
        loc[slot] = value
      }
    }
    const base = this.entryBase[t.index]
    const b = t.binder
    return (value) => {
      if (value < lo || value > hi) throw new ExecFault(span, 'range', `${info.name}[${bind[b] + 1}]`, value, info.typeText)
      loc[base + bind[b]] = value
    }
  }

  private stmt(s: Stmt): Run {
    switch (s.k) {
      case 'skip':
        return () => {}
      case 'assign': {
        const put = this.store(s.target, s.span)
        const val = this.expr(s.value, s.span)
        return () => put(val())
      }
      case 'choose': {
        const put = this.store(s.target, s.span)
        const opts = s.options.map((o) => this.expr(o, s.span))
        const m = opts.length
        return () => put(opts[this.choose(m)]())
      }
      case 'chooseRange': {
        const put = this.store(s.target, s.span)
        const lo = this.expr(s.lo, s.span)
        const hi = this.expr(s.hi, s.span)
        const name = this.layout.vars[s.target.index].name
        return () => {
          const a = lo()
          const b = hi()
          if (b < a) throw new ExecFault(s.span, 'empty', name, null, `${a}..${b}`)
          put(a + this.choose(b - a + 1))
        }
      }
      case 'if': {
        const conds = s.branches.map((br) => this.expr(br.cond, s.span))
        const bodies = s.branches.map((br) => this.block(br.body))
        const otherwise = s.otherwise ? this.block(s.otherwise) : null
        return () => {
          for (let k = 0; k < conds.length; k++) {
            if (conds[k]() !== 0) {
              bodies[k]()
              return
            }
          }
          if (otherwise) otherwise()
        }
      }
      case 'for': {
        const body = this.block(s.body)
        const bind = this.bind
        const b = s.binder
        const n = this.layout.n
        return () => {
          for (let q = 0; q < n; q++) {
            if (q === this.self) continue
            bind[b] = q
            body()
          }
        }
      }
      case 'broadcast':
      case 'send': {
        const value = this.messageValue(s.message, s.args, s.span)
        const V = this.layout.messageValues
        const n = this.layout.n
        const sent = this.sent
        const list = this.sentList
        const mark = (k: number) => {
          if (sent[k] === 0) {
            sent[k] = 1
            list[this.sentCount++] = k
          }
        }
        if (s.k === 'send') {
          const b = s.to
          const bind = this.bind
          return () => mark(bind[b] * V + value())
        }
        return () => {
          const v = value()
          for (let q = 0; q < n; q++) if (q !== this.self) mark(q * V + v)
        }
      }
    }
  }

  /** The message value sent by `kind(args)`, checking each field against its type. */
  private messageValue(kind: number, args: Expr[], span: Span): Num {
    const m = this.layout.messages[kind]
    const base = m.base
    if (args.length === 0) return () => base
    const vals = args.map((a) => this.expr(a, span))
    const lo = m.fieldLo
    const hi = m.fieldHi
    const names = m.fieldNames.map((f) => `${m.name}.${f}`)
    return () => {
      let x = 0
      for (let f = 0; f < vals.length; f++) {
        const v = vals[f]()
        if (v < lo[f] || v > hi[f]) throw new ExecFault(span, 'field', names[f], v, `${lo[f]}..${hi[f]}`)
        x = x * (hi[f] - lo[f] + 1) + (v - lo[f])
      }
      return base + x
    }
  }

  private expr(e: Expr, span: Span): Num {
    const loc = this.loc
    const bind = this.bind
    switch (e.k) {
      case 'lit': {
        const v = e.value
        return () => v
      }
      case 'const': {
        const v = this.constants[e.index]
        return () => v
      }
      case 'scalar': {
        const slot = this.slotOf[e.index]
        return () => loc[slot]
      }
      case 'entry': {
        const base = this.entryBase[e.index]
        const b = e.binder
        return () => loc[base + bind[b]]
      }
      case 'field': {
        const fields = this.fields
        const f = e.index
        return () => fields[f]
      }
      case 'neg': {
        const a = this.expr(e.arg, span)
        return () => -a()
      }
      case 'not': {
        const a = this.expr(e.arg, span)
        return () => (a() !== 0 ? 0 : 1)
      }
      case 'min': {
        const a = this.expr(e.left, span)
        const b = this.expr(e.right, span)
        return () => Math.min(a(), b())
      }
      case 'max': {
        const a = this.expr(e.left, span)
        const b = this.expr(e.right, span)
        return () => Math.max(a(), b())
      }
      case 'ite': {
        const c = this.expr(e.cond, span)
        const a = this.expr(e.then, span)
        const b = this.expr(e.else, span)
        return () => (c() !== 0 ? a() : b())
      }
      case 'agg': {
        const body = this.expr(e.body, span)
        const b = e.binder
        const n = this.layout.n
        const op = e.op
        return () => {
          // The binder is saved and restored: an aggregate may sit inside a `for` over the same name.
          const saved = bind[b]
          let count = 0
          for (let q = 0; q < n; q++) {
            if (q === this.self) continue
            bind[b] = q
            if (body() !== 0) count++
          }
          bind[b] = saved
          if (op === 'count') return count
          if (op === 'some') return count > 0 ? 1 : 0
          return count === n - 1 ? 1 : 0
        }
      }
      case 'bin':
        return binary(e.op, this.expr(e.left, span), this.expr(e.right, span), span)
    }
  }
}

/** The closure of a binary operator over compiled operands. */
// Both operands are always evaluated, `and`/`or` included: a guard does not hide a division by
// zero on its other side. `if E then E else E` is the one lazy form.
function binary(op: string, a: Num, b: Num, span: Span): Num {
  switch (op) {
    case '+': return () => a() + b()
    case '-': return () => a() - b()
    case '*': return () => a() * b()
    case '/':
      return () => {
        const x = a()
        const y = b()
        if (y === 0) throw new ExecFault(span, 'division', null, null, null)
        return Math.trunc(x / y)
      }
    case '%':
      return () => {
        const x = a()
        const y = b()
        if (y === 0) throw new ExecFault(span, 'modulo', null, null, null)
        return x % y
      }
    case '=': return () => (a() === b() ? 1 : 0)
    case '!=': return () => (a() !== b() ? 1 : 0)
    case '<': return () => (a() < b() ? 1 : 0)
    case '<=': return () => (a() <= b() ? 1 : 0)
    case '>': return () => (a() > b() ? 1 : 0)
    case '>=': return () => (a() >= b() ? 1 : 0)
    case 'and':
      return () => {
        const x = a()
        const y = b()
        return x !== 0 && y !== 0 ? 1 : 0
      }
    case 'or':
      return () => {
        const x = a()
        const y = b()
        return x !== 0 || y !== 0 ? 1 : 0
      }
    case 'implies':
      return () => {
        const x = a()
        const y = b()
        return x === 0 || y !== 0 ? 1 : 0
      }
    case 'iff': return () => ((a() !== 0) === (b() !== 0) ? 1 : 0)
  }
  throw new Error(`unknown operator ${op}`)
}
