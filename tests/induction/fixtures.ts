// Notebooks for the induction tests, and running their checks by induction before the grammar
// has the `by induction` clause: the checks of a fixture are marked as induction checks here.
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { NotebookModel } from '../../kernels/language/model'
import { planRows, runPlannedRow } from '../../kernels/run'
import type { CheckRow } from '../../kernels/result'

/** The model of a notebook with every check asking for induction; fails on any diagnostic. */
export function inductionModel(text: string): NotebookModel {
  const nb = analyzeNotebook(text)
  const errors = nb.diagnostics.filter((d) => d.severity === 'error')
  if (errors.length) throw new Error(errors.map((d) => `${d.line}:${d.column} ${d.message}`).join('\n'))
  for (const c of nb.checks) (c as { method?: string }).method = 'induction'
  return nb
}

/** Every row of the notebook's checks, run by induction. */
export async function inductionRows(text: string): Promise<CheckRow[]> {
  const model = inductionModel(text)
  const cache = new Map()
  const rows: CheckRow[] = []
  for (const plan of planRows(model)) rows.push(await runPlannedRow(model, plan, {}, cache))
  return rows
}

/** Harbour lanterns: keepers glow every tick; a watcher marks a lantern dark after `patience` quiet ticks. */
export const LANTERNS = `protocol lanterns {
  const patience = 2
  timing synchronous(delay: 1, idle: 1)
  faults crash
  message glow
  state quiet[peer]: 0..3 = 0
  state dark[peer]: bool = false
  on glow from q { quiet[q] := 0 }
  step {
    broadcast glow
    for q {
      quiet[q] := min(quiet[q] + 1, 3)
      if quiet[q] > patience { dark[q] := true }
    }
  }
}`

/** A notebook with LANTERNS, the given property lines and check lines. */
export function lanternsNotebook(properties: string[], checks: string[]): string {
  return `# Lanterns\n\n\`\`\`protocol\n${LANTERNS}\n\`\`\`\n\n\`\`\`property\n${properties.join('\n')}\n\`\`\`\n\n\`\`\`check\n${checks.join('\n')}\n\`\`\`\n`
}

export const CALM = 'property calm = forall p, q: always (alive(q) implies not p.dark[q])'
export const FRESH = 'property fresh = forall p, q: always (alive(p) and alive(q) implies p.quiet[q] <= 1 and (p.quiet[q] = 1 implies pending(glow, q -> p)))'

/** Cubes in 1..4000 with x^3 + y^3 = z^3: a question the solver works on for minutes (Stop and Ctrl-C tests). */
export const LEDGER = `# Quay ledgers

\`\`\`protocol
protocol ledger {
  timing asynchronous
  message note
  state x: 1..4000 = any
  state y: 1..4000 = any
  state z: 1..4000 = any
  step { x := x }
}
\`\`\`

\`\`\`property
property cubes = forall p: always p.x * p.x * p.x + p.y * p.y * p.y != p.z * p.z * p.z
\`\`\`

\`\`\`check
check ledger: cubes at N = 1 by induction
\`\`\`
`
