// Issue 10, items 13 and 15, through the runner: properties with more than 32 atoms get verdicts
// (oracle: the reference temporal check of tests/reference/temporal.ts, whose product, fairness
// and SCC search share nothing with the kernel's), more atoms than the limit are a located error,
// and a translation over its budget is an `inconclusive` row that names the property and the budget.
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { MAX_ATOMS } from '../../kernels/logic/ltl'
import { planRows, runRow } from '../../kernels/run'
import type { RunOptions } from '../../kernels/plan'
import { referenceTemporal } from '../reference/temporal'

/** A protocol whose one variable counts 0, 1, 2, 3, 0, ... , with the given properties and checks. */
const nb = (properties: string, checks: string) =>
  '# orchard\n\n```protocol\nprotocol orchard {\n  timing synchronous(delay: 1, idle: 1)\n  state x: 0..3 = 0\n  step { x := (x + 1) % 4 }\n}\n```\n\n' +
  '```property\n' + properties + '\n```\n\n```check\n' + checks + '\n```\n'

function run(text: string, opts: RunOptions = {}) {
  const model = analyzeNotebook(text)
  expect(model.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
  return { model, rows: planRows(model).map((p) => runRow(model, p, opts)) }
}

/** `k` copies of an atom joined by `and`: each occurrence is an atom of its own. */
const many = (atom: string, k: number) => Array.from({ length: k }, () => atom).join(' and ')

describe('properties with more than 32 atoms (item 15)', () => {
  test.each([
    // Atoms 0..31 always hold, atoms 32 and past never: a misread bit 32 (read as bit 0) would make it hold.
    ['violated', `${many('p.x < 4', 32)} and ${many('p.x > 3', 8)}`, 40],
    ['holds', `${many('p.x < 4', 32)} and ${many('p.x = 3', 38)}`, 70],
  ])('always eventually a conjunction of %s atoms: %s, as the reference check says', (verdict, body, atoms) => {
    const { model, rows: [row] } = run(nb(`property wide = forall p: always eventually (${body})`, 'check orchard: wide at N = 1'))
    expect(row.verdict).toBe(verdict)
    const prop = model.checks[0].properties[0]
    expect(referenceTemporal(model.protocols[0], 1, undefined, prop, [1]).verdict).toBe(verdict)
    expect(atoms).toBeGreaterThan(32)
  })

  test('temporal atoms past 31: eventually p.x = 3 and ... over 40 atoms', () => {
    const body = Array.from({ length: 40 }, (_, i) => (i === 39 ? 'eventually p.x > 3' : 'eventually p.x = 3')).join(' and ')
    const { model, rows: [row] } = run(nb(`property late = forall p: ${body}`, 'check orchard: late at N = 1'))
    expect(row.verdict).toBe('violated')
    expect(referenceTemporal(model.protocols[0], 1, undefined, model.checks[0].properties[0], [1]).verdict).toBe('violated')
  })

  test(`more than ${MAX_ATOMS} atoms is an error at the property, naming the limit`, () => {
    const model = analyzeNotebook(nb(`property huge = forall p: always (${many('p.x < 4', MAX_ATOMS + 1)})`, 'check orchard: huge at N = 1'))
    const errors = model.diagnostics.filter((d) => d.severity === 'error')
    expect(errors).toHaveLength(1)
    expect(errors[0].message).toBe(`property \`huge\` has ${MAX_ATOMS + 1} atoms (conditions on the state), more than the ${MAX_ATOMS} a property may have; split it into several properties`)
    // The property line is line 12 of the notebook; the body after `forall p: ` at column 27.
    expect([errors[0].line, errors[0].column]).toEqual([12, 27])
  })
})

describe('the translation budget through the runner (item 13)', () => {
  /** Six levels of `eventually (a and always (b or eventually ...))` over the counter. */
  const nested = (levels: number): string => levels === 0 ? 'p.x = 0' : `eventually (p.x = 1 and always (p.x != 2 or ${nested(levels - 1)}))`

  test('over budget the row is inconclusive and says which property and which budget', () => {
    const { rows: [row] } = run(nb(`property deep = forall p: ${nested(6)}`, 'check orchard: deep at N = 1'), { translationBudget: 2000 })
    expect(row.verdict).toBe('inconclusive')
    expect(row.complete).toBe(false)
    expect(row.note).toMatch(/^property `deep` was not checked: the automaton of the property's negation needs more than the translation budget of 2000 /)
  })

  test('with the default budget the same property gets the verdict of the reference check', () => {
    const { model, rows: [row] } = run(nb(`property deep = forall p: ${nested(3)}`, 'check orchard: deep at N = 1'))
    const ref = referenceTemporal(model.protocols[0], 1, undefined, model.checks[0].properties[0], [1]).verdict
    expect(['holds', 'violated']).toContain(ref)
    expect(row.verdict).toBe(ref)
  })

  test('33 disjuncts of eventually always (33 always-eventually conjuncts in the negation, more than the 31 marks of the product) get the reference verdict', () => {
    // Each disjunct holds of no run (the counter never stays anywhere), so the property is violated.
    const body = Array.from({ length: 33 }, (_, i) => `eventually always p.x ${i % 2 ? '<' : '>'} ${i % 4}`).join(' or ')
    const { model, rows: [row] } = run(nb(`property busy = forall p: ${body}`, 'check orchard: busy at N = 1'))
    expect(row.verdict).toBe('violated')
    expect(referenceTemporal(model.protocols[0], 1, undefined, model.checks[0].properties[0], [1]).verdict).toBe('violated')
  })
})
