// The one formula printer from both of its sources. Oracle: the two readings agree: a property
// printed from its parse (as the workbench typesets it) and the same property printed from the
// kernel's resolved formula (as the cutoff statement prints it) give the same text and TeX when the
// author wrote only the parentheses the precedence table of language.md needs.
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/api'
import { printProperties, printShown, showFormula, type Shown } from '../../kernels/language/formula-print'

const notebook = [
  '```protocol',
  'protocol ferry {',
  '  timing synchronous(delay: 1, idle: 1)',
  '  faults crash',
  '  const cap = 3',
  '  message horn',
  '  state dock: {north, south} = north',
  '  state load: 0..3 = 0',
  '  state heard[peer]: bool = false',
  '  on horn from q { heard[q] := true }',
  '  step { broadcast horn }',
  '}',
  '```',
  '',
  '```property',
  'property a = always (#1.dock = south implies eventually #1.load <= cap)',
  'property b = correct(#1) and faulty(#2) implies eventually always #1.heard[#2]',
  'property c = always #1.load * 2 - 1 >= -1 or not pending(horn, #1 -> #2)',
  'property d = always #1.heard[#2] until min(#1.load, #2.load) + 1 = max(#2.load, 0)',
  'property e = not (#1.load + 1) * 2 = 4 iff next #2.dock != north',
  '```',
  '',
  '```check',
  'check ferry: a, b, c, d, e at N = 2',
  '```',
  '',
].join('\n')

describe('the formula printer', () => {
  const model = analyzeNotebook(notebook)
  const check = model.checks[0]
  const protocol = model.protocols[check.protocol]
  const parsed = printProperties(model.properties[0].block.text)
  const fixed = (r: { k: 'var'; index: number } | { k: 'fixed'; n: number }): Shown => ({ k: 'fixed', n: r.k === 'fixed' ? r.n : r.index + 1 })

  it('reads the notebook cleanly', () => {
    expect(model.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
    expect(parsed.map((p) => p.name)).toEqual(['a', 'b', 'c', 'd', 'e'])
  })
  for (const name of ['a', 'b', 'c', 'd', 'e']) {
    it(`prints property ${name} the same from its parse and from its resolved formula`, () => {
      const resolved = check.properties.find((p) => p.name === name)!
      const shown = showFormula(protocol, resolved.formula, fixed)
      const fromParse = parsed.find((p) => p.name === name)!
      expect(printShown(shown, 'text')).toBe(fromParse.text)
      expect(printShown(shown, 'tex')).toBe(fromParse.tex)
    })
  }
})
