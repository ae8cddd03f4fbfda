// The table's counterexample shows the property's atoms as written, with the processes of the
// assignment filled in, one line each, and which states they hold in. Oracle: the row's own
// `atoms[].values`, and the atom texts written out by hand from the property.
import { describe, expect, it } from 'vitest'
import { runNotebook } from '../../kernels/run'
import { renderCounterexample } from '../../src/cli/table'

const text = `
\`\`\`protocol
protocol skiffs {
  const cap = 2
  timing synchronous(delay: 1, idle: 1)
  message oar
  state heard[peer]: 0..cap = 0
  on oar from q { heard[q] := min(heard[q] + 1, cap) }
  step { broadcast oar }
}
\`\`\`

\`\`\`property
property quiet = forall p, q: always (correct(q) implies p.heard[q] <= 1)
\`\`\`

\`\`\`check
check skiffs: quiet
\`\`\`
`

describe('counterexample atoms in the table', () => {
  it('lists each atom with the processes filled in and a mark per state', async () => {
    const report = await runNotebook(text, 'skiffs.md')
    const [row] = report.checks
    expect(row.verdict).toBe('violated')
    expect(row.assignment).toEqual({ p: 1, q: 2 })
    const cx = row.counterexample!
    const lines = renderCounterexample(cx, row.assignment)
    const at = lines.indexOf('    atoms at the start, then after each tick (+ holds, . does not):')
    expect(at).toBeGreaterThan(0)
    const marks = (k: number) => cx.atoms![k].values.map((v) => (v ? '+' : '.')).join('')
    expect(lines.slice(at + 1)).toEqual([
      `      correct(#2)        ${marks(0)}`,
      `      #1.heard[#2] <= 1  ${marks(1)}`,
    ])
    // #2 never crashes in this run, and #1 comes to have heard it twice.
    expect(marks(1).endsWith('.')).toBe(true)
  })
})
