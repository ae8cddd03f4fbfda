// From a `property` declaration's syntax tree to a `PropertyModel` resolved against the protocol
// of a check. A property is declared once and may be checked against several protocols, so its
// atoms are resolved per check; an atom that a protocol cannot give meaning to is reported at the
// atom, naming the check.
import type { SyntaxNode } from '@lezer/common'
import { ARITH, BlockContext, binaryOperator, children, COMPARE, expressionChildren } from './context'
import type { Formula, ProcRef, PropertyModel, ProtocolModel, Span, Term } from './model'
import { BOOL, comparisonProblem, indexByName, INT, integerLiteral, labelIndex, sameSort, Sort, sortName, sortOf } from './sorts'
import { MAX_ATOMS } from './limits'
import { didYouMean, namesOf } from './suggest'

/** A declared property with the syntax it was written in, resolved later per check. */
export interface DeclaredProperty {
  name: string
  node: SyntaxNode
  ctx: BlockContext
  vars: string[]
  body: SyntaxNode | null
  span: Span
  source: string
}

/** Reads the name and quantifier of a property declaration; reports form errors of the quantifier. */
export function declareProperty(node: SyntaxNode, ctx: BlockContext): DeclaredProperty | null {
  const id = node.getChild('Identifier')
  if (!id) return null
  let [body] = expressionChildren(node)
  const vars: string[] = []
  if (body?.name === 'Forall') {
    const names = body.getChildren('Identifier')
    for (const n of names) {
      const v = ctx.text(n)
      if (vars.includes(v)) ctx.error(n, `\`${v}\` is quantified twice; name the processes differently, as in \`forall p, q: ...\``)
      vars.push(v)
    }
    if (vars.length > 2) {
      ctx.error(body, `property \`${ctx.text(id)}\` quantifies over ${vars.length} processes, but a property may name at most two; split it into properties over one or two processes`)
    }
    body = expressionChildren(body)[0]
  }
  const source = ctx.text(node).replace(/\s+/g, ' ').trim()
  return { name: ctx.text(id), node, ctx, vars, body: body ?? null, span: ctx.span(id), source }
}

interface Typed { t: Term; sort: Sort }

/** Resolves a declared property against a protocol; null when it has errors (reported). */
export function resolveProperty(decl: DeclaredProperty, protocol: ProtocolModel, checkLine: number): PropertyModel | null {
  if (!decl.body || decl.vars.length > 2) return null
  const r = new PropertyResolver(decl, protocol, checkLine)
  const formula = r.formula(decl.body)
  if (!formula || r.failed) return null
  // The runner numbers the atoms as atomsOf does (each atom term once); the product keeps a row of
  // them per state, so their number is capped (README, Limits).
  const atoms = new Set<Term>()
  const count = (f: Formula): void => {
    if (f.k === 'atom') atoms.add(f.term)
    else if ('arg' in f) count(f.arg)
    else if ('left' in f) { count(f.left); count(f.right) }
  }
  count(formula)
  if (atoms.size > MAX_ATOMS) {
    decl.ctx.error(decl.body, `property \`${decl.name}\` has ${atoms.size} atoms (conditions on the state), more than the ${MAX_ATOMS} a property may have; split it into several properties`)
    return null
  }
  return {
    name: decl.name,
    vars: decl.vars,
    formula,
    maxFixed: r.maxFixed,
    aggregates: [],
    span: decl.span,
    block: decl.ctx.block,
    source: decl.source,
  }
}

const FORMULA_BINARY = new Set(['and', 'or', 'implies', 'iff', 'until', 'unless'])

class PropertyResolver {
  failed = false
  maxFixed = 0
  private readonly ctx: BlockContext

  constructor(private readonly decl: DeclaredProperty, private readonly protocol: ProtocolModel, private readonly checkLine: number) {
    this.ctx = decl.ctx
  }

  private error(node: SyntaxNode, message: string): null {
    this.failed = true
    this.ctx.error(node, message)
    return null
  }

  /** "... (checked with protocol `x` at line N)" tail for messages that depend on the protocol. */
  private get against(): string {
    return `protocol \`${this.protocol.name}\` (checked at line ${this.checkLine})`
  }

  formula(node: SyntaxNode): Formula | null {
    const { ctx } = this
    const span = ctx.span(node)
    switch (node.name) {
      case 'ParenExpression': return this.formula(expressionChildren(node)[0])
      case 'Boolean': return { k: ctx.text(node) === 'true' ? 'true' : 'false', span }
      case 'PrefixExpression': {
        const op = ctx.text(node.firstChild!) as 'not' | 'always' | 'eventually' | 'next'
        const arg = this.formula(expressionChildren(node)[0])
        return arg ? { k: op, arg, span } : null
      }
      case 'BinaryExpression': {
        const op = binaryOperator(node, ctx)
        if (FORMULA_BINARY.has(op)) {
          const [ln, rn] = expressionChildren(node)
          const l = this.formula(ln)
          const r = this.formula(rn)
          return l && r ? { k: op as 'and', left: l, right: r, span } : null
        }
        if (COMPARE.has(op)) {
          const t = this.term(node)
          return t ? { k: 'atom', term: t.t, span } : null
        }
        return this.error(node, `\`${ctx.text(node)}\` is an integer, not a condition; compare it, as in \`p.x > 0\``)
      }
      case 'CallExpression': {
        const fname = ctx.text(node.getChild('Identifier')!)
        if (fname === 'correct' || fname === 'faulty') {
          const proc = this.callProc(node, fname)
          if (!proc) return null
          // Sugar from the language: correct(p) = always alive(p), faulty(p) = eventually crashed(p).
          const atom: Formula = { k: 'atom', term: { k: fname === 'correct' ? 'alive' : 'crashed', proc, span }, span }
          return { k: fname === 'correct' ? 'always' : 'eventually', arg: atom, span }
        }
        const t = this.term(node)
        if (!t) return null
        if (t.sort.k !== 'bool') return this.error(node, `\`${ctx.text(node)}\` is an integer, not a condition; compare it, as in \`${ctx.text(node)} > 0\``)
        return { k: 'atom', term: t.t, span }
      }
      case 'Member':
      case 'Pending': {
        const t = this.term(node)
        if (!t) return null
        if (t.sort.k !== 'bool') return this.error(node, `\`${ctx.text(node)}\` is ${sortName(t.sort)}, not a condition; compare it, as in \`${ctx.text(node)} = ...\``)
        return { k: 'atom', term: t.t, span }
      }
      case 'Forall':
        return this.error(node, '`forall` may only stand at the start of a property; move the quantifier to the front')
      case 'Aggregate':
        return this.error(node, 'aggregates (`count`, `some`, `every`) are not allowed in properties, because an atom may speak of one or two processes only; quantify with `forall` instead')
      case 'IfExpression':
        return this.error(node, '`if ... then ... else` is not allowed in properties; write the condition with `implies`, `and` and `or`')
      case 'IndexRef':
        return this.error(node, `\`${ctx.text(node)}\` does not say whose variable it is; write it as \`p.${ctx.text(node)}\``)
      case 'VarRef': {
        const name = ctx.text(node)
        if (this.decl.vars.includes(name)) return this.error(node, `\`${name}\` is a process, not a condition; write an atom such as \`alive(${name})\` or \`${name}.x\``)
        if (this.protocol.vars.some((v) => v.name === name)) return this.error(node, `\`${name}\` does not say whose variable it is; write it as \`p.${name}\``)
        return this.error(node, `\`${name}\` is not a condition; write an atom such as \`p.x\`, \`alive(p)\` or a comparison`)
      }
    }
    return this.error(node, `\`${ctx.text(node)}\` is not a condition; write an atom such as \`p.x\`, \`alive(p)\` or a comparison`)
  }

  private proc(node: SyntaxNode): ProcRef | null {
    const { ctx } = this
    const span = ctx.span(node)
    const text = ctx.text(node)
    if (node.name === 'ProcNumber') {
      const n = Number(text.slice(1))
      if (n < 1 || !Number.isSafeInteger(n)) return this.error(node, `processes are numbered from #1; write \`#1\`, \`#2\`, ...`)
      this.maxFixed = Math.max(this.maxFixed, n)
      return { k: 'fixed', n, span }
    }
    const index = this.decl.vars.indexOf(text)
    if (index < 0) {
      const hint = this.decl.vars.length ? didYouMean(text, this.decl.vars) : ''
      return this.error(node, `\`${text}\` is not a process of property \`${this.decl.name}\`${hint}; quantify it with \`forall ${this.decl.vars.length ? [...this.decl.vars, text].join(', ') : text}: ...\` or write \`#1\``)
    }
    return { k: 'var', index, span }
  }

  private callProc(node: SyntaxNode, fname: string): ProcRef | null {
    const args = node.getChild('ArgList') ? expressionChildren(node.getChild('ArgList')!) : []
    if (args.length !== 1 || (args[0].name !== 'VarRef' && args[0].name !== 'ProcNumber')) {
      return this.error(node, `\`${fname}\` takes one process, as in \`${fname}(p)\``)
    }
    return this.proc(args[0].name === 'VarRef' ? args[0].firstChild! : args[0])
  }

  private sameProcess(a: ProcRef, b: ProcRef): boolean {
    return a.k === b.k && (a.k === 'var' ? a.index === (b as typeof a).index : a.n === (b as { n: number }).n)
  }

  term(node: SyntaxNode, expected?: Sort): Typed | null {
    const { ctx } = this
    const span = ctx.span(node)
    const text = ctx.text(node)
    switch (node.name) {
      case 'Number': {
        const read = integerLiteral(text)
        if ('problem' in read) return this.error(node, read.problem)
        return { t: { k: 'lit', value: read.value, span }, sort: INT }
      }
      case 'Boolean': return { t: { k: 'lit', value: text === 'true' ? 1 : 0, span }, sort: BOOL }
      case 'ParenExpression': return this.term(expressionChildren(node)[0], expected)
      case 'Negation': {
        const a = this.intTerm(expressionChildren(node)[0])
        return a ? { t: { k: 'neg', arg: a, span }, sort: INT } : null
      }
      case 'VarRef': {
        const c = indexByName(this.protocol.consts, text)
        if (c >= 0) return { t: { k: 'const', index: c, span }, sort: INT }
        const enums = enumSortsOf(this.protocol).get(text) ?? []
        if (enums.length > 0) {
          const sort = expected?.k === 'enum' && labelIndex(expected.labels, text) >= 0 ? expected : enums[0]
          return { t: { k: 'lit', value: labelIndex((sort as { labels: readonly string[] }).labels, text), span }, sort }
        }
        if (this.decl.vars.includes(text)) return this.error(node, `\`${text}\` is a process, not a value; write one of its variables, as in \`${text}.x\``)
        if (this.protocol.vars.some((v) => v.name === text)) return this.error(node, `\`${text}\` does not say whose variable it is; write it as \`p.${text}\``)
        return this.error(node, `unknown name \`${text}\` in property \`${this.decl.name}\`${didYouMean(text, namesOf(this.protocol.consts))}, for ${this.against}; use a constant, a label or \`p.x\``)
      }
      case 'Member': {
        const parts = children(node).filter((c) => c.name === 'Identifier' || c.name === 'ProcNumber')
        const proc = this.proc(parts[0])
        const vname = ctx.text(parts[1])
        const index = indexByName(this.protocol.vars, vname)
        if (!proc) return null
        if (index < 0) {
          return this.error(parts[1], `${this.against} has no variable \`${vname}\`${didYouMean(vname, namesOf(this.protocol.vars))}; property \`${this.decl.name}\` can only mention its state variables`)
        }
        const v = this.protocol.vars[index]
        const peerNode = parts[2]
        if (v.perPeer && !peerNode) return this.error(node, `\`${vname}\` holds one value per peer; write \`${text}[q]\` for the entry about process q`)
        if (!v.perPeer && peerNode) return this.error(node, `\`${vname}\` holds a single value, not one per peer; write \`${ctx.text(parts[0])}.${vname}\``)
        let peer: ProcRef | null = null
        if (peerNode) {
          peer = this.proc(peerNode)
          if (!peer) return null
          if (this.sameProcess(peer, proc)) return this.error(peerNode, `a process has no entry about itself; index \`${vname}\` with another process`)
        }
        return { t: { k: 'member', proc, index, peer, span }, sort: sortOf(v.type) }
      }
      case 'Pending': {
        const ids = children(node).filter((c) => c.name === 'Identifier' || c.name === 'ProcNumber')
        const mname = ctx.text(ids[0])
        const message = indexByName(this.protocol.messages, mname)
        if (message < 0) return this.error(ids[0], `${this.against} has no message \`${mname}\`${didYouMean(mname, namesOf(this.protocol.messages))}; name one of its messages`)
        const from = this.proc(ids[1])
        const to = this.proc(ids[2])
        if (!from || !to) return null
        if (this.sameProcess(from, to)) return this.error(node, 'a channel joins two different processes; write `pending(MSG, q -> p)` with q and p distinct')
        return { t: { k: 'pending', message, from, to, span }, sort: BOOL }
      }
      case 'CallExpression': {
        const fname = ctx.text(node.getChild('Identifier')!)
        if (fname === 'alive' || fname === 'crashed') {
          const proc = this.callProc(node, fname)
          return proc ? { t: { k: fname, proc, span }, sort: BOOL } : null
        }
        if (fname === 'min' || fname === 'max') {
          const args = expressionChildren(node.getChild('ArgList')!)
          if (args.length !== 2) return this.error(node, `\`${fname}\` takes two integers; write \`${fname}(a, b)\``)
          const l = this.intTerm(args[0])
          const r = this.intTerm(args[1])
          return l && r ? { t: { k: fname, left: l, right: r, span }, sort: INT } : null
        }
        if (fname === 'correct' || fname === 'faulty') return this.error(node, `\`${fname}(...)\` is a temporal condition and cannot be compared; use it on its own`)
        return this.error(node.getChild('Identifier')!, `unknown atom \`${fname}\`${didYouMean(fname, ['alive', 'crashed', 'correct', 'faulty', 'min', 'max'])}; the atoms are \`alive\`, \`crashed\`, \`correct\`, \`faulty\` and \`pending\``)
      }
      case 'BinaryExpression': {
        const op = binaryOperator(node, ctx)
        const [ln, rn] = expressionChildren(node)
        if (ARITH.has(op)) {
          const l = this.intTerm(ln)
          const r = this.intTerm(rn)
          return l && r ? { t: { k: 'bin', op: op as '+', left: l, right: r, span }, sort: INT } : null
        }
        if (COMPARE.has(op)) {
          const l = this.term(ln)
          const r = this.term(rn, l?.sort)
          if (!l || !r) return null
          const problem = comparisonProblem(op, l.sort, r.sort)
          if (problem) return this.error(node, problem)
          return { t: { k: 'bin', op: op as '=', left: l.t, right: r.t, span }, sort: BOOL }
        }
        return this.error(node, `\`${op}\` joins conditions and cannot stand inside a comparison; add parentheses around the comparisons`)
      }
      case 'Aggregate':
        return this.error(node, 'aggregates (`count`, `some`, `every`) are not allowed in properties, because an atom may speak of one or two processes only; quantify with `forall` instead')
      case 'IfExpression':
        return this.error(node, '`if ... then ... else` is not allowed in properties; write the condition with `implies`, `and` and `or`')
    }
    return this.error(node, `\`${text}\` cannot be compared here; compare process variables, constants and numbers`)
  }

  private intTerm(node: SyntaxNode | undefined): Term | null {
    if (!node) return null
    const t = this.term(node, INT)
    if (!t) return null
    if (t.sort.k !== 'int') return this.error(node, `expected an integer here, but \`${this.ctx.text(node)}\` is ${sortName(t.sort)}`)
    return t.t
  }
}

const enumSorts = new WeakMap<ProtocolModel, Map<string, Sort[]>>()

/**
 * The enum sorts of a protocol by label: every enum type of its variables, then of its message
 * fields, each distinct enum once, in that order (built once per protocol, so a label costs one
 * lookup however many variables there are).
 */
function enumSortsOf(protocol: ProtocolModel): Map<string, Sort[]> {
  let map = enumSorts.get(protocol)
  if (map) return map
  map = new Map()
  const seen = new Set<readonly string[]>()
  const types = protocol.vars.map((v) => v.type).concat(protocol.messages.flatMap((m) => m.fields.map((f) => f.type)))
  for (const t of types) {
    if (t.k !== 'enum' || seen.has(t.labels)) continue
    seen.add(t.labels)
    const sort = sortOf(t)
    for (const l of t.labels) {
      const list = map.get(l)
      // Distinct arrays are distinct enums: the checker interns equal ones.
      if (!list) map.set(l, [sort])
      else list.push(sort)
    }
  }
  enumSorts.set(protocol, map)
  return map
}
