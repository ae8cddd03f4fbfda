// The runner's check semantics (language.md, records.md): cutoff default sizes, explicit sizes
// with agreement, limits, model errors, stopping, and the shape of each row.
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { planRows } from '../../kernels/plan'
import { runNotebook, runRow } from '../../kernels/run'

const lamps = (step: string, extra: string) => `
\`\`\`protocol
protocol lamps {
  const cap = 3
  timing synchronous(delay: 1, idle: 1)
  faults crash
  message blink
  state lit: bool = false
  state seen[peer]: 0..cap = 0
  state total: 0..cap = 0
  on blink from q { seen[q] := min(seen[q] + 1, cap) }
  step {
${step}
  }
}
\`\`\`
${extra}`

function run(text: string) {
  const model = analyzeNotebook(text)
  expect(model.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
  return planRows(model).map((p) => runRow(model, p))
}

describe('check semantics', () => {
  test('without sizes, a granted property is checked on its cutoff instance and says which assignment', () => {
    const [row] = run(lamps('    broadcast blink', '```property\nproperty capped = forall p, q: always p.seen[q] <= cap\n```\n```check\ncheck lamps: capped\n```'))
    expect(row.cutoff.applies).toBe(true)
    expect(row.processes).toBe(2)
    expect(row.verdict).toBe('holds')
    expect(row.assignment).toEqual({ p: 1, q: 2 })
    expect(row.constants).toEqual({ cap: 3 })
    expect(row.complete).toBe(true)
  })

  test('without sizes, a refused property is inconclusive with reasons and asks for sizes, checking nothing', () => {
    const [row] = run(lamps('    total := count q: seen[q] > 0\n    if total > 1 { broadcast blink }',
      '```property\nproperty capped = forall p, q: always p.seen[q] <= cap\n```\n```check\ncheck lamps: capped\n```'))
    expect(row.cutoff.applies).toBe(false)
    expect(row.cutoff.reasons.length).toBeGreaterThan(0)
    expect(row.verdict).toBe('inconclusive')
    expect(row.states).toBe(0)
    expect(row.note).toMatch(/explicit sizes/)
  })

  test('with sizes where the cutoff applies, the rows say the sizes agree', () => {
    const rows = run(lamps('    broadcast blink', '```property\nproperty capped = forall p, q: always p.seen[q] <= cap\n```\n```check\ncheck lamps: capped at N = 2..3\n```'))
    expect(rows.map((r) => [r.processes, r.verdict, r.agreement])).toEqual([[2, 'holds', true], [3, 'holds', true]])
  })

  test('a single explicit size above the cutoff is compared with the cutoff instance, alone or in a shard', async () => {
    const text = lamps('    broadcast blink', '```property\nproperty capped = forall p, q: always p.seen[q] <= cap\n```\n```check\ncheck lamps: capped at N = 3\n```')
    expect(run(text).map((r) => [r.processes, r.agreement])).toEqual([[3, true]])
    const wide = text.replace('at N = 3', 'at N = 2..4')
    const whole = (await runNotebook(wide, 'w.md')).checks.map((r) => r.agreement)
    const sharded = (await Promise.all([1, 2, 3].map((index) => runNotebook(wide, 'w.md', { shard: { index, count: 3 } })))).flatMap((r) => r.checks)
    expect(whole).toEqual([true, true, true])
    // Oracle: the unsharded run; each shard holds one row, so agreement cannot come from the other rows.
    expect(sharded.sort((a, b) => a.row - b.row).map((r) => r.agreement)).toEqual(whole)
  })

  test('a disagreement with the cutoff instance is said plainly and never hidden', () => {
    const text = lamps('    broadcast blink', '```property\nproperty capped = forall p, q: always p.seen[q] <= cap\n```\n```check\ncheck lamps: capped at N = 3\n```')
    const model = analyzeNotebook(text)
    const [plan] = planRows(model)
    // As if the kernel had a bug at N = 2: the cutoff instance's verdict is injected as violated.
    const row = runRow(model, plan, {}, new Map([[`0|0|${plan.constants.join(',')}`, 'violated']]))
    expect(row.verdict).toBe('holds')
    expect(row.agreement).toBe(false)
    expect(row.note).toMatch(/^sizes disagree: G_3 holds but the cutoff instance G_2 is violated; the cutoff claim is contradicted; please report this notebook/)
  })

  test('with sizes where the cutoff does not apply, every assignment of distinct processes is checked', () => {
    const rows = run(lamps('    total := count q: seen[q] > 0\n    if total > 1 { broadcast blink } else { broadcast blink }',
      '```property\nproperty early = forall p, q: always p.seen[q] <= 1\n```\n```check\ncheck lamps: early at N = 3\n```'))
    expect(rows[0].cutoff.applies).toBe(false)
    expect(rows[0].verdict).toBe('violated')
    expect(rows[0].assignment).toHaveProperty('p')
  })

  test('reaching the state limit gives inconclusive, never holds', () => {
    const [row] = run(lamps('    broadcast blink', '```property\nproperty capped = forall p, q: always p.seen[q] <= cap\n```\n```check\ncheck lamps: capped within 3 states\n```'))
    expect(row.verdict).toBe('inconclusive')
    expect(row.complete).toBe(false)
    expect(row.states).toBeLessThanOrEqual(3)
  })

  test('a value outside its type is a model error: violated, with the shortest trace and the variable, value, type and line', () => {
    const [row] = run(lamps('    broadcast blink\n    total := total + 1',
      '```property\nproperty capped = forall p, q: always p.seen[q] <= cap\n```\n```check\ncheck lamps: capped\n```'))
    expect(row.verdict).toBe('violated')
    const cx = row.counterexample!
    expect(cx.kind).toBe('model-error')
    expect(cx.message).toMatch(/total/)
    expect(cx.message).toMatch(/4/)
    expect(cx.message).toMatch(/0\.\.3/)
    expect(cx.message).toMatch(/line 14/) // the assignment: the fixture starts with a blank line
    // total reaches 3 after three ticks; the fourth tick is the failing step, listed last with
    // the process that stepped and no changes.
    expect(cx.ticks).toHaveLength(4)
    expect(cx.ticks[3].changes).toEqual([])
    expect(cx.ticks[3].stepped).toEqual([1])
    expect(row.complete).toBe(false)
  })

  test('a stopped check is inconclusive', () => {
    const [row] = analyzeNotebookRows(lamps('    broadcast blink', '```property\nproperty capped = forall p, q: always p.seen[q] <= cap\n```\n```check\ncheck lamps: capped at N = 3\n```'), () => true)
    expect(row.verdict).toBe('inconclusive')
    expect(row.note).toMatch(/stopped/)
  })

  test('a temporal violation comes as a lasso with its loop start and the property atoms per state', () => {
    const [row] = run(lamps('    lit := not lit\n    broadcast blink', '```property\nproperty dim = forall p: eventually always not p.lit\n```\n```check\ncheck lamps: dim\n```'))
    expect(row.cutoff.processes).toBe(1)
    expect(row.verdict).toBe('violated')
    const cx = row.counterexample!
    expect(cx.kind).toBe('lasso')
    expect(cx.loopStart).toBeDefined()
    expect(cx.atoms![0].text).toBe('#1.lit')
    expect(cx.atoms![0].values).toHaveLength(cx.ticks.length + 1)
  })

  test('counterexample atoms read as written, with the processes of the assignment filled in', () => {
    const prop = '```property\nproperty early = forall p, q: always (correct(q) implies p.seen[q] <= 1)\n```\n'
    const [granted] = run(lamps('    broadcast blink', prop + '```check\ncheck lamps: early\n```'))
    expect(granted.verdict).toBe('violated')
    expect(granted.assignment).toEqual({ p: 1, q: 2 })
    expect(granted.counterexample!.atoms!.map((a) => a.text)).toEqual(['correct(#2)', '#1.seen[#2] <= 1'])
    // Refused cutoff (an aggregate feeds a broadcast): every assignment is tried, and the atoms name
    // the one that failed, whichever it is.
    const [refused] = run(lamps('    total := count q: seen[q] > 0\n    if total >= 0 { broadcast blink }', prop + '```check\ncheck lamps: early at N = 3\n```'))
    expect(refused.cutoff.applies).toBe(false)
    expect(refused.verdict).toBe('violated')
    const { p, q } = refused.assignment
    expect(refused.counterexample!.atoms!.map((a) => a.text)).toEqual([`correct(#${q})`, `#${p}.seen[#${q}] <= 1`])
  })

  test('a check by induction is routed to the induction engine (runNotebook), not explored', async () => {
    const report = await runNotebook(lamps('    broadcast blink', '```property\nproperty capped = forall p, q: always p.seen[q] <= cap\n```\n```check\ncheck lamps: capped at N = 2 by induction\n```'), 'l.md')
    const [row] = report.checks
    expect(row.method).toBe('induction')
    expect(row.verdict).toBe('holds')
    expect(row.solver).toMatch(/^z3-solver /)
  }, 60_000)

  test('a notebook with errors checks nothing and reports each error with its position', async () => {
    const report = await runNotebook('```check\ncheck nowhere: x\n```\n', 'bad.md')
    expect(report.checks).toEqual([])
    expect(report.errors).toEqual([{ line: 2, column: 7, message: 'unknown protocol `nowhere`; define it in a protocol block above this check' }])
    expect(report.notebook.sha256).toMatch(/^[0-9a-f]{64}$/)
  })
})

function analyzeNotebookRows(text: string, shouldStop: () => boolean) {
  const model = analyzeNotebook(text)
  return planRows(model).map((p) => runRow(model, p, { shouldStop }))
}

describe('row plans', () => {
  const text = lamps('    broadcast blink', '```property\nproperty a = forall p, q: always p.seen[q] <= cap\nproperty b = forall p: always not p.lit\n```\n```check\ncheck lamps: a, b at N = 2 with cap in 1..4\n```')
  test('a sweep of 2 properties x 4 constant values gives 8 rows, property first, then constants', () => {
    const plan = planRows(analyzeNotebook(text))
    expect(plan.map((p) => [p.property, p.constants[0]])).toEqual([[0, 1], [0, 2], [0, 3], [0, 4], [1, 1], [1, 2], [1, 3], [1, 4]])
    expect(plan.map((p) => p.row)).toEqual([0, 1, 2, 3, 4, 5, 6, 7])
  })
  test('shards partition the plan and keep row numbers', () => {
    const model = analyzeNotebook(text)
    const shards = [1, 2, 3].map((index) => planRows(model, { shard: { index, count: 3 } }).map((p) => p.row))
    expect(shards).toEqual([[0, 3, 6], [1, 4, 7], [2, 5]])
  })
  test('only keeps the rows of one property', () => {
    expect(planRows(analyzeNotebook(text), { only: 'b' }).map((p) => p.property)).toEqual([1, 1, 1, 1])
  })
})
