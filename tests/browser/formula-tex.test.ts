// The property typesetter. Oracle: hand-written TeX for short formulas, read against the precedence
// table of language.md; and the safety rule that only identifier-shaped names reach TeX.
import { describe, expect, it } from 'vitest'
import { formulaToTex, propertiesToTex } from '../../src/app/formula-tex'

describe('formulaToTex', () => {
  it('typesets a two-variable temporal property', () => {
    expect(formulaToTex('forall p, q: correct(p) and faulty(q) implies eventually always p.suspect[q]'))
      .toBe('\\forall p \\neq q.\\; \\mathrm{correct}(p) \\wedge \\mathrm{faulty}(q) \\rightarrow \\Diamond \\Box p.\\mathit{suspect}[q]')
  })
  it('keeps the parentheses the author wrote', () => {
    expect(formulaToTex('forall p, q: always (correct(q) implies not p.suspect[q])'))
      .toBe('\\forall p \\neq q.\\; \\Box (\\mathrm{correct}(q) \\rightarrow \\neg p.\\mathit{suspect}[q])')
  })
  it('typesets comparisons, arithmetic, pending and fixed processes', () => {
    expect(formulaToTex('always (#1.wait[#2] + 1 >= 2 or pending(beat, #2 -> #1))'))
      .toBe('\\Box (\\#1.\\mathit{wait}[\\#2] + 1 \\geq 2 \\vee \\mathrm{pending}(\\mathit{beat}, \\#2 \\to \\#1))')
  })
  it('typesets until and unless as binary operators', () => {
    expect(formulaToTex('forall p: alive(p) unless crashed(p)')).toBe('\\forall p.\\; \\mathrm{alive}(p) \\mathbin{\\mathcal{W}} \\mathrm{crashed}(p)')
  })
  it('escapes underscores in names', () => {
    expect(formulaToTex('forall p: always p.last_seen = 0')).toBe('\\forall p.\\; \\Box p.\\mathit{last\\_seen} = 0')
  })
  it('refuses text that is not a formula', () => {
    expect(() => formulaToTex('forall p: always p.x = \\href{javascript:1}')).toThrow()
    expect(() => formulaToTex('always (p.x')).toThrow()
  })
})

describe('propertiesToTex', () => {
  it('finds each declaration of a block with its line', () => {
    const block = 'property a = forall p: always alive(p)\n\nproperty b = forall p:\n  eventually crashed(p)\n'
    const out = propertiesToTex(block)
    expect(out.map((p) => [p.name, p.line])).toEqual([['a', 0], ['b', 2]])
    expect(out[1].tex).toBe('\\forall p.\\; \\Diamond \\mathrm{crashed}(p)')
  })
  it('gives null TeX for a declaration that does not parse', () => {
    expect(propertiesToTex('property broken = always (')[0].tex).toBeNull()
  })
})
