// cutoff.md, "Model errors and one-index properties": a one-index property granted the cutoff at
// G_1 stands for every N only once G_2 is also free of model errors. Oracle: the same check with
// explicit sizes, which explores G_2 and G_3 directly and meets the model error there.
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { planRows, runRow } from '../../kernels/run'

const notebook = (seen: string, sizes: string) => `# Ferry bells

\`\`\`protocol
protocol bells {
  timing synchronous(delay: 1, idle: 1)
  faults none
  message tick
  state round: 0..1 = 0
  state seen[peer]: 0..2 = 0
  on tick from q { seen[q] := ${seen} }
  step { round := (round + 1) % 2  broadcast tick }
}
\`\`\`

\`\`\`property
property flips = forall p: always eventually p.round = 0
\`\`\`

\`\`\`check
check bells: flips${sizes}
\`\`\`
`

function run(text: string) {
  const model = analyzeNotebook(text)
  expect(model.diagnostics).toEqual([])
  return planRows(model).map((p) => runRow(model, p))
}

describe('one-index properties and model errors at G_2', () => {
  it('explicit sizes (the oracle): G_2 and G_3 reach a model error on a peer entry', () => {
    const rows = run(notebook('seen[q] + 1', ' at N = 2..3'))
    expect(rows.map((r) => [r.processes, r.verdict, r.counterexample?.kind])).toEqual([
      [2, 'violated', 'model-error'],
      [3, 'violated', 'model-error'],
    ])
  })

  it('without sizes, the G_1 row is violated with the model-error trace of G_2, and the statement says so', () => {
    const [row] = run(notebook('seen[q] + 1', ''))
    expect(row.cutoff.applies).toBe(true)
    expect(row.cutoff.processes).toBe(1)
    expect(row.verdict).toBe('violated')
    expect(row.counterexample?.kind).toBe('model-error')
    // The trace is a run of two processes: both appear in its initial state.
    expect(row.counterexample?.initial.map((p) => p.process)).toEqual([1, 2])
    expect(row.note).toMatch(/G_2/)
    expect(row.cutoff.statement).toMatch(/G_2 is not free of model errors/)
  })

  it('without sizes and without the error, the row holds and the statement says G_2 was checked free of model errors', () => {
    const [row] = run(notebook('(seen[q] + 1) % 3', ''))
    expect(row.verdict).toBe('holds')
    expect(row.processes).toBe(1)
    expect(row.cutoff.statement).toMatch(/G_2 was checked free of model errors/)
    // The oracle agrees: with explicit sizes the same protocol holds at 2 and 3.
    expect(run(notebook('(seen[q] + 1) % 3', ' at N = 2..3')).map((r) => r.verdict)).toEqual(['holds', 'holds'])
  })
})
