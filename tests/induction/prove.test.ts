// Verdicts of proofs by induction (induction.md). Oracles: the explorer (a reachable
// counterexample, an unreachable one, agreement where it finishes) and the explicit successor
// function, which prove.ts itself uses to confirm every counterexample to induction.
import { afterAll, describe, expect, test } from 'vitest'
import { loadSolver } from '../../kernels/induction/solver'
import { runNotebook } from '../../kernels/run'
import { CALM, FRESH, inductionRows, lanternsNotebook } from './fixtures'

afterAll(async () => { await (await loadSolver()).close() })

describe('proof by induction', () => {
  test('a true invariant that is not inductive: inconclusive with a counterexample to induction, s unreachable', async () => {
    const [row] = await inductionRows(lanternsNotebook([CALM], ['check lanterns: calm at N = 2']))
    expect(row.method).toBe('induction')
    expect(row.verdict).toBe('inconclusive')
    expect(row.solver).toMatch(/^z3-solver 5\.2\.0/)
    const cx = row.counterexample!
    expect(cx.kind).toBe('induction')
    expect(cx.ticks).toHaveLength(1)
    expect(cx.induction!.property).toBe('calm')
    expect(cx.induction!.after).not.toBeNull()
    // In s' the watcher has marked a live lantern dark.
    const { p, q } = cx.induction!.assignment
    const after = cx.induction!.after!
    expect(after.processes[q - 1].alive).toBe(true)
    expect(after.processes[p - 1].values[`dark[${q}]`]).toBe(true)
    expect(row.note).toMatch(/not among them.*add a property that excludes this state/)
    // Oracle: the explorer agrees that calm holds at this size.
    const explored = await runNotebook(lanternsNotebook([CALM], ['check lanterns: calm at N = 2']), 'x.md')
    expect(explored.checks[0].verdict).toBe('holds')
  }, 60_000)

  test('the strengthening makes it inductive, at sizes exploration checks too', async () => {
    const text = lanternsNotebook([CALM, FRESH], ['check lanterns: calm, fresh at N = 2..3'])
    const rows = await inductionRows(text)
    expect(rows.map((r) => [r.property, r.processes, r.verdict])).toEqual([
      ['calm', 2, 'holds'], ['calm', 3, 'holds'], ['fresh', 2, 'holds'], ['fresh', 3, 'holds'],
    ])
    // Oracle: the explorer's verdicts at the same sizes.
    const explored = await runNotebook(text, 'x.md')
    expect(explored.checks.map((r) => r.verdict)).toEqual(['holds', 'holds', 'holds', 'holds'])
  }, 60_000)

  test('an initial state that breaks the property: violated with a trace of zero ticks', async () => {
    const [row] = await inductionRows(lanternsNotebook(['property lit = forall p, q: always p.quiet[q] = 1'], ['check lanterns: lit at N = 2']))
    expect(row.verdict).toBe('violated')
    expect(row.counterexample!.kind).toBe('trace')
    expect(row.counterexample!.ticks).toEqual([])
  }, 60_000)

  test('a reachable counterexample to induction: violated with the real shortest trace', async () => {
    const text = lanternsNotebook(['property never = forall p, q: always not p.dark[q]'], ['check lanterns: never at N = 2'])
    const [row] = await inductionRows(text)
    expect(row.verdict).toBe('violated')
    expect(row.counterexample!.kind).toBe('trace')
    // Oracle: the explorer's own shortest trace has the same length.
    const explored = await runNotebook(text, 'x.md')
    expect(explored.checks[0].verdict).toBe('violated')
    expect(row.counterexample!.ticks.length).toBe(explored.checks[0].counterexample!.ticks.length)
  }, 60_000)

  test('a property that is not `always S` is a located error', async () => {
    const [row] = await inductionRows(lanternsNotebook(['property later = forall p, q: eventually p.dark[q]'], ['check lanterns: later at N = 2']))
    expect(row.verdict).toBe('error')
    expect(row.note).toMatch(/^line \d+, column \d+: `later` cannot be proved by induction/)
  }, 60_000)

  test('an encoding beyond the budget is inconclusive with the reason, never holds', async () => {
    const { proveInduction } = await import('../../kernels/induction/prove')
    const { inductionModel } = await import('./fixtures')
    const model = inductionModel(lanternsNotebook([CALM, FRESH], ['check lanterns: calm, fresh at N = 3']))
    const proof = await proveInduction(model.protocols[0], model.checks[0].properties, 3, [2], { budget: 4 })
    expect(proof.outcome.kind).toBe('unknown')
    expect((proof.outcome as { reason: string }).reason).toMatch(/budget of 4/)
  }, 60_000)

  test('stopping interrupts the solver: inconclusive, never holds', async () => {
    const { proveInduction } = await import('../../kernels/induction/prove')
    const { inductionModel } = await import('./fixtures')
    const model = inductionModel(lanternsNotebook([CALM, FRESH], ['check lanterns: calm, fresh at N = 3']))
    const proof = await proveInduction(model.protocols[0], model.checks[0].properties, 3, [2], { shouldStop: () => true })
    expect(proof.outcome.kind).toBe('unknown')
  }, 60_000)
})

describe('the command line shows a counterexample to induction tick-style', () => {
  test('s, the tick, s\' and the failing conjunct', async () => {
    const { renderReport } = await import('../../src/cli/table')
    const rows = await inductionRows(lanternsNotebook([CALM], ['check lanterns: calm at N = 2']))
    const text = renderReport({ notebook: { path: 'l.md', sha256: '' }, errors: [], checks: rows })
    expect(text).toMatch(/counterexample \(induction, 1 tick; p=#\d, q=#\d\)/)
    expect(text).toMatch(/\n {4}s {6}#1 /)
    expect(text).toMatch(/\n {4}t1 {2}/)
    expect(text).toMatch(/\n {4}s' {5}#1 /)
    expect(text).toMatch(/fails in s': calm at p = \d, q = \d/)
  }, 60_000)
})

describe('the workbench draws a counterexample to induction as a one-tick diagram', () => {
  test('s and s\' with the failing conjunct highlighted', async () => {
    const { counterexampleSvg, changesTable } = await import('../../src/app/diagram')
    const [row] = await inductionRows(lanternsNotebook([CALM], ['check lanterns: calm at N = 2']))
    const cx = row.counterexample!
    expect(cx.atoms).toEqual([{ text: 'calm: alive(q) implies not p.dark[q]', values: [true, false] }])
    const svg = counterexampleSvg(cx, row.processes, { assignment: row.assignment })
    const { p, q } = row.assignment
    expect(svg).toContain(`calm: alive(${q}) implies not ${p}.dark[${q}]`)
    expect(svg).toContain('>s</text>')
    expect(svg).toContain('>s&#39;</text>')
    expect(svg).toContain('class="atom-band"')
    expect(changesTable(cx)).toContain('in flight: glow')
  }, 60_000)
})

describe('`by induction` in a notebook', () => {
  test('the runner routes the check to the engine; sizes beyond exploration hold', async () => {
    const report = await runNotebook(lanternsNotebook([CALM, FRESH], ['check lanterns: calm, fresh at N = 2..6 by induction']), 'l.md')
    expect(report.errors).toEqual([])
    expect(report.checks.map((r) => [r.property, r.processes, r.method, r.verdict])).toEqual([
      ...[2, 3, 4, 5, 6].map((n) => ['calm', n, 'induction', 'holds']),
      ...[2, 3, 4, 5, 6].map((n) => ['fresh', n, 'induction', 'holds']),
    ])
  }, 120_000)
})
