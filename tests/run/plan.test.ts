// The row plan (kernels/plan.ts): computed row by row from its index, so a huge sweep costs no
// memory until its rows run, and a shard walks only its own rows.
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { planDigest, planOf, planRows, shardIndices } from '../../kernels/plan'

const orchard = (check: string) => `
\`\`\`protocol
protocol pickers {
  const x = 1
  const y = 1
  const z = 1
  timing asynchronous
  message ripe
  state done: bool = false
  step { broadcast ripe }
}
\`\`\`
\`\`\`property
property calm = forall p: always not p.done
property still = forall p, q: always not p.done
\`\`\`
\`\`\`check
${check}
\`\`\`
`

describe('planOf', () => {
  test('a billion-row sweep is planned without building it, and a shard picks its rows by index', () => {
    // The checker refuses such a sweep (a located limit, language/limits.ts); the plan must not
    // depend on that, so the model's sweep is widened to 999 values per constant here.
    const model = analyzeNotebook(orchard('check pickers: calm with x in 1..3, y in 1..3, z in 1..3'))
    expect(model.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
    const wide = Array.from({ length: 999 }, (_, i) => i + 1)
    for (const item of model.checks[0].sweep) item.values = wide
    const plan = planOf(model)
    expect(plan.rows).toBe(999 ** 3)
    // Oracle: mixed-radix decoding by hand, the last sweep item varying fastest.
    const decode = (i: number) => [Math.floor(i / 999 ** 2) + 1, (Math.floor(i / 999) % 999) + 1, (i % 999) + 1]
    const shard = { index: 7, count: 100_000_000 }
    const rows = [...plan.select(shard)]
    expect(rows.map((r) => r.row)).toEqual(shardIndices(plan.rows, shard))
    expect(rows).toHaveLength(10)
    for (const r of rows) expect(r.constants).toEqual(decode(r.row))
    expect(plan.at(plan.rows - 1).constants).toEqual([999, 999, 999])
    expect(plan.count(shard)).toBe(10)
  })

  test('matches the nested-loop order: check, property, size, then settings', () => {
    const model = analyzeNotebook(orchard('check pickers: calm, still at N = 2..3 with x in 1..2, z in 4..5'))
    // Oracle: the plan written out by nested loops.
    const expected: [number, number, number[]][] = []
    for (const property of [0, 1]) for (const n of [2, 3]) for (const x of [1, 2]) for (const z of [4, 5]) expected.push([property, n, [x, 1, z]])
    expect(planRows(model).map((r) => [r.property, r.processes, r.constants])).toEqual(expected)
    expect(planRows(model).map((r) => r.row)).toEqual(expected.map((_, i) => i))
    expect(planRows(model, { only: 'still' }).map((r) => r.row)).toEqual([0, 1, 2, 3, 4, 5, 6, 7])
  })

  test('counts a shard that lies beyond the plan as empty', () => {
    const plan = planOf(analyzeNotebook(orchard('check pickers: calm with x in 1..3')))
    expect([plan.count({ index: 3, count: 5 }), plan.count({ index: 4, count: 5 })]).toEqual([1, 0])
    expect([...plan.select({ index: 4, count: 5 })]).toEqual([])
  })

  test('digests differ when the sweep differs and agree when only prose differs', async () => {
    const a = await planDigest(planOf(analyzeNotebook(orchard('check pickers: calm with x in 1..3'))))
    const b = await planDigest(planOf(analyzeNotebook(orchard('check pickers: calm with x in 1..4'))))
    const c = await planDigest(planOf(analyzeNotebook('# Orchard\n' + orchard('check pickers: calm with x in 1..3'))))
    expect(a.sha256).not.toBe(b.sha256)
    expect(c).toEqual(a)
  })
})
