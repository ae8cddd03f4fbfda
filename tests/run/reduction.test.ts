// Symmetry reduction of cross-checks above the cutoff size. Oracle: the same instance explored
// without reduction. The reduced run's representatives, each weighted by its orbit size, must add
// up to exactly the unreduced state count, and the verdicts must be equal.
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { explore } from '../../kernels/explore/reach'
import { compileInstance } from '../../kernels/model/instance'
import { planRows, runRow } from '../../kernels/run'

const notebook = (bound: number, sizes: string) => `
\`\`\`protocol
protocol bells {
  const cap = 2
  timing synchronous(delay: 1, idle: 1)
  faults none
  message ding
  state rung: bool = false
  state heard[peer]: 0..cap = 0
  on ding from q { heard[q] := min(heard[q] + 1, cap) }
  step {
    rung := one of {true, false}
    if rung { broadcast ding }
  }
}
\`\`\`
\`\`\`property
property single = forall p: always (p.rung or not p.rung)
property two = forall p, q: always p.heard[q] <= ${bound}
\`\`\`
\`\`\`check
check bells: single, two at N = ${sizes}
\`\`\`
`

function rowsOf(text: string) {
  const model = analyzeNotebook(text)
  expect(model.diagnostics).toEqual([])
  return { model, rows: planRows(model).map((p) => runRow(model, p)) }
}

describe('symmetry reduction', () => {
  test('a one-index invariant at 3 processes: representatives weighted by orbit size count every state', () => {
    const { model, rows } = rowsOf(notebook(2, '3'))
    const row = rows.find((r) => r.property === 'single')!
    expect(row.reducedStates).toBeGreaterThan(0)
    expect(row.reducedStates!).toBeLessThan(row.states)
    const full = explore(compileInstance(model.protocols[0], 3, [2]))
    expect(row.states).toBe(full.states)
    expect(row.verdict).toBe('holds')
  })

  test('a two-index invariant at 4 processes keeps p and q fixed and agrees with the unreduced search', () => {
    const { model, rows } = rowsOf(notebook(2, '4'))
    const row = rows.find((r) => r.property === 'two')!
    expect(row.assignment).toEqual({ p: 1, q: 2 })
    expect(row.reducedStates!).toBeLessThan(row.states)
    const full = explore(compileInstance(model.protocols[0], 4, [2]))
    expect(row.states).toBe(full.states)
    expect(row.verdict).toBe('holds')
  })

  test('a violation found under reduction is reported with a real shortest trace from the unreduced search', () => {
    const { rows } = rowsOf(notebook(1, '4'))
    const row = rows.find((r) => r.property === 'two')!
    expect(row.verdict).toBe('violated')
    expect(row.reducedStates).toBeUndefined()
    // heard[q] reaches 2 after two dings from q: in lock-step with delay 1, dings sent in ticks 1
    // and 2 are received in ticks 2 and 3, so the shortest trace has 3 ticks.
    expect(row.counterexample!.kind).toBe('trace')
    expect(row.counterexample!.ticks).toHaveLength(3)
  })

  test('sizes at and below the cutoff plus one are not reduced', () => {
    const { rows } = rowsOf(notebook(2, '2..3'))
    expect(rows.filter((r) => r.property === 'two').map((r) => r.reducedStates)).toEqual([undefined, undefined])
  })
})
