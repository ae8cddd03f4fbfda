// From a `protocol` declaration's syntax tree to a resolved, type-checked `ProtocolModel`.
// Every error is reported with its notebook position; resolution goes on after an error so
// that independent mistakes are all reported, and a declaration that has a syntax error is
// skipped (its syntax error says enough).
import type { SyntaxNode } from '@lezer/common'
import { ARITH, BlockContext, binaryOperator, children, COMPARE, expressionChildren, hasError } from './context'
import type {
  Binder, BinOp, ConstDecl, Expr, FieldDecl, Handler, MessageDecl, ProtocolModel, Span, Stmt, Target,
  Timing, Type, VarDecl,
} from './model'
import { protocolProblems } from './bounds'
import { BOOL, comparisonProblem, ConstantError, evalConstant, indexByName, INT, integerLiteral, internLabels, labelIndex, labelWork, sameSort, Sort, sortName, sortOf } from './sorts'
import { MAX_ENUM_LABELS } from './limits'
import { didYouMean, namesOf } from './suggest'

interface Typed { e: Expr; sort: Sort }

interface Scope {
  /** Only constants and literals may appear (types, inits, timing). */
  constOnly: boolean
  binders: Map<string, number>
  fields: Map<string, { index: number; sort: Sort }>
  /** What the constant-only context is, for messages. */
  what?: string
}

const LOGIC = new Set(['and', 'or', 'implies', 'iff'])
const TEMPORAL = new Set(['always', 'eventually', 'next', 'until', 'unless'])
const PROPERTY_CALLS = new Set(['alive', 'crashed', 'correct', 'faulty'])

/** Resolves one protocol declaration. Returns null only when the declaration has no name. */
export function resolveProtocol(node: SyntaxNode, ctx: BlockContext): { model: ProtocolModel; broken: boolean } | null {
  return new ProtocolResolver(node, ctx).run()
}

class ProtocolResolver {
  private consts: ConstDecl[] = []
  private constValues: number[] = []
  private constUsed: boolean[] = []
  private messages: MessageDecl[] = []
  private messageSent: boolean[] = []
  private vars: VarDecl[] = []
  private handlers: Handler[] = []
  private handlerOf = new Map<number, Handler>()
  private step: Stmt[] = []
  private binders: Binder[] = []
  private timing: Timing | null = null
  private faults: 'none' | 'crash' = 'none'
  private broken = false
  /** Each label's enum sorts, one per distinct enum (so lists stay short and shared). */
  private labels = new Map<string, Sort[]>()
  private enumPool = new Map<string, readonly string[]>()
  private names = new Map<string, { what: string; span: Span }>()

  constructor(private readonly node: SyntaxNode, private readonly ctx: BlockContext) {}

  run(): { model: ProtocolModel; broken: boolean } | null {
    const { node, ctx } = this
    const nameNode = node.getChild('Identifier')
    if (!nameNode) return null
    const body = node.getChild('ProtocolBody')
    const decls = body ? children(body).filter((c) => c.name !== '{' && c.name !== '}') : []
    if (!body || hasError(node)) this.broken = true
    // Declarations are order-independent inside a protocol, except that a constant may only be
    // used after it is declared; types and messages are collected first so handlers can use them.
    const later: SyntaxNode[] = []
    let faultsSeen: SyntaxNode | null = null
    let stepSeen: SyntaxNode | null = null
    for (const d of decls) {
      if (d.type.isError) continue
      // Blocks with a syntax error are still read statement by statement; other declarations are skipped.
      if (d.name !== 'StepBlock' && d.name !== 'Handler' && hasError(d)) continue
      switch (d.name) {
        case 'ConstDecl': this.constDecl(d); break
        case 'MessageDecl': this.messageDecl(d); break
        case 'StateDecl': this.stateDecl(d); break
        case 'TimingDecl': this.timingDecl(d); break
        case 'FaultsDecl':
          if (faultsSeen) ctx.error(d, `protocol \`${ctx.text(nameNode)}\` declares its faults twice (first at line ${ctx.span(faultsSeen).line}); keep one \`faults\` line`)
          faultsSeen = d
          this.faults = ctx.text(d.getChild('FaultKind')!) as 'none' | 'crash'
          break
        case 'StepBlock':
          if (stepSeen) ctx.error(d, `protocol \`${ctx.text(nameNode)}\` has a second \`step\` block (the first is at line ${ctx.span(stepSeen).line}); merge them into one`)
          else stepSeen = d
          later.push(d)
          break
        case 'Handler': later.push(d); break
      }
    }
    for (const d of later) {
      if (d.name === 'Handler') this.handler(d)
      else if (d === stepSeen && d.getChild('Block')) this.step = this.block(d.getChild('Block')!, { constOnly: false, binders: new Map(), fields: new Map() })
    }
    if (!this.timing) {
      this.timing = { kind: 'asynchronous', span: ctx.span(nameNode) }
      if (!this.broken) {
        ctx.error(nameNode, `protocol \`${ctx.text(nameNode)}\` has no timing declaration; add \`timing synchronous(delay: 1, idle: 1)\`, \`timing eventually synchronous(delay: D, idle: I)\` or \`timing asynchronous\``)
      }
      this.broken = true
    }
    if (!this.broken) {
      this.consts.forEach((c, i) => {
        if (!this.constUsed[i]) ctx.warn(c.span, `constant \`${c.name}\` is never used; remove it or use it`)
      })
      this.messages.forEach((m, i) => {
        if (!this.messageSent[i]) ctx.warn(m.span, `message \`${m.name}\` is never sent; remove it or send it`)
      })
    }
    const model: ProtocolModel = {
      name: ctx.text(nameNode),
      span: ctx.span(nameNode),
      consts: this.consts,
      timing: this.timing,
      faults: this.faults,
      messages: this.messages,
      vars: this.vars,
      handlers: this.handlers,
      step: this.step,
      binders: this.binders,
      block: ctx.block,
    }
    if (!this.broken) {
      // Ranges, constants and arithmetic beyond the limits (limits.ts), under the declared constants.
      for (const p of protocolProblems(model, this.constValues)) {
        ctx.error(p.span, p.message)
        this.broken = true
      }
    }
    return { model, broken: this.broken }
  }

  // ---- declarations -------------------------------------------------------------------------

  private declareName(node: SyntaxNode, what: string): boolean {
    const name = this.ctx.text(node)
    const prior = this.names.get(name)
    if (prior) {
      this.ctx.error(node, `\`${name}\` is already declared as a ${prior.what} at line ${prior.span.line}; choose another name`)
      return false
    }
    if (this.labels.has(name)) {
      this.ctx.error(node, `\`${name}\` is already an enum label; choose another name`)
      return false
    }
    this.names.set(name, { what, span: this.ctx.span(node) })
    return true
  }

  private constDecl(d: SyntaxNode): void {
    const { ctx } = this
    const id = d.getChild('Identifier')!
    const [valueNode] = expressionChildren(d)
    let value: number | null = null
    if (valueNode?.name === 'Number') value = Number(ctx.text(valueNode))
    else if (valueNode?.name === 'Negation' && expressionChildren(valueNode)[0]?.name === 'Number') value = -Number(ctx.text(expressionChildren(valueNode)[0]))
    if (value === null || !Number.isSafeInteger(value)) {
      ctx.error(valueNode ?? d, `constant \`${ctx.text(id)}\` must be an integer literal such as \`3\`; write the value itself`)
      value = 0
    }
    if (!this.declareName(id, 'constant')) return
    this.consts.push({ name: ctx.text(id), value, span: ctx.span(id) })
    this.constValues.push(value)
    this.constUsed.push(false)
  }

  private type(node: SyntaxNode, what: string): Type | null {
    const { ctx } = this
    if (node.name === 'BoolType') return { k: 'bool' }
    if (node.name === 'EnumType') {
      const ids = node.getChildren('Identifier')
      const fresh: string[] = []
      const seen = new Set<string>()
      for (const id of ids) {
        const l = ctx.text(id)
        labelWork.steps++
        if (seen.has(l)) { ctx.error(id, `enum label \`${l}\` appears twice in ${what}; remove one`); return null }
        if (this.names.has(l)) { ctx.error(id, `enum label \`${l}\` is already declared as a ${this.names.get(l)!.what}; choose another label`); return null }
        if (fresh.length === MAX_ENUM_LABELS) {
          ctx.error(id, `the enum type of ${what} has more than ${MAX_ENUM_LABELS} labels, the most an enum may have; use a range type for this many values`)
          return null
        }
        seen.add(l)
        fresh.push(l)
      }
      if (fresh.length === 0) { ctx.error(node, `the enum type of ${what} has no labels; list them as \`{a, b}\``); return null }
      // Equal enums share one labels array, so that they compare by identity (sameSort).
      const labels = internLabels(this.enumPool, fresh)
      if (labels === fresh) {
        const sort: Sort = { k: 'enum', labels }
        for (const l of labels) {
          const list = this.labels.get(l)
          if (!list) this.labels.set(l, [sort])
          else list.push(sort)
        }
      }
      return { k: 'enum', labels: labels as string[] }
    }
    // RangeType
    const scope: Scope = { constOnly: true, binders: new Map(), fields: new Map(), what: 'a type bound' }
    const [loNode, hiNode] = expressionChildren(node)
    const lo = this.intExpr(loNode, scope)
    const hi = this.intExpr(hiNode, scope)
    if (!lo || !hi) return null
    try {
      const a = evalConstant(lo, this.constValues)
      const b = evalConstant(hi, this.constValues)
      if (a > b) {
        ctx.error(node, `the range ${a}..${b} of ${what} is empty; write the smaller bound first`)
        return null
      }
    } catch (e) {
      if (e instanceof ConstantError) { ctx.error(node, `the range of ${what} divides by zero; fix its bounds`); return null }
      throw e
    }
    return { k: 'range', lo, hi }
  }

  private messageDecl(d: SyntaxNode): void {
    const { ctx } = this
    const id = d.getChild('Identifier')!
    const name = ctx.text(id)
    if (indexByName(this.messages, name) >= 0) {
      ctx.error(id, `message \`${name}\` is declared twice; remove one declaration`)
      return
    }
    const fields: FieldDecl[] = []
    const fieldNames = new Set<string>()
    for (const f of d.getChild('FieldList')?.getChildren('FieldDecl') ?? []) {
      const fid = f.getChild('Identifier')!
      const fname = ctx.text(fid)
      if (fieldNames.has(fname)) { ctx.error(fid, `message \`${name}\` has two fields named \`${fname}\`; rename one`); continue }
      const tnode = children(f).find((c) => c.name === 'BoolType' || c.name === 'RangeType' || c.name === 'EnumType')
      const type = tnode ? this.type(tnode, `field \`${fname}\``) : null
      if (type) { fields.push({ name: fname, type, span: ctx.span(fid) }); fieldNames.add(fname) }
      else return
    }
    this.messages.push({ name, fields, span: ctx.span(id) })
    this.messageSent.push(false)
  }

  private stateDecl(d: SyntaxNode): void {
    const { ctx } = this
    const id = d.getChild('Identifier')!
    const name = ctx.text(id)
    const perPeer = d.getChild('PeerMark') !== null
    const tnode = children(d).find((c) => c.name === 'BoolType' || c.name === 'RangeType' || c.name === 'EnumType')
    const type = tnode ? this.type(tnode, `\`${name}\``) : null
    if (!this.declareName(id, 'variable')) return
    if (!type) return
    const init = d.getChild('Any') ? 'any' : this.initValue(d, name, type)
    // A variable whose initial value is wrong is still declared, so that its uses are not
    // reported as unknown; the protocol cannot run until the error is fixed.
    if (init === null) this.broken = true
    this.vars.push({ name, perPeer, type, init: init ?? 'any', span: ctx.span(id) })
  }

  private initValue(d: SyntaxNode, name: string, type: Type): Expr | null {
    const { ctx } = this
    {
      const [initNode] = expressionChildren(d)
      const typed = this.expr(initNode, { constOnly: true, binders: new Map(), fields: new Map(), what: 'an initial value' }, sortOf(type))
      if (!typed) return null
      if (!sameSort(typed.sort, sortOf(type))) {
        ctx.error(initNode, `the initial value of \`${name}\` is ${sortName(typed.sort)}, but \`${name}\` holds ${sortName(sortOf(type))}; give a value of its type`)
        return null
      }
      if (type.k === 'range') {
        try {
          const v = evalConstant(typed.e, this.constValues)
          const lo = evalConstant(type.lo, this.constValues)
          const hi = evalConstant(type.hi, this.constValues)
          if (v < lo || v > hi) {
            ctx.error(initNode, `the initial value ${v} of \`${name}\` is outside its type ${lo}..${hi}; choose a value inside the range`)
            return null
          }
        } catch (e) {
          if (!(e instanceof ConstantError)) throw e
          ctx.error(initNode, `the initial value of \`${name}\` divides by zero; fix the expression`)
          return null
        }
      }
      return typed.e
    }
  }

  private timingDecl(d: SyntaxNode): void {
    const { ctx } = this
    const span = ctx.span(d)
    if (this.timing) {
      ctx.error(d, `a protocol has exactly one timing declaration, and this is the second (the first is at line ${this.timing.span.line}); remove one`)
      return
    }
    const kindNode = d.getChild('TimingKind')!
    const written = ctx.text(kindNode).replace(/\s+/g, ' ')
    const params = d.getChild('ParamList')
    // The earlier spelling is read as the current one (so nothing else cascades), with an error.
    if (written === 'stabilizing') {
      const given = params ? ctx.text(params).replace(/\s+/g, ' ') : ''
      ctx.error(kindNode, `write \`timing eventually synchronous${given || '(delay: D, idle: I)'}\` instead of \`timing stabilizing${given}\``)
    }
    const kind: Timing['kind'] = written === 'stabilizing' ? 'eventually synchronous' : written as Timing['kind']
    if (kind === 'asynchronous') {
      if (params) ctx.error(params, '`timing asynchronous` takes no parameters; remove the parentheses, or use `eventually synchronous` for bounds that hold from an unknown time on')
      this.timing = { kind, span }
      return
    }
    const got: Record<string, Expr> = {}
    // After a faulty parameter, a "missing parameter" error would only repeat it.
    let faulty = written === 'stabilizing' && !params
    for (const p of params?.getChildren('Param') ?? []) {
      const pid = p.getChild('Identifier')!
      const pname = ctx.text(pid)
      if (pname !== 'delay' && pname !== 'idle') {
        ctx.error(pid, `\`timing ${kind}\` has the parameters \`delay\` and \`idle\`, not \`${pname}\`${didYouMean(pname, ["delay", "idle"])}; write \`delay: D, idle: I\``)
        faulty = true
        continue
      }
      if (got[pname]) { ctx.error(pid, `the timing parameter \`${pname}\` is given twice; keep one`); continue }
      const e = this.intExpr(expressionChildren(p)[0], { constOnly: true, binders: new Map(), fields: new Map(), what: 'a timing parameter' })
      if (!e) { faulty = true; continue }
      try {
        const v = evalConstant(e, this.constValues)
        if (v < 1) {
          ctx.error(p, `the timing parameter \`${pname}\` is ${v}, but it must be at least 1; give a positive bound`)
          faulty = true
          continue
        }
      } catch (err) {
        if (!(err instanceof ConstantError)) throw err
        ctx.error(p, `the timing parameter \`${pname}\` divides by zero; fix the expression`)
        faulty = true
        continue
      }
      got[pname] = e
    }
    for (const need of ['delay', 'idle']) {
      if (!got[need] && !this.broken && !faulty) {
        ctx.error(d, `\`timing ${kind}\` needs the parameter \`${need}\`; write \`timing ${kind}(delay: D, idle: I)\``)
      }
    }
    if (!got.delay || !got.idle) { this.timing = { kind: 'asynchronous', span }; this.broken = true; return }
    this.timing = { kind, delay: got.delay, idle: got.idle, span }
  }

  private handler(d: SyntaxNode): void {
    const { ctx } = this
    const ids = d.getChildren('Identifier')
    const [msgNode, peerNode] = ids
    // A handler broken by a syntax error is read only when its shape survived the recovery.
    if (!peerNode || !d.getChild('Block') || !d.getChild('from')) return
    const msgName = ctx.text(msgNode)
    const message = indexByName(this.messages, msgName)
    if (message < 0) {
      ctx.error(msgNode, `unknown message \`${msgName}\`${didYouMean(msgName, namesOf(this.messages))}; declare it with \`message ${msgName}\``)
      return
    }
    const prior = this.handlerOf.get(message)
    if (prior) {
      ctx.error(msgNode, `message \`${msgName}\` already has a handler at line ${prior.span.line}; merge the two handlers into one`)
      return
    }
    const fields = new Map<string, { index: number; sort: Sort }>()
    const fieldNames: string[] = []
    const bind = d.getChild('BindList')
    const decl = this.messages[message]
    if (bind) {
      const names = bind.getChildren('Identifier')
      if (names.length !== decl.fields.length) {
        ctx.error(bind, `message \`${msgName}\` has ${decl.fields.length} field${decl.fields.length === 1 ? '' : 's'}, but the handler binds ${names.length}; bind one name per field, in order`)
        return
      }
      names.forEach((n, i) => {
        const fname = ctx.text(n)
        if (this.names.has(fname)) ctx.error(n, `the field name \`${fname}\` hides the ${this.names.get(fname)!.what} \`${fname}\`; choose another name`)
        else if (fields.has(fname)) ctx.error(n, `the field name \`${fname}\` is bound twice; choose another name`)
        fields.set(fname, { index: i, sort: sortOf(decl.fields[i].type) })
        fieldNames.push(fname)
      })
    }
    const peer = this.bindPeer(peerNode, new Map())
    if (peer === null) return
    const binders = new Map([[ctx.text(peerNode), peer]])
    const body = this.block(d.getChild('Block')!, { constOnly: false, binders, fields })
    const h: Handler = { message, binder: peer, fieldNames, body, span: ctx.span(msgNode) }
    this.handlers.push(h)
    this.handlerOf.set(message, h)
  }

  private bindPeer(node: SyntaxNode, bound: Map<string, number>): number | null {
    const name = this.ctx.text(node)
    if (bound.has(name)) {
      this.ctx.error(node, `\`${name}\` is already bound here; use another name for the inner peer`)
      return null
    }
    if (this.names.has(name)) {
      this.ctx.error(node, `the peer name \`${name}\` hides the ${this.names.get(name)!.what} \`${name}\`; choose another name`)
      return null
    }
    this.binders.push({ name, span: this.ctx.span(node) })
    return this.binders.length - 1
  }

  // ---- statements ---------------------------------------------------------------------------

  private block(node: SyntaxNode, scope: Scope): Stmt[] {
    const out: Stmt[] = []
    for (const s of children(node)) {
      if (s.name === '{' || s.name === '}' || s.type.isError || hasError(s)) continue
      const st = this.statement(s, scope)
      if (st) out.push(st)
    }
    return out
  }

  private target(node: SyntaxNode, scope: Scope): { target: Target; sort: Sort } | null {
    const { ctx } = this
    const id = node.getChild('Identifier')!
    const name = ctx.text(id)
    const index = indexByName(this.vars, name)
    if (index < 0) {
      const what = this.names.get(name)?.what ?? (scope.fields.has(name) ? 'message field' : scope.binders.has(name) ? 'peer' : null)
      // A variable whose type was refused is declared without a type: its error says enough.
      if (what === 'variable') return null
      if (what) ctx.error(id, `\`${name}\` is a ${what} and cannot be assigned; assign a state variable`)
      else ctx.error(id, `unknown variable \`${name}\`${didYouMean(name, namesOf(this.vars))}; declare it with \`state ${name}: TYPE = INIT\``)
      return null
    }
    const v = this.vars[index]
    if (node.name === 'VarRef') {
      if (v.perPeer) { ctx.error(node, `\`${name}\` holds one value per peer; assign an entry such as \`${name}[q]\` with q bound`); return null }
      return { target: { index, binder: null, span: ctx.span(node) }, sort: sortOf(v.type) }
    }
    const binder = this.peerIndex(node, scope, v)
    if (binder === null) return null
    return { target: { index, binder, span: ctx.span(node) }, sort: sortOf(v.type) }
  }

  /** The binder of `x[q]`, checking that x is per-peer and q is bound. */
  private peerIndex(node: SyntaxNode, scope: Scope, v: VarDecl): number | null {
    const { ctx } = this
    const ids = children(node).filter((c) => c.name === 'Identifier' || c.name === 'ProcNumber')
    const idx = ids[1]
    if (!v.perPeer) { ctx.error(node, `\`${v.name}\` holds a single value, not one per peer; write \`${v.name}\` without an index`); return null }
    if (!idx || idx.name === 'ProcNumber') {
      ctx.error(idx ?? node, `a protocol refers to peers only through a bound name such as \`q\`, not \`${idx ? ctx.text(idx) : ''}\`; index with the \`q\` of \`on ... from q\`, \`for q\` or an aggregate`)
      return null
    }
    const q = ctx.text(idx)
    const binder = scope.binders.get(q)
    if (binder === undefined) {
      ctx.error(idx, `\`${q}\` is not bound here; \`${v.name}[${q}]\` needs \`${q}\` from \`on ... from ${q}\`, \`for ${q}\` or an aggregate around it`)
      return null
    }
    return binder
  }

  private statement(s: SyntaxNode, scope: Scope): Stmt | null {
    const { ctx } = this
    const span = ctx.span(s)
    switch (s.name) {
      case 'Skip': return { k: 'skip', span }
      case 'Assign': {
        const tnode = children(s).find((c) => c.name === 'VarRef' || c.name === 'IndexRef')!
        const t = this.target(tnode, scope)
        const valueNode = expressionChildren(s).filter((c) => c.from !== tnode.from)[0]
        const v = this.expr(valueNode, scope, t?.sort)
        if (!t || !v) return null
        if (!sameSort(t.sort, v.sort)) {
          ctx.error(valueNode, `\`${this.vars[t.target.index].name}\` holds ${sortName(t.sort)}, but this value is ${sortName(v.sort)}; assign a value of its type`)
          return null
        }
        return { k: 'assign', target: t.target, value: v.e, span }
      }
      case 'Choose': {
        const tnode = children(s).find((c) => c.name === 'VarRef' || c.name === 'IndexRef')!
        const t = this.target(tnode, scope)
        const set = s.getChild('ChoiceSet')
        if (set) {
          const options: Expr[] = []
          for (const o of expressionChildren(set)) {
            const v = this.expr(o, scope, t?.sort)
            if (!v || !t) continue
            if (!sameSort(t.sort, v.sort)) { ctx.error(o, `\`${this.vars[t.target.index].name}\` holds ${sortName(t.sort)}, but this choice is ${sortName(v.sort)}; list values of its type`); continue }
            options.push(v.e)
          }
          if (!t) return null
          if (options.length === 0) { ctx.error(set, 'a choice needs at least one option; list them as `one of {a, b}`'); return null }
          if (options.length !== expressionChildren(set).length) return null
          return { k: 'choose', target: t.target, options, span }
        }
        const range = s.getChild('ChoiceRange')!
        const [loN, hiN] = expressionChildren(range)
        const lo = this.intExpr(loN, scope)
        const hi = this.intExpr(hiN, scope)
        if (!t || !lo || !hi) return null
        if (t.sort.k !== 'int') { ctx.error(range, `\`${this.vars[t.target.index].name}\` holds ${sortName(t.sort)}, so it cannot take a value from an integer range; list the values with \`one of {...}\``); return null }
        return { k: 'chooseRange', target: t.target, lo, hi, span }
      }
      case 'IfStatement': {
        const branches: { cond: Expr; body: Stmt[] }[] = []
        let otherwise: Stmt[] | null = null
        let ok = true
        const add = (condNode: SyntaxNode, blockNode: SyntaxNode) => {
          const c = this.boolExpr(condNode, scope, 'the condition of an `if`')
          const body = this.block(blockNode, scope)
          if (c) branches.push({ cond: c, body })
          else ok = false
        }
        add(expressionChildren(s)[0], s.getChild('Block')!)
        for (const ei of s.getChildren('ElseIf')) add(expressionChildren(ei)[0], ei.getChild('Block')!)
        const el = s.getChild('Else')
        if (el) otherwise = this.block(el.getChild('Block')!, scope)
        return ok ? { k: 'if', branches, otherwise, span } : null
      }
      case 'ForStatement': {
        const id = s.getChild('Identifier')!
        const b = this.bindPeer(id, scope.binders)
        if (b === null) return null
        const inner: Scope = { ...scope, binders: new Map(scope.binders).set(ctx.text(id), b) }
        return { k: 'for', binder: b, body: this.block(s.getChild('Block')!, inner), span }
      }
      case 'Broadcast':
      case 'Send': {
        const ids = s.getChildren('Identifier')
        const msgNode = ids[0]
        const name = ctx.text(msgNode)
        const message = indexByName(this.messages, name)
        if (message < 0) {
          ctx.error(msgNode, `unknown message \`${name}\`${didYouMean(name, namesOf(this.messages))}; declare it with \`message ${name}\``)
          return null
        }
        this.messageSent[message] = true
        const decl = this.messages[message]
        const argNodes = s.getChild('ArgList') ? expressionChildren(s.getChild('ArgList')!) : []
        if (argNodes.length !== decl.fields.length) {
          ctx.error(s.getChild('ArgList') ?? msgNode, `message \`${name}\` has ${decl.fields.length} field${decl.fields.length === 1 ? '' : 's'}, but ${argNodes.length} value${argNodes.length === 1 ? ' is' : 's are'} given; give one value per field, in order`)
          return null
        }
        const args: Expr[] = []
        let ok = true
        argNodes.forEach((a, i) => {
          const want = sortOf(decl.fields[i].type)
          const v = this.expr(a, scope, want)
          if (!v) { ok = false; return }
          if (!sameSort(v.sort, want)) {
            ctx.error(a, `field \`${decl.fields[i].name}\` of \`${name}\` holds ${sortName(want)}, but this value is ${sortName(v.sort)}; give a value of its type`)
            ok = false
            return
          }
          args.push(v.e)
        })
        if (!ok) return null
        if (s.name === 'Broadcast') return { k: 'broadcast', message, args, span }
        const toNode = ids[1]
        const to = scope.binders.get(ctx.text(toNode))
        if (to === undefined) {
          ctx.error(toNode, `\`send ... to ${ctx.text(toNode)}\` needs \`${ctx.text(toNode)}\` bound by \`on ... from ${ctx.text(toNode)}\`, \`for ${ctx.text(toNode)}\` or an aggregate; a protocol cannot name processes directly`)
          return null
        }
        return { k: 'send', message, args, to, span }
      }
    }
    return null
  }

  // ---- expressions --------------------------------------------------------------------------

  private intExpr(node: SyntaxNode | undefined, scope: Scope): Expr | null {
    if (!node) return null
    const t = this.expr(node, scope, INT)
    if (!t) return null
    if (t.sort.k !== 'int') {
      this.ctx.error(node, `expected an integer here, but this is ${sortName(t.sort)}; use an integer expression`)
      return null
    }
    return t.e
  }

  private boolExpr(node: SyntaxNode | undefined, scope: Scope, what: string): Expr | null {
    if (!node) return null
    const t = this.expr(node, scope, BOOL)
    if (!t) return null
    if (t.sort.k !== 'bool') {
      this.ctx.error(node, `${what} must be a boolean, but this is ${sortName(t.sort)}; compare it, as in \`x > 0\``)
      return null
    }
    return t.e
  }

  private expr(node: SyntaxNode | undefined, scope: Scope, expected?: Sort): Typed | null {
    if (!node) return null
    const { ctx } = this
    const span = ctx.span(node)
    switch (node.name) {
      case 'Number': {
        const read = integerLiteral(ctx.text(node))
        if ('problem' in read) { ctx.error(node, read.problem); return null }
        return { e: { k: 'lit', value: read.value, span }, sort: INT }
      }
      case 'Boolean': return { e: { k: 'lit', value: ctx.text(node) === 'true' ? 1 : 0, span }, sort: BOOL }
      case 'ParenExpression': return this.expr(expressionChildren(node)[0], scope, expected)
      case 'VarRef': return this.name(node, scope, expected)
      case 'IndexRef': {
        if (scope.constOnly) { ctx.error(node, `${scope.what} must be a constant expression, and \`${ctx.text(node)}\` is a variable; use constants and literals only`); return null }
        const name = ctx.text(node.getChild('Identifier')!)
        const index = indexByName(this.vars, name)
        if (index < 0) {
          if (this.names.get(name)?.what === 'variable') return null
          ctx.error(node.getChild('Identifier')!, `unknown variable \`${name}\`${didYouMean(name, namesOf(this.vars))}; declare it with \`state ${name}[peer]: TYPE = INIT\``)
          return null
        }
        const binder = this.peerIndex(node, scope, this.vars[index])
        if (binder === null) return null
        return { e: { k: 'entry', index, binder, span }, sort: sortOf(this.vars[index].type) }
      }
      case 'ProcNumber':
      case 'Member':
      case 'Pending':
        ctx.error(node, `\`${ctx.text(node)}\` speaks about processes from outside and belongs in a property; inside a protocol use own variables and \`x[q]\``)
        return null
      case 'Forall':
        ctx.error(node, '`forall` belongs in a property; inside a protocol use `every q: ...`')
        return null
      case 'CallExpression': {
        const fname = ctx.text(node.getChild('Identifier')!)
        const args = expressionChildren(node.getChild('ArgList')!)
        if (fname === 'min' || fname === 'max') {
          if (args.length !== 2) { ctx.error(node, `\`${fname}\` takes two integers, but ${args.length} ${args.length === 1 ? 'is' : 'are'} given; write \`${fname}(a, b)\``); return null }
          const l = this.intExpr(args[0], scope)
          const r = this.intExpr(args[1], scope)
          if (!l || !r) return null
          return { e: { k: fname, left: l, right: r, span }, sort: INT }
        }
        if (PROPERTY_CALLS.has(fname)) {
          ctx.error(node, `\`${fname}(...)\` is a property atom; a protocol cannot observe other processes' liveness, so use it in a property`)
          return null
        }
        ctx.error(node.getChild('Identifier')!, `unknown function \`${fname}\`${didYouMean(fname, ['min', 'max'])}; the functions are \`min\` and \`max\``)
        return null
      }
      case 'Negation':
      case 'BoundNegation': {
        const a = this.intExpr(expressionChildren(node)[0], scope)
        return a ? { e: { k: 'neg', arg: a, span }, sort: INT } : null
      }
      case 'PrefixExpression': {
        const op = ctx.text(node.firstChild!)
        if (op !== 'not') {
          ctx.error(node.firstChild!, `\`${op}\` is a temporal operator and belongs in a property; a protocol expression speaks of the current state only`)
          return null
        }
        const a = this.boolExpr(expressionChildren(node)[0], scope, 'the operand of `not`')
        return a ? { e: { k: 'not', arg: a, span }, sort: BOOL } : null
      }
      case 'BinaryExpression':
      case 'BoundArithmetic':
        return this.binaryExpr(node, scope, span)
      case 'IfExpression': {
        const [cn, an, bn] = expressionChildren(node)
        const c = this.boolExpr(cn, scope, 'the condition of `if ... then ... else`')
        const a = this.expr(an, scope, expected)
        const b = this.expr(bn, scope, a?.sort ?? expected)
        if (!c || !a || !b) return null
        if (!sameSort(a.sort, b.sort)) {
          ctx.error(node, `the two branches of this \`if\` are ${sortName(a.sort)} and ${sortName(b.sort)}; make them the same type`)
          return null
        }
        return { e: { k: 'ite', cond: c, then: a.e, else: b.e, span }, sort: a.sort }
      }
      case 'Aggregate': {
        if (scope.constOnly) { ctx.error(node, `${scope.what} must be a constant expression, and an aggregate is not; use constants and literals only`); return null }
        const op = ctx.text(node.firstChild!) as 'count' | 'some' | 'every'
        const id = node.getChild('Identifier')!
        const b = this.bindPeer(id, scope.binders)
        if (b === null) return null
        const inner: Scope = { ...scope, binders: new Map(scope.binders).set(ctx.text(id), b) }
        const body = this.boolExpr(expressionChildren(node)[0], inner, `the body of \`${op}\``)
        if (!body) return null
        return { e: { k: 'agg', op, binder: b, body, span }, sort: op === 'count' ? INT : BOOL }
      }
    }
    ctx.error(node, `\`${ctx.text(node)}\` is not an expression here; see the guide for what expressions may contain`)
    return null
  }

  /** A binary expression: arithmetic on integers, connectives on booleans, or a comparison. */
  private binaryExpr(node: SyntaxNode, scope: Scope, span: Span): Typed | null {
    const { ctx } = this
    const op = binaryOperator(node, ctx)
    const [ln, rn] = expressionChildren(node)
    if (TEMPORAL.has(op)) {
      ctx.error(node, `\`${op}\` is a temporal operator and belongs in a property; a protocol expression speaks of the current state only`)
      return null
    }
    if (ARITH.has(op)) {
      const l = this.intExpr(ln, scope)
      const r = this.intExpr(rn, scope)
      return l && r ? { e: { k: 'bin', op: op as BinOp, left: l, right: r, span }, sort: INT } : null
    }
    if (LOGIC.has(op)) {
      const l = this.boolExpr(ln, scope, `the left side of \`${op}\``)
      const r = this.boolExpr(rn, scope, `the right side of \`${op}\``)
      return l && r ? { e: { k: 'bin', op: op as BinOp, left: l, right: r, span }, sort: BOOL } : null
    }
    if (COMPARE.has(op)) {
      let l = this.expr(ln, scope)
      let r = this.expr(rn, scope, l?.sort)
      if (l && !r) return null
      if (!l) { r = r ?? null; return null }
      if (!r) return null
      const problem = comparisonProblem(op, l.sort, r.sort)
      if (problem) { ctx.error(node, problem); return null }
      return { e: { k: 'bin', op: op as BinOp, left: l.e, right: r.e, span }, sort: BOOL }
    }
    ctx.error(node, `unknown operator \`${op}\`; see the guide for the operators`)
    return null
  }

  private name(node: SyntaxNode, scope: Scope, expected?: Sort): Typed | null {
    const { ctx } = this
    const name = ctx.text(node)
    const span = ctx.span(node)
    const field = scope.fields.get(name)
    if (field && !scope.constOnly) return { e: { k: 'field', index: field.index, span }, sort: field.sort }
    if (scope.binders.has(name)) {
      ctx.error(node, `\`${name}\` names a peer, not a value; use it as an index, as in \`x[${name}]\``)
      return null
    }
    const c = indexByName(this.consts, name)
    if (c >= 0) {
      this.constUsed[c] = true
      return { e: { k: 'const', index: c, span }, sort: INT }
    }
    const v = indexByName(this.vars, name)
    if (v >= 0) {
      if (scope.constOnly) {
        ctx.error(node, `${scope.what} must be a constant expression, and \`${name}\` is a variable; use constants and literals only`)
        return null
      }
      if (this.vars[v].perPeer) {
        ctx.error(node, `\`${name}\` holds one value per peer; read an entry such as \`${name}[q]\` with q bound`)
        return null
      }
      return { e: { k: 'scalar', index: v, span }, sort: sortOf(this.vars[v].type) }
    }
    const sorts = this.labels.get(name)
    if (sorts) {
      // The expected enum, when it has this label, is the one meant (one lookup, however many
      // enums share the label).
      const sort = sorts.length === 1 ? sorts[0] : expected?.k === 'enum' && labelIndex(expected.labels, name) >= 0 ? expected : undefined
      if (!sort) {
        ctx.error(node, `the label \`${name}\` belongs to several enum types; compare it with a variable of the type you mean`)
        return null
      }
      return { e: { k: 'lit', value: labelIndex((sort as { labels: readonly string[] }).labels, name), span }, sort }
    }
    // A variable whose type was refused is declared without a type: its error says enough.
    if (this.names.get(name)?.what === 'variable') return null
    const candidates = namesOf(this.consts, this.vars, scope.fields.keys(), this.labels.keys())
    if (indexByName(this.messages, name) >= 0) {
      ctx.error(node, `\`${name}\` is a message, not a value; use \`pending(${name}, q -> p)\` in a property, or a variable here`)
      return null
    }
    ctx.error(node, `unknown name \`${name}\`${didYouMean(name, candidates)}; declare it as a constant or a state variable`)
    return null
  }
}
