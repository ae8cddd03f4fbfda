// Expressions inside a protocol, resolved and typed against what the protocol has declared so far
// (the state the declaration and statement layers fill in: protocol.ts, protocol-statements.ts).
// Every error is reported with its notebook position, and resolution goes on after it.
import type { SyntaxNode } from '@lezer/common'
import { ARITH, BlockContext, binaryOperator, COMPARE, children, expressionChildren } from './context'
import type { Binder, BinOp, ConstDecl, Expr, Handler, MessageDecl, Span, Stmt, Timing, VarDecl } from './model'
import { BOOL, comparisonProblem, indexByName, INT, integerLiteral, labelIndex, sameSort, Sort, sortName, sortOf } from './sorts'
import { didYouMean, namesOf } from './suggest'

export interface Typed { e: Expr; sort: Sort }

export interface Scope {
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

/**
 * What a protocol declares (filled in by the declaration and statement layers), the peer
 * binders, and the resolution of expressions against them.
 */
export class ExpressionResolver {
  protected consts: ConstDecl[] = []
  protected constValues: number[] = []
  protected constUsed: boolean[] = []
  protected messages: MessageDecl[] = []
  protected messageSent: boolean[] = []
  protected vars: VarDecl[] = []
  protected handlers: Handler[] = []
  protected handlerOf = new Map<number, Handler>()
  protected step: Stmt[] = []
  protected binders: Binder[] = []
  protected timing: Timing | null = null
  protected faults: 'none' | 'crash' = 'none'
  protected broken = false
  /** Each label's enum sorts, one per distinct enum (so lists stay short and shared). */
  protected labels = new Map<string, Sort[]>()
  protected enumPool = new Map<string, readonly string[]>()
  protected names = new Map<string, { what: string; span: Span }>()

  constructor(protected readonly node: SyntaxNode, protected readonly ctx: BlockContext) {}

  protected bindPeer(node: SyntaxNode, bound: Map<string, number>): number | null {
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

  /** The binder of `x[q]`, checking that x is per-peer and q is bound. */
  protected peerIndex(node: SyntaxNode, scope: Scope, v: VarDecl): number | null {
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

  protected intExpr(node: SyntaxNode | undefined, scope: Scope): Expr | null {
    if (!node) return null
    const t = this.expr(node, scope, INT)
    if (!t) return null
    if (t.sort.k !== 'int') {
      this.ctx.error(node, `expected an integer here, but this is ${sortName(t.sort)}; use an integer expression`)
      return null
    }
    return t.e
  }

  protected boolExpr(node: SyntaxNode | undefined, scope: Scope, what: string): Expr | null {
    if (!node) return null
    const t = this.expr(node, scope, BOOL)
    if (!t) return null
    if (t.sort.k !== 'bool') {
      this.ctx.error(node, `${what} must be a boolean, but this is ${sortName(t.sort)}; compare it, as in \`x > 0\``)
      return null
    }
    return t.e
  }

  protected expr(node: SyntaxNode | undefined, scope: Scope, expected?: Sort): Typed | null {
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
  protected binaryExpr(node: SyntaxNode, scope: Scope, span: Span): Typed | null {
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

  protected name(node: SyntaxNode, scope: Scope, expected?: Sort): Typed | null {
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
