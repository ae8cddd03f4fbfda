// From a `protocol` declaration's syntax tree to a resolved, type-checked `ProtocolModel`.
// Every error is reported with its notebook position; resolution goes on after an error so
// that independent mistakes are all reported, and a declaration that has a syntax error is
// skipped (its syntax error says enough).
import type { SyntaxNode } from '@lezer/common'
import { BlockContext, children, expressionChildren, hasError } from './context'
import type { Expr, FieldDecl, ProtocolModel, Timing, Type } from './model'
import { protocolProblems } from './bounds'
import { ConstantError, evalConstant, indexByName, internLabels, labelWork, sameSort, Sort, sortName, sortOf } from './sorts'
import { MAX_ENUM_LABELS } from './limits'
import { didYouMean } from './suggest'
import type { Scope } from './protocol-expressions'
import { StatementResolver } from './protocol-statements'

/** Resolves one protocol declaration. Returns null only when the declaration has no name. */
export function resolveProtocol(node: SyntaxNode, ctx: BlockContext): { model: ProtocolModel; broken: boolean } | null {
  return new ProtocolResolver(node, ctx).run()
}

/** A protocol declaration: its declarations read in order, then its handlers and step block (the layers below). */
class ProtocolResolver extends StatementResolver {
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

  protected declareName(node: SyntaxNode, what: string): boolean {
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

  protected constDecl(d: SyntaxNode): void {
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

  protected type(node: SyntaxNode, what: string): Type | null {
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

  protected messageDecl(d: SyntaxNode): void {
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

  protected stateDecl(d: SyntaxNode): void {
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

  protected initValue(d: SyntaxNode, name: string, type: Type): Expr | null {
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

  protected timingDecl(d: SyntaxNode): void {
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
}
