// `twofold check --workers N` says under the table how many rows explored on N workers and how
// many on one, with the real kernel: an invariant row wide enough to share takes the pool, small
// searches (an invariant and a temporal row at N = 2) do not. The counts are the kernel's (RunOptions.onExplored).
// And `--recompute-edges` (no stored edge graph for temporal rows) gives the same rows.
import { afterAll, describe, expect, it } from 'vitest'
import { closeNodePools } from '../../kernels/explore/pool-node'
import { setPoolProvider } from '../../kernels/explore/parallel'
import { PUMPS } from '../symmetry/fixtures'
import { twofold, workspace } from './harness'

const notebook = `# Orchard pumps on two workers

\`\`\`protocol
${PUMPS}
\`\`\`

\`\`\`property
property bounded = forall p, q: always p.wait[q] <= cap
property accuracy = forall p, q: correct(p) and correct(q) implies eventually always not p.suspect[q]
\`\`\`

\`\`\`check
check pumps: bounded at N = 3
check pumps: bounded at N = 2
check pumps: accuracy at N = 2
\`\`\`
`

const ws = workspace({ 'pumps.md': notebook })
afterAll(async () => {
  ws.remove()
  setPoolProvider(null)
  await closeNodePools()
})

describe('the line on workers', () => {
  it('counts the rows explored on the pool and on one thread', async () => {
    const ran = await twofold(['check', 'pumps.md', '--workers', '2'], ws.dir)
    expect(ran.stderr).toBe('')
    expect(ran.code).toBe(0)
    expect(ran.stdout).toContain('explored on 2 workers: 1 row; on one: 2 rows (symmetry-reduced rows, temporal rows under --recompute-edges, and searches too small to share, explore on one)\n')
  })

  it('is not printed for one worker', async () => {
    const ran = await twofold(['check', 'pumps.md', '--workers', '1'], ws.dir)
    expect(ran.code).toBe(0)
    expect(ran.stdout).not.toContain('explored on')
  })
})

describe('--recompute-edges', () => {
  it('gives the same rows as the stored edge graph', async () => {
    const plain = await twofold(['check', 'pumps.md', '--workers', '1', '--json'], ws.dir)
    const lean = await twofold(['check', 'pumps.md', '--workers', '1', '--json', '--recompute-edges'], ws.dir)
    expect(lean.code).toBe(0)
    const rows = (out: string) => JSON.parse(out).checks.map((r: { seconds: number }) => ({ ...r, seconds: 0 }))
    expect(rows(lean.stdout)).toEqual(rows(plain.stdout))
    expect(rows(lean.stdout).find((r: { search?: string }) => r.search === 'ltl')).toBeDefined()
  })
})
