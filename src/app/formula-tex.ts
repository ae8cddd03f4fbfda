// Typesets property formulas. A small precedence parser over the property's source text (the
// precedence table of language.md) builds a tree and prints it as TeX. It works on text alone, so
// a property is typeset even before any check resolves it. Safety: the TeX contains only fixed
// macros, digits and names that match the identifier pattern (with `_` escaped); anything else is
// a parse failure and the caller shows the source only.

/** One `property NAME = FORMULA` declaration found in a property block. */
export interface PropertyTex {
  name: string
  /** 0-based line of the declaration within the block. */
  line: number
  /** The formula as TeX, or null when the text does not parse (the kernel's diagnostics say why). */
  tex: string | null
}

type Tok = { t: 'id' | 'num' | 'fixed' | 'op'; v: string }

const OPS = ['->', '!=', '<=', '>=', '(', ')', ',', ':', '.', '[', ']', '=', '<', '>', '+', '-', '*', '/', '%']

function tokenize(src: string): Tok[] {
  const out: Tok[] = []
  let i = 0
  while (i < src.length) {
    const c = src[i]
    if (/\s/.test(c)) { i++; continue }
    if (src.startsWith('//', i)) { while (i < src.length && src[i] !== '\n') i++; continue }
    let m: RegExpExecArray | null
    if ((m = /^[A-Za-z_][A-Za-z0-9_]*/.exec(src.slice(i)))) { out.push({ t: 'id', v: m[0] }); i += m[0].length; continue }
    if ((m = /^[0-9]+/.exec(src.slice(i)))) { out.push({ t: 'num', v: m[0] }); i += m[0].length; continue }
    if ((m = /^#[0-9]+/.exec(src.slice(i)))) { out.push({ t: 'fixed', v: m[0].slice(1) }); i += m[0].length; continue }
    const op = OPS.find((o) => src.startsWith(o, i))
    if (!op) throw new Error(`unexpected character at ${i}`)
    out.push({ t: 'op', v: op })
    i += op.length
  }
  return out
}

const KEYWORDS = new Set(['forall', 'always', 'eventually', 'next', 'until', 'unless', 'not', 'and', 'or',
  'implies', 'iff', 'true', 'false', 'some', 'every', 'count'])

/** A name as TeX: single letters stay italic math, longer names become \mathit{...}. */
function name(id: string): string {
  if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(id)) throw new Error('bad name')
  const escaped = id.replace(/_/g, '\\_')
  return id.length === 1 ? escaped : `\\mathit{${escaped}}`
}

class Parser {
  private i = 0
  constructor(private toks: Tok[]) {}

  private peek(v?: string): boolean {
    const t = this.toks[this.i]
    return !!t && (v === undefined || ((t.t === 'op' || t.t === 'id') && t.v === v))
  }
  private take(v?: string): Tok {
    const t = this.toks[this.i]
    if (!t || (v !== undefined && t.v !== v)) throw new Error(`expected ${v ?? 'more'}`)
    this.i++
    return t
  }
  done(): boolean { return this.i >= this.toks.length }

  top(): string {
    if (this.peek('forall')) {
      this.take()
      const vars = [this.procVar()]
      while (this.peek(',')) { this.take(); vars.push(this.procVar()) }
      this.take(':')
      const bound = vars.length === 1 ? vars[0] : vars.join(' \\neq ')
      return `\\forall ${bound}.\\; ${this.top()}`
    }
    return this.iff()
  }
  private procVar(): string {
    const t = this.take()
    if (t.t !== 'id' || KEYWORDS.has(t.v)) throw new Error('expected a process variable')
    return name(t.v)
  }
  private iff(): string {
    let s = this.implies()
    while (this.peek('iff')) { this.take(); s += ' \\leftrightarrow ' + this.implies() }
    return s
  }
  private implies(): string {
    const s = this.or()
    if (this.peek('implies')) { this.take(); return s + ' \\rightarrow ' + this.implies() }
    return s
  }
  private or(): string {
    let s = this.and()
    while (this.peek('or')) { this.take(); s += ' \\vee ' + this.and() }
    return s
  }
  private and(): string {
    let s = this.until()
    while (this.peek('and')) { this.take(); s += ' \\wedge ' + this.until() }
    return s
  }
  private until(): string {
    const s = this.prefix()
    if (this.peek('until')) { this.take(); return s + ' \\mathbin{\\mathcal{U}} ' + this.until() }
    if (this.peek('unless')) { this.take(); return s + ' \\mathbin{\\mathcal{W}} ' + this.until() }
    return s
  }
  private prefix(): string {
    const ops: Record<string, string> = { not: '\\neg ', always: '\\Box ', eventually: '\\Diamond ', next: '\\bigcirc ' }
    for (const k in ops) if (this.peek(k)) { this.take(); return ops[k] + this.prefix() }
    if (this.peek('forall')) return this.top()
    return this.cmp()
  }
  private cmp(): string {
    const s = this.add()
    const ops: Record<string, string> = { '=': ' = ', '!=': ' \\neq ', '<': ' < ', '<=': ' \\leq ', '>': ' > ', '>=': ' \\geq ' }
    const t = this.toks[this.i]
    if (t && t.t === 'op' && t.v in ops) { this.take(); return s + ops[t.v] + this.add() }
    return s
  }
  private add(): string {
    let s = this.mul()
    while (this.peek('+') || this.peek('-')) s += ` ${this.take().v} ` + this.mul()
    return s
  }
  private mul(): string {
    let s = this.unary()
    const ops: Record<string, string> = { '*': ' \\cdot ', '/': ' / ', '%': ' \\bmod ' }
    while (this.peek('*') || this.peek('/') || this.peek('%')) s += ops[this.take().v] + this.unary()
    return s
  }
  private unary(): string {
    if (this.peek('-')) { this.take(); return '-' + this.unary() }
    return this.primary()
  }
  private proc(): string {
    const t = this.take()
    if (t.t === 'fixed') return `\\#${t.v}`
    if (t.t === 'id' && !KEYWORDS.has(t.v)) return name(t.v)
    throw new Error('expected a process')
  }
  private primary(): string {
    const t = this.toks[this.i]
    if (!t) throw new Error('unexpected end')
    if (t.t === 'num') { this.i++; return t.v }
    if (t.t === 'op' && t.v === '(') {
      this.i++
      const s = this.top()
      this.take(')')
      return `(${s})`
    }
    if (t.t === 'id' && (t.v === 'true' || t.v === 'false')) { this.i++; return `\\mathrm{${t.v}}` }
    if (t.t === 'id' && (t.v === 'some' || t.v === 'every' || t.v === 'count')) {
      this.i++
      const v = this.procVar()
      this.take(':')
      const sym = t.v === 'some' ? '\\exists' : t.v === 'every' ? '\\forall' : '\\#'
      return `${sym} ${v}.\\; ${this.top()}`
    }
    if (t.t === 'fixed') return this.member(this.proc())
    if (t.t !== 'id' || KEYWORDS.has(t.v)) throw new Error('unexpected token')
    this.i++
    if (this.peek('(')) {
      this.take('(')
      const args: string[] = []
      if (t.v === 'pending') {
        const m = this.take()
        if (m.t !== 'id') throw new Error('expected a message')
        args.push(name(m.v))
        this.take(',')
        const from = this.proc()
        this.take('->')
        args.push(`${from} \\to ${this.proc()}`)
      } else if (t.v === 'min' || t.v === 'max') {
        args.push(this.add())
        this.take(',')
        args.push(this.add())
      } else {
        args.push(this.proc())
      }
      this.take(')')
      return `\\mathrm{${name(t.v).replace(/^\\mathit\{(.*)\}$/, '$1')}}(${args.join(', ')})`
    }
    return this.member(name(t.v))
  }
  private member(base: string): string {
    if (!this.peek('.')) return base
    this.take('.')
    const field = this.take()
    if (field.t !== 'id') throw new Error('expected a variable')
    let s = `${base}.${name(field.v)}`
    if (this.peek('[')) { this.take('['); s += `[${this.proc()}]`; this.take(']') }
    return s
  }
}

/** Typesets one formula (the text after `property NAME =`). Throws when it does not parse. */
export function formulaToTex(src: string): string {
  const p = new Parser(tokenize(src))
  const tex = p.top()
  if (!p.done()) throw new Error('unexpected text after the formula')
  return tex
}

/**
 * Finds the `property NAME = FORMULA` declarations of a property block's text and typesets each.
 * A declaration runs until the next line that starts with `property`.
 */
export function propertiesToTex(blockText: string): PropertyTex[] {
  const lines = blockText.split('\n')
  const out: PropertyTex[] = []
  let cur: { name: string; line: number; src: string } | null = null
  const flush = () => {
    if (!cur) return
    let tex: string | null
    try { tex = formulaToTex(cur.src) } catch { tex = null }
    out.push({ name: cur.name, line: cur.line, tex })
    cur = null
  }
  lines.forEach((line, i) => {
    const m = /^\s*property\s+([A-Za-z_][A-Za-z0-9_]*)\s*=(.*)$/.exec(line)
    if (m) { flush(); cur = { name: m[1], line: i, src: m[2] } }
    else if (cur) cur.src += '\n' + line
  })
  flush()
  return out
}
