// Statements inside a protocol (handler and step bodies), resolved and typed against its
// declarations; expressions are resolved by the layer below (protocol-expressions.ts).
import type { SyntaxNode } from '@lezer/common'
import { children, expressionChildren, hasError } from './context'
import type { Expr, Handler, Stmt, Target } from './model'
import { indexByName, sameSort, Sort, sortName, sortOf } from './sorts'
import { didYouMean, namesOf } from './suggest'
import { ExpressionResolver, type Scope } from './protocol-expressions'

/** Handlers and the statements of their bodies and of the step block. */
export class StatementResolver extends ExpressionResolver {
  protected handler(d: SyntaxNode): void {
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

  protected block(node: SyntaxNode, scope: Scope): Stmt[] {
    const out: Stmt[] = []
    for (const s of children(node)) {
      if (s.name === '{' || s.name === '}' || s.type.isError || hasError(s)) continue
      const st = this.statement(s, scope)
      if (st) out.push(st)
    }
    return out
  }

  protected target(node: SyntaxNode, scope: Scope): { target: Target; sort: Sort } | null {
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

  protected statement(s: SyntaxNode, scope: Scope): Stmt | null {
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
}
