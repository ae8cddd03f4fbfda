// The formula printer (kernels/language/formula-print.ts) as the workbench uses it: property
// formulas typeset from their parse. Oracle: hand-written TeX and text for short formulas, read
// against the precedence table of language.md; and the safety rule that only identifier-shaped
// names reach TeX.
import { describe, expect, it } from 'vitest'
import { printFormula, printProperties } from '../../kernels/api'

const tex = (src: string) => printFormula(src)?.tex ?? null

describe('printFormula', () => {
  it('typesets a two-variable temporal property', () => {
    expect(tex('forall p, q: correct(p) and faulty(q) implies eventually always p.suspect[q]'))
      .toBe('\\forall p \\neq q.\\; \\mathrm{correct}(p) \\wedge \\mathrm{faulty}(q) \\rightarrow \\Diamond \\Box p.\\mathit{suspect}[q]')
  })
  it('keeps the parentheses the author wrote', () => {
    expect(tex('forall p, q: always (correct(q) implies not p.suspect[q])'))
      .toBe('\\forall p \\neq q.\\; \\Box (\\mathrm{correct}(q) \\rightarrow \\neg p.\\mathit{suspect}[q])')
  })
  it('typesets comparisons, arithmetic, pending and fixed processes', () => {
    expect(tex('always (#1.wait[#2] + 1 >= 2 or pending(beat, #2 -> #1))'))
      .toBe('\\Box (\\#1.\\mathit{wait}[\\#2] + 1 \\geq 2 \\vee \\mathrm{pending}(\\mathit{beat}, \\#2 \\to \\#1))')
  })
  it('typesets until and unless as binary operators', () => {
    expect(tex('forall p: alive(p) unless crashed(p)')).toBe('\\forall p.\\; \\mathrm{alive}(p) \\mathbin{\\mathcal{W}} \\mathrm{crashed}(p)')
  })
  it('typesets aggregates, minimum and negation', () => {
    expect(tex('always (some r: alive(r)) and min(#1.x, -2) * 3 % 2 = 0'))
      .toBe('\\Box (\\exists r.\\; \\mathrm{alive}(r)) \\wedge \\min(\\#1.x, -2) \\cdot 3 \\bmod 2 = 0')
  })
  it('escapes underscores in names', () => {
    expect(tex('forall p: always p.last_seen = 0')).toBe('\\forall p.\\; \\Box p.\\mathit{last\\_seen} = 0')
  })
  it('prints the same formula as text in the notebook spelling, on one line', () => {
    expect(printFormula('forall p, q:\n  always (correct(q)   implies not p.suspect[q]) // a comment\n')?.text)
      .toBe('forall p, q: always (correct(q) implies not p.suspect[q])')
  })
  it('reads past comments between any two tokens', () => {
    expect(printFormula('forall p: // every lamp\n  always // from the start\n  (p.x // its count\n  >= 0)')?.text).toBe('forall p: always (p.x >= 0)')
  })
  it('refuses text that is not a formula', () => {
    expect(printFormula('forall p: always p.x = \\href{javascript:1}')).toBeNull()
    expect(printFormula('always (p.x')).toBeNull()
    expect(printFormula('if p.x then 1 else 2')).toBeNull()
  })
})

describe('printProperties', () => {
  it('finds each declaration of a block with its line', () => {
    const block = 'property a = forall p: always alive(p)\n\nproperty b = forall p:\n  eventually crashed(p)\n'
    const out = printProperties(block)
    expect(out.map((p) => [p.name, p.line])).toEqual([['a', 0], ['b', 2]])
    expect(out[1].tex).toBe('\\forall p.\\; \\Diamond \\mathrm{crashed}(p)')
    expect(out[1].text).toBe('forall p: eventually crashed(p)')
  })
  it('gives null TeX for a declaration that does not parse', () => {
    expect(printProperties('property broken = always (')[0].tex).toBeNull()
  })
})
