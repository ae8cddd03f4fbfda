// The theorem instance a cutoff stands for, as plain text and as TeX: "for every N >= 2:
// G_N |= forall p != q. phi(p, q)  iff  G_2 |= phi(1, 2)". The formula is printed from the resolved
// model (not from the source text), with the precedence table of language.md deciding parentheses,
// so the quantified form and the instantiated form (processes `#1`, `#2`) come from one printer.
//
// TeX safety: the TeX holds only fixed macros, digits and names; every name taken from the notebook
// is reduced to [A-Za-z0-9_], printed as \mathit{...} with `_` escaped (single letters stay bare).
import type { Formula, ProcRef, PropertyModel, ProtocolModel, Term } from '../language/model'

/** Formulas printed longer than this are named instead (`settles(p, q)`). */
const SHORT = 56

/** A notebook name as TeX. */
export function texName(name: string): string {
  const clean = name.replace(/[^A-Za-z0-9_]/g, '') || 'x'
  if (/^[A-Za-z]$/.test(clean)) return clean
  return `\\mathit{${clean.replace(/_/g, '\\_')}}`
}

interface Style {
  tex: boolean
  /** How a process reference prints: a variable name or a fixed process. */
  proc: (r: ProcRef) => string
}

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

const PLAIN_OPS: Record<string, string> = {
  iff: 'iff', implies: 'implies', or: 'or', and: 'and', until: 'until', unless: 'unless',
  not: 'not', always: 'always', eventually: 'eventually', next: 'next',
}
const TEX_OPS: Record<string, string> = {
  iff: '\\leftrightarrow', implies: '\\rightarrow', or: '\\vee', and: '\\wedge',
  until: '\\mathbin{\\mathcal{U}}', unless: '\\mathbin{\\mathcal{W}}',
  not: '\\neg', always: '\\Box', eventually: '\\Diamond', next: '\\bigcirc',
}
const TEX_TERM_OPS: Record<string, string> = {
  '=': '=', '!=': '\\neq', '<': '<', '<=': '\\leq', '>': '>', '>=': '\\geq',
  '+': '+', '-': '-', '*': '\\cdot', '/': '/', '%': '\\bmod',
}

class Printer {
  constructor(private readonly p: ProtocolModel, private readonly s: Style) {}

  private name(n: string): string {
    return this.s.tex ? texName(n) : n
  }

  private wrap(text: string, level: number, min: number): string {
    if (level >= min) return text
    return this.s.tex ? `(${text})` : `(${text})`
  }

  formula(f: Formula, min = IFF): string {
    const ops = this.s.tex ? TEX_OPS : PLAIN_OPS
    switch (f.k) {
      case 'true':
      case 'false':
        return this.s.tex ? `\\mathrm{${f.k}}` : f.k
      case 'atom':
        return this.term(f.term, CMP)
      case 'not':
      case 'always':
      case 'eventually':
      case 'next': {
        // `correct(p)` and `faulty(p)` arrive expanded; the sugar shares its span with its atom.
        if ((f.k === 'always' || f.k === 'eventually') && f.arg.k === 'atom' && f.arg.span.from === f.span.from && f.arg.span.to === f.span.to) {
          const t = f.arg.term
          if ((f.k === 'always' && t.k === 'alive') || (f.k === 'eventually' && t.k === 'crashed')) {
            const word = f.k === 'always' ? 'correct' : 'faulty'
            return `${this.s.tex ? `\\mathrm{${word}}` : word}(${this.s.proc(t.proc)})`
          }
        }
        return this.wrap(`${ops[f.k]} ${this.formula(f.arg, PREFIX)}`, PREFIX, min)
      }
      case 'and':
      case 'or':
      case 'iff': {
        const level = f.k === 'and' ? AND : f.k === 'or' ? OR : IFF
        return this.wrap(`${this.formula(f.left, level)} ${ops[f.k]} ${this.formula(f.right, level + 1)}`, level, min)
      }
      case 'implies':
      case 'until':
      case 'unless': {
        const level = f.k === 'implies' ? IMPLIES : UNTIL
        return this.wrap(`${this.formula(f.left, level + 1)} ${ops[f.k]} ${this.formula(f.right, level)}`, level, min)
      }
    }
  }

  /** Enum labels come resolved to indices; a comparison with an enum variable prints the label back. */
  private enumLabels(t: Term): string[] | null {
    if (t.k !== 'member') return null
    const type = this.p.vars[t.index].type
    return type.k === 'enum' ? type.labels : null
  }

  term(t: Term, min = CMP, labels: string[] | null = null): string {
    switch (t.k) {
      case 'lit':
        if (labels && labels[t.value] !== undefined) return this.name(labels[t.value])
        return t.value < 0 ? this.wrap(String(t.value), ADD, min + 1) : String(t.value)
      case 'const':
        return this.name(this.p.consts[t.index]?.name ?? 'c')
      case 'member': {
        const v = this.p.vars[t.index]
        const base = `${this.s.proc(t.proc)}.${this.name(v.name)}`
        return t.peer ? `${base}[${this.s.proc(t.peer)}]` : base
      }
      case 'alive':
      case 'crashed':
        return `${this.s.tex ? `\\mathrm{${t.k}}` : t.k}(${this.s.proc(t.proc)})`
      case 'pending': {
        const m = this.name(this.p.messages[t.message]?.name ?? 'm')
        const arrow = this.s.tex ? '\\to' : '->'
        return `${this.s.tex ? '\\mathrm{pending}' : 'pending'}(${m}, ${this.s.proc(t.from)} ${arrow} ${this.s.proc(t.to)})`
      }
      case 'neg':
        return this.wrap(`-${this.term(t.arg, PRIMARY)}`, PRIMARY, min)
      case 'min':
      case 'max': {
        const f = this.s.tex ? `\\${t.k}` : t.k
        return `${f}(${this.term(t.left, ADD)}, ${this.term(t.right, ADD)})`
      }
      case 'bin': {
        const op = this.s.tex ? TEX_TERM_OPS[t.op] : t.op
        if (t.op === '=' || t.op === '!=' || t.op === '<' || t.op === '<=' || t.op === '>' || t.op === '>=') {
          const labels = this.enumLabels(t.left) ?? this.enumLabels(t.right)
          return this.wrap(`${this.term(t.left, ADD, labels)} ${op} ${this.term(t.right, ADD, labels)}`, CMP, min)
        }
        const level = t.op === '+' || t.op === '-' ? ADD : MUL
        return this.wrap(`${this.term(t.left, level)} ${op} ${this.term(t.right, level + 1)}`, level, min)
      }
    }
  }
}

/** The plain-text and TeX theorem instance for a property with a cutoff of `k` (its variable count). */
export function theoremStatement(protocol: ProtocolModel, property: PropertyModel): { statement: string; tex: string } {
  const vars = property.vars
  const k = vars.length
  const plainVar = (r: ProcRef) => (r.k === 'var' ? vars[r.index] ?? '?' : `#${r.n}`)
  const plainFixed = (r: ProcRef) => (r.k === 'var' ? `#${r.index + 1}` : `#${r.n}`)
  const texVar = (r: ProcRef) => (r.k === 'var' ? texName(vars[r.index] ?? 'x') : `\\#${r.n}`)
  const texFixed = (r: ProcRef) => (r.k === 'var' ? `\\#${r.index + 1}` : `\\#${r.n}`)
  const body = new Printer(protocol, { tex: false, proc: plainVar }).formula(property.formula)
  const short = body.length <= SHORT

  const bound = k === 2 ? `${vars[0]} != ${vars[1]}` : vars[0]
  const texBound = k === 2 ? `${texName(vars[0])} \\neq ${texName(vars[1])}` : texName(vars[0])
  const ones = k === 2 ? '1, 2' : '1'
  let quantified: string
  let instance: string
  let texQuantified: string
  let texInstance: string
  if (short) {
    quantified = body
    instance = new Printer(protocol, { tex: false, proc: plainFixed }).formula(property.formula)
    texQuantified = `(${new Printer(protocol, { tex: true, proc: texVar }).formula(property.formula)})`
    texInstance = new Printer(protocol, { tex: true, proc: texFixed }).formula(property.formula)
  } else {
    quantified = `${property.name}(${vars.join(', ')})`
    instance = `${property.name}(${ones})`
    texQuantified = `${texName(property.name)}(${vars.map(texName).join(', ')})`
    texInstance = `${texName(property.name)}(${ones})`
  }
  return {
    statement: `for every N >= ${k}: G_N |= forall ${bound}. ${quantified}  iff  G_${k} |= ${instance}`,
    tex: `G_N \\models \\forall ${texBound}.\\ ${texQuantified} \\iff G_${k} \\models ${texInstance}\\quad\\text{for every } N \\ge ${k}`,
  }
}
