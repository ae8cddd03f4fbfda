// Bad input to a proof by induction (issue 15): a property that is not `always S` with S free of
// temporal operators is a located error in the notebook, and a size or constant that makes the
// encoding exceed the solver's budget is `inconclusive` with the reason, never `holds`. Oracles:
// the positions found by searching the fixture text, and the same check at a small constant,
// which the budget lets through and which holds.
import { afterAll, describe, expect, test } from 'vitest'
import { DEFAULT_BUDGET } from '../../kernels/induction/prove'
import { loadSolver } from '../../kernels/induction/solver'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { runNotebook } from '../../kernels/run'
import { lanternsNotebook } from './fixtures'

afterAll(async () => { await (await loadSolver()).close() })

describe('a property that cannot be proved by induction', () => {
  const cases: [name: string, property: string][] = [
    ['later', 'property later = forall p, q: eventually p.dark[q]'],
    // Temporal inside `always`: not a state formula S.
    ['settles', 'property settles = forall p, q: always (p.dark[q] implies eventually not alive(q))'],
    ['twice', 'property twice = forall p, q: always always not p.dark[q]'],
    ['waits', 'property waits = forall p, q: always (not p.dark[q] until crashed(q))'],
  ]
  for (const [name, property] of cases) {
    test(`\`${name}\` is a located error at its name in the check line, and nothing is run`, async () => {
      const text = lanternsNotebook([property], [`check lanterns: ${name} at N = 2 by induction`])
      const lines = text.split('\n')
      const line = lines.findIndex((l) => l.startsWith('check lanterns:')) + 1
      const column = lines[line - 1].indexOf(name) + 1
      expect(analyzeNotebook(text).diagnostics.filter((d) => d.severity === 'error').map((d) => [d.line, d.column, d.message])).toEqual([
        [line, column, `property \`${name}\` is not \`always P\` with P free of temporal operators, so it cannot be proved by induction; check it in a line without \`by induction\``],
      ])
      const report = await runNotebook(text, 'l.md')
      expect(report.checks).toEqual([])
      expect(report.errors.map((e) => [e.line, e.column])).toEqual([[line, column]])
    })
  }
})

/** Depot tallies: every depot broadcasts the largest tally it has seen, so `seen` never passes `cap`. */
const depot = (checks: string[]) => `# Depot tallies

\`\`\`protocol
protocol depot {
  const cap = 2
  timing synchronous(delay: 4, idle: 1)
  faults crash
  message tally(n: 0..cap)
  state seen: 0..cap = 0
  on tally(n) from q { seen := max(seen, n) }
  step { broadcast tally(seen) }
}
\`\`\`

\`\`\`property
property bounded = forall p: always p.seen <= cap
\`\`\`

\`\`\`check
${checks.join('\n')}
\`\`\`
`

describe('an encoding beyond the solver\'s budget', () => {
  test('a constant that makes one tick too large: inconclusive with the reason, never holds', async () => {
    // One tick of G_3 runs a guarded handler per (process, sender, message value, age) and a step
    // per process: 3 x (2 x 1201 x 4 + 1) = 28,827 runs with cap = 1200, past the default budget.
    expect(3 * (2 * 1201 * 4 + 1)).toBeGreaterThan(DEFAULT_BUDGET)
    const report = await runNotebook(depot(['check depot: bounded at N = 3 with cap = 1200 by induction', 'check depot: bounded at N = 2 with cap = 1 by induction']), 'd.md')
    expect(report.errors).toEqual([])
    const [big, small] = report.checks
    expect(big.method).toBe('induction')
    expect(big.verdict).toBe('inconclusive')
    expect(big.complete).toBe(false)
    expect(big.note).toBe(`the encoding of one tick needs 28827 guarded handler runs, more than the solver's budget of ${DEFAULT_BUDGET}; prove a smaller size or smaller constants`)
    // The budget is what stopped it: at a small constant the same check is proved.
    expect(small.verdict).toBe('holds')
  }, 120_000)

  test('a size that makes one tick too large for a given budget: unknown with the reason', async () => {
    const { proveInduction } = await import('../../kernels/induction/prove')
    const model = analyzeNotebook(depot(['check depot: bounded at N = 4 by induction']))
    // 4 x (3 x 3 x 4 + 1) = 148 runs at N = 4, cap = 2; a budget of 147 refuses it, 148 admits it.
    const refused = await proveInduction(model.protocols[0], model.checks[0].properties, 4, [2], { budget: 147 })
    expect(refused.outcome).toEqual({ kind: 'unknown', reason: 'the encoding of one tick needs 148 guarded handler runs, more than the solver\'s budget of 147; prove a smaller size or smaller constants' })
    const admitted = await proveInduction(model.protocols[0], model.checks[0].properties, 4, [2], { budget: 148 })
    expect(admitted.outcome.kind).toBe('holds')
  }, 120_000)
})
