// The cutoff decision and certificate. The cutoff sizes are those of cutoff.md, stated there from
// memory of "Cutoffs for Symmetric Point-to-Point Distributed Algorithms" (NETYS 2020, LNCS 12129)
// and "A case study on parametric verification of failure detectors" (LMCS 19(1), 2023): 1 for
// `forall p`, 2 for `forall p, q`; witness.test.ts confirms them empirically (the independent oracle).
import katex from 'katex'
import { describe, expect, it } from 'vitest'
import { decideCutoff } from '../../kernels/symmetry/cutoff'
import { texName } from '../../kernels/symmetry/statement'
import { depot, notebook, PUMPS } from './fixtures'

describe('decideCutoff', () => {
  const c = notebook(PUMPS, [
    'property settles = forall p, q: correct(p) and correct(q) implies eventually always not p.suspect[q]',
    'property calm = forall p, q: always (correct(q) implies not p.suspect[q])',
  ])
  it('gives k = 2 for two quantified processes, naming a long property', () => {
    const info = decideCutoff(c.protocol, c.properties[0])
    expect(info.applies).toBe(true)
    expect(info.processes).toBe(2)
    expect(info.statement).toBe('for every N >= 2: G_N |= forall p != q. settles(p, q)  iff  G_2 |= settles(1, 2)')
    expect(info.tex).toBe('G_N \\models \\forall p \\neq q.\\ \\mathit{settles}(p, q) \\iff G_2 \\models \\mathit{settles}(1, 2)\\quad\\text{for every } N \\ge 2')
  })
  it('writes a short formula out, instantiated with #1 and #2', () => {
    const info = decideCutoff(c.protocol, c.properties[1])
    expect(info.statement).toBe('for every N >= 2: G_N |= forall p != q. always (correct(q) implies not p.suspect[q])  iff  G_2 |= always (correct(#2) implies not #1.suspect[#2])')
    expect(info.tex).toContain('\\Box (\\mathrm{correct}(q) \\rightarrow \\neg p.\\mathit{suspect}[q])')
  })
  it('lists the six rules as passed', () => {
    const info = decideCutoff(c.protocol, c.properties[1])
    // cutoff.md gives each rule its short name; the name comes first.
    expect(info.passed.map((s) => s.slice(0, s.indexOf(':')))).toEqual([
      'peer-entries (rule 1)', 'mixed-silent (rule 2)', 'own-broadcast (rule 3)',
      'peer-reply (rule 4)', 'no-aggregate (rule 5)', 'property-form (rule 6)',
    ])
    expect(info.passed[3]).toContain('reply')
  })
  it('gives k = 1 for one quantified process', () => {
    const d = notebook(depot('  step { level := (level + 1) % 3\n    broadcast ack(level) }'), ['property low = forall p: always p.level <= cap'])
    const info = decideCutoff(d.protocol, d.properties[0])
    expect(info.processes).toBe(1)
    expect(info.statement).toBe('for every N >= 1: G_N |= forall p. always p.level <= cap  iff  G_1 |= always #1.level <= cap')
  })
  it('refuses with the failing rules and asks for explicit sizes', () => {
    const d = notebook(depot('  on ping from q { broadcast ping }\n  step { if some q: seen[q] { broadcast ping } }'), ['property low = forall p: always p.level <= cap'])
    const info = decideCutoff(d.protocol, d.properties[0])
    expect(info.applies).toBe(false)
    expect(info.processes).toBeNull()
    expect(info.tex).toBe('')
    expect(info.passed).toEqual([])
    expect(info.reasons.map((r) => [r.rule, r.name])).toEqual([[3, 'own-broadcast'], [5, 'no-aggregate']])
    expect(info.statement).toBe('own-broadcast (rule 3) and no-aggregate (rule 5) fail; give explicit sizes, as in `at N = 2..3`')
  })
  it('produces TeX that KaTeX typesets without errors', () => {
    for (const p of c.properties) {
      expect(() => katex.renderToString(decideCutoff(c.protocol, p).tex, { throwOnError: true, trust: false })).not.toThrow()
    }
  })
  it('escapes notebook names for TeX', () => {
    expect(texName('wait_max')).toBe('\\mathit{wait\\_max}')
    expect(texName('q')).toBe('q')
    expect(texName('a}\\b')).toBe('\\mathit{ab}')
  })
})
