// The formula printer: one precedence table, one operator table and one name rule for every place
// a property formula is shown, as plain text or as TeX. It prints a `Shown` tree, which comes from
// either of two places:
// - the parsed property (`showSyntax`, over the Lezer tree of the one grammar): the workbench
//   typesets a property block from it as the author types, before any check resolves it, keeping
//   the parentheses the author wrote;
// - a resolved formula (`showFormula`, over language/model.ts): the cutoff statement prints the
//   quantified and the instantiated form from it, with parentheses where the precedence table of
//   language.md needs them and enum labels printed back.
//
// TeX safety: the TeX holds only fixed macros, digits and names; every name is reduced to
// [A-Za-z0-9_] and printed as \mathit{...} with `_` escaped (single letters stay bare). A syntax
// tree with an error, or a construct that is not a property formula, prints as nothing (null).
import type { SyntaxNode } from '@lezer/common'
import type { Formula, ProcRef, ProtocolModel, Term } from './model'
import { parseBlock } from './syntax'

/** A binary operator of the property language (connectives, temporal operators, comparisons, arithmetic). */
export type ShownOp =
  | 'iff' | 'implies' | 'or' | 'and' | 'until' | 'unless'
  | '=' | '!=' | '<' | '<=' | '>' | '>=' | '+' | '-' | '*' | '/' | '%'

/** A formula as the printer reads it. Parentheses are explicit (`paren`); the printer adds none. */
export type Shown =
  | { k: 'number'; value: number }
  | { k: 'word'; word: 'true' | 'false' }
  | { k: 'name'; name: string }
  | { k: 'fixed'; n: number }
  | { k: 'member'; of: Shown; field: string; peer: Shown | null }
  | { k: 'call'; fn: string; args: Shown[] }
  | { k: 'pending'; message: string; from: Shown; to: Shown }
  | { k: 'neg'; arg: Shown }
  | { k: 'prefix'; op: 'not' | 'always' | 'eventually' | 'next'; arg: Shown }
  | { k: 'bin'; op: ShownOp; left: Shown; right: Shown }
  | { k: 'binder'; q: 'forall' | 'some' | 'every' | 'count'; vars: string[]; body: Shown }
  | { k: 'paren'; inner: Shown }

/** How the printer writes: plain text in the notebook's own spelling, or TeX. */
export type PrintStyle = 'text' | 'tex'

/** A notebook name as TeX. */
export function texName(name: string): string {
  const clean = name.replace(/[^A-Za-z0-9_]/g, '') || 'x'
  if (/^[A-Za-z]$/.test(clean)) return clean
  return `\\mathit{${clean.replace(/_/g, '\\_')}}`
}

const TEX_OPS: Record<ShownOp | 'not' | 'always' | 'eventually' | 'next', string> = {
  iff: '\\leftrightarrow', implies: '\\rightarrow', or: '\\vee', and: '\\wedge',
  until: '\\mathbin{\\mathcal{U}}', unless: '\\mathbin{\\mathcal{W}}',
  not: '\\neg', always: '\\Box', eventually: '\\Diamond', next: '\\bigcirc',
  '=': '=', '!=': '\\neq', '<': '<', '<=': '\\leq', '>': '>', '>=': '\\geq',
  '+': '+', '-': '-', '*': '\\cdot', '/': '/', '%': '\\bmod',
}

const TEX_BINDERS = { forall: '\\forall', some: '\\exists', every: '\\forall', count: '\\#' }

/** A function name as TeX: the known ones as operators, others upright. */
function texFunction(fn: string): string {
  if (fn === 'min' || fn === 'max') return `\\${fn}`
  const clean = fn.replace(/[^A-Za-z0-9_]/g, '') || 'f'
  return `\\mathrm{${clean.replace(/_/g, '\\_')}}`
}

/** Prints a shown formula as plain text (the notebook's spelling, on one line) or as TeX. */
export function printShown(s: Shown, style: PrintStyle): string {
  const tex = style === 'tex'
  const p = (x: Shown) => printShown(x, style)
  const name = (n: string) => (tex ? texName(n) : n)
  switch (s.k) {
    case 'number': return s.value < 0 ? `-${-s.value}` : String(s.value)
    case 'word': return tex ? `\\mathrm{${s.word}}` : s.word
    case 'name': return name(s.name)
    case 'fixed': return tex ? `\\#${s.n}` : `#${s.n}`
    case 'member': return `${p(s.of)}.${name(s.field)}${s.peer ? `[${p(s.peer)}]` : ''}`
    case 'call': return `${tex ? texFunction(s.fn) : s.fn}(${s.args.map(p).join(', ')})`
    case 'pending': return `${tex ? '\\mathrm{pending}' : 'pending'}(${name(s.message)}, ${p(s.from)} ${tex ? '\\to' : '->'} ${p(s.to)})`
    case 'neg': return `-${p(s.arg)}`
    case 'prefix': return `${tex ? TEX_OPS[s.op] : s.op} ${p(s.arg)}`
    case 'bin': return `${p(s.left)} ${tex ? TEX_OPS[s.op] : s.op} ${p(s.right)}`
    case 'paren': return `(${p(s.inner)})`
    case 'binder': {
      if (!tex) return `${s.q} ${s.vars.join(', ')}: ${p(s.body)}`
      const bound = s.q === 'forall' ? s.vars.map(texName).join(' \\neq ') : s.vars.map(texName).join(', ')
      return `${TEX_BINDERS[s.q]} ${bound}.\\; ${p(s.body)}`
    }
  }
}

// ---- from the parsed property -----------------------------------------------------------------

/** Raised inside `showSyntax` for a node that is not part of a property formula. */
class NotAFormula extends Error {}

const BIN_WORDS = new Set(['iff', 'implies', 'or', 'and', 'until', 'unless', '+', '-', '*', '/', '%'])
const COMPARE = new Set(['=', '!=', '<', '<=', '>', '>='])

/** The children of a node, comments left out (they may sit between any two tokens). */
function kids(node: SyntaxNode): SyntaxNode[] {
  const out: SyntaxNode[] = []
  for (let c = node.firstChild; c; c = c.nextSibling) if (c.name !== 'LineComment') out.push(c)
  return out
}

class SyntaxReader {
  constructor(private readonly text: string) {}

  private src(n: SyntaxNode): string { return this.text.slice(n.from, n.to) }

  private proc(n: SyntaxNode): Shown {
    if (n.name === 'ProcNumber') return { k: 'fixed', n: Number(this.src(n).slice(1)) }
    if (n.name === 'Identifier') return { k: 'name', name: this.src(n) }
    if (n.name === 'VarRef') return this.proc(n.firstChild!)
    throw new NotAFormula(n.name)
  }

  /** The expression children of a node (names, keywords and punctuation left out). */
  private operands(n: SyntaxNode): SyntaxNode[] {
    return kids(n).filter((c) => c.name !== 'Identifier' && c.name !== 'CompareOp' && /^[A-Z]/.test(c.name))
  }

  read(n: SyntaxNode): Shown {
    if (n.type.isError) throw new NotAFormula('error')
    const c = kids(n)
    switch (n.name) {
      case 'Number': return { k: 'number', value: Number(this.src(n)) }
      case 'Boolean': return { k: 'word', word: this.src(n) === 'true' ? 'true' : 'false' }
      case 'VarRef': return { k: 'name', name: this.src(n) }
      case 'ProcNumber': return this.proc(n)
      case 'ParenExpression': return { k: 'paren', inner: this.only(n) }
      case 'Negation': return { k: 'neg', arg: this.only(n) }
      case 'PrefixExpression': return { k: 'prefix', op: c[0].name as 'not', arg: this.only(n) }
      case 'Member': {
        const [of, , field, open, peer] = c
        if (!field || field.name !== 'Identifier') throw new NotAFormula('member')
        return { k: 'member', of: this.proc(of), field: this.src(field), peer: open ? this.proc(peer) : null }
      }
      case 'Pending': {
        const parts = c.filter((x) => x.name === 'Identifier' || x.name === 'ProcNumber')
        if (parts.length !== 3 || parts[0].name !== 'Identifier') throw new NotAFormula('pending')
        return { k: 'pending', message: this.src(parts[0]), from: this.proc(parts[1]), to: this.proc(parts[2]) }
      }
      case 'CallExpression': {
        const args = c[1] ? this.operands(c[1]) : []
        const fn = this.src(c[0])
        return { k: 'call', fn, args: args.map((a) => (fn === 'min' || fn === 'max' ? this.read(a) : this.proc(a))) }
      }
      case 'BinaryExpression': {
        const [left, op, right] = c
        const word = op.name === 'CompareOp' ? this.src(op) : op.name
        if (!right || !(BIN_WORDS.has(word) || COMPARE.has(word))) throw new NotAFormula('binary')
        return { k: 'bin', op: word as ShownOp, left: this.read(left), right: this.read(right) }
      }
      case 'Forall':
      case 'Aggregate': {
        const q = c[0].name as 'forall'
        const vars = c.filter((x) => x.name === 'Identifier').map((x) => this.src(x))
        return { k: 'binder', q, vars, body: this.only(n) }
      }
      default: throw new NotAFormula(n.name)
    }
  }

  private only(n: SyntaxNode): Shown {
    const ops = this.operands(n)
    if (ops.length !== 1) throw new NotAFormula(n.name)
    return this.read(ops[0])
  }
}

function hasError(n: SyntaxNode): boolean {
  let bad = false
  n.toTree().iterate({ enter: (x) => { if (x.type.isError) bad = true; return !bad } })
  return bad
}

/** The shown form of a formula node of `text`'s syntax tree, or null when it is not a clean formula. */
export function showSyntax(node: SyntaxNode, text: string): Shown | null {
  if (hasError(node)) return null
  try {
    return new SyntaxReader(text).read(node)
  } catch (e) {
    if (e instanceof NotAFormula) return null
    throw e
  }
}

/** One `property NAME = FORMULA` declaration of a property block, printed both ways. */
export interface PrintedProperty {
  name: string
  /** 0-based line of the declaration within the block. */
  line: number
  /** The formula on one line in the notebook's spelling, or null when it does not read as a formula. */
  text: string | null
  /** The formula as TeX, or null when it does not read as a formula (the kernel's diagnostics say why). */
  tex: string | null
}

/**
 * Every property declaration of a property block's text, printed as text and TeX from its parse. A
 * declaration with a syntax error anywhere before the next declaration prints as null.
 */
export function printProperties(blockText: string): PrintedProperty[] {
  const tree = parseBlock(blockText)
  const errors: number[] = []
  tree.iterate({ enter: (x) => { if (x.type.isError) errors.push(x.from) } })
  const decls: SyntaxNode[] = []
  for (let d = tree.topNode.firstChild; d; d = d.nextSibling) if (d.name === 'PropertyDecl') decls.push(d)
  const out: PrintedProperty[] = []
  decls.forEach((d, i) => {
    const id = d.getChild('Identifier')
    if (!id) return
    const end = decls[i + 1]?.from ?? blockText.length + 1
    const body = kids(d).find((c) => c.from >= id.to && c.name !== '=' && c.name !== 'Identifier') ?? null
    const clean = !errors.some((e) => e >= d.from && e < end)
    const shown = body && clean ? showSyntax(body, blockText) : null
    const line = blockText.slice(0, d.from).split(/\r\n?|\n/).length - 1
    out.push({ name: blockText.slice(id.from, id.to), line, text: shown && printShown(shown, 'text'), tex: shown && printShown(shown, 'tex') })
  })
  return out
}

/** One formula (the text after `property NAME =`) printed as text and TeX, or null when it does not parse. */
export function printFormula(src: string): { text: string; tex: string } | null {
  const head = 'property x = '
  const printed = printProperties(head + src)
  if (printed.length !== 1 || printed[0].tex === null) return null
  return { text: printed[0].text!, tex: printed[0].tex }
}

// ---- from a resolved formula --------------------------------------------------------------------

// Binding strength, loosest first (language.md): iff, implies, or, and, until/unless, prefix,
// then terms: comparison, + -, * / %, primaries.
const IFF = 1
const IMPLIES = 2
const OR = 3
const AND = 4
const UNTIL = 5
const PREFIX = 6
const CMP = 7
const ADD = 8
const MUL = 9
const PRIMARY = 10

function wrap(s: Shown, level: number, min: number): Shown {
  return level >= min ? s : { k: 'paren', inner: s }
}

class FormulaReader {
  constructor(private readonly p: ProtocolModel, private readonly proc: (r: ProcRef) => Shown) {}

  formula(f: Formula, min = IFF): Shown {
    switch (f.k) {
      case 'true':
      case 'false':
        return { k: 'word', word: f.k }
      case 'atom':
        return this.term(f.term, CMP)
      case 'not':
      case 'always':
      case 'eventually':
      case 'next': {
        // `correct(p)` and `faulty(p)` arrive expanded; the sugar shares its span with its atom.
        if ((f.k === 'always' || f.k === 'eventually') && f.arg.k === 'atom' && f.arg.span.from === f.span.from && f.arg.span.to === f.span.to) {
          const t = f.arg.term
          if ((f.k === 'always' && t.k === 'alive') || (f.k === 'eventually' && t.k === 'crashed'))
            return { k: 'call', fn: f.k === 'always' ? 'correct' : 'faulty', args: [this.proc(t.proc)] }
        }
        return wrap({ k: 'prefix', op: f.k, arg: this.formula(f.arg, PREFIX) }, PREFIX, min)
      }
      case 'and':
      case 'or':
      case 'iff': {
        const level = f.k === 'and' ? AND : f.k === 'or' ? OR : IFF
        return wrap({ k: 'bin', op: f.k, left: this.formula(f.left, level), right: this.formula(f.right, level + 1) }, level, min)
      }
      case 'implies':
      case 'until':
      case 'unless': {
        const level = f.k === 'implies' ? IMPLIES : UNTIL
        return wrap({ k: 'bin', op: f.k, left: this.formula(f.left, level + 1), right: this.formula(f.right, level) }, level, min)
      }
    }
  }

  /** Enum labels come resolved to indices; a comparison with an enum variable prints the label back. */
  private enumLabels(t: Term): string[] | null {
    if (t.k !== 'member') return null
    const type = this.p.vars[t.index].type
    return type.k === 'enum' ? type.labels : null
  }

  term(t: Term, min = CMP, labels: string[] | null = null): Shown {
    switch (t.k) {
      case 'lit':
        if (labels && labels[t.value] !== undefined) return { k: 'name', name: labels[t.value] }
        return t.value < 0 ? wrap({ k: 'number', value: t.value }, ADD, min + 1) : { k: 'number', value: t.value }
      case 'const':
        return { k: 'name', name: this.p.consts[t.index]?.name ?? 'c' }
      case 'member':
        return { k: 'member', of: this.proc(t.proc), field: this.p.vars[t.index].name, peer: t.peer ? this.proc(t.peer) : null }
      case 'alive':
      case 'crashed':
        return { k: 'call', fn: t.k, args: [this.proc(t.proc)] }
      case 'pending':
        return { k: 'pending', message: this.p.messages[t.message]?.name ?? 'm', from: this.proc(t.from), to: this.proc(t.to) }
      case 'neg':
        return wrap({ k: 'neg', arg: this.term(t.arg, PRIMARY) }, PRIMARY, min)
      case 'min':
      case 'max':
        return { k: 'call', fn: t.k, args: [this.term(t.left, ADD), this.term(t.right, ADD)] }
      case 'bin': {
        if (t.op === '=' || t.op === '!=' || t.op === '<' || t.op === '<=' || t.op === '>' || t.op === '>=') {
          const labels = this.enumLabels(t.left) ?? this.enumLabels(t.right)
          return wrap({ k: 'bin', op: t.op, left: this.term(t.left, ADD, labels), right: this.term(t.right, ADD, labels) }, CMP, min)
        }
        const level = t.op === '+' || t.op === '-' ? ADD : MUL
        return wrap({ k: 'bin', op: t.op, left: this.term(t.left, level), right: this.term(t.right, level + 1) }, level, min)
      }
    }
  }
}

/**
 * The shown form of a resolved formula of `protocol`, with parentheses where the precedence table
 * needs them; `proc` says how a process reference reads (a variable's name, or a fixed process).
 */
export function showFormula(protocol: ProtocolModel, formula: Formula, proc: (r: ProcRef) => Shown): Shown {
  return new FormulaReader(protocol, proc).formula(formula)
}
