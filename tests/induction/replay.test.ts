// Replay proves again (records.md, induction.md): a record of proofs by induction is replayed by
// running the proofs afresh, and compared on the verdict, the failing conjunct and whether a
// counterexample exists. Oracle: the fresh report the replay ran (its rows come from the solver,
// with its version), and records altered by hand, whose alterations the replay must name.
import { afterAll, describe, expect, test } from 'vitest'
import { loadSolver } from '../../kernels/induction/solver'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { RecordKernel } from '../../kernels/record/kernel'
import { buildRecord } from '../../kernels/record/record'
import { replayRecord } from '../../kernels/record/replay'
import type { Report } from '../../kernels/result'
import { runNotebook } from '../../kernels/run'
import { CALM, FRESH, lanternsNotebook } from './fixtures'

afterAll(async () => { await (await loadSolver()).close() })

const text = lanternsNotebook([CALM, FRESH], ['check lanterns: calm at N = 2 by induction', 'check lanterns: calm, fresh at N = 2 by induction'])

/** The real kernel, keeping every report it ran. */
function keeping(): { kernel: RecordKernel; runs: Report[] } {
  const runs: Report[] = []
  return {
    runs,
    kernel: {
      analyzeNotebook: (t) => analyzeNotebook(t),
      runNotebook: async (t, path, opts) => { const r = await runNotebook(t, path, opts); runs.push(r); return r },
    },
  }
}

async function record() {
  const report = await runNotebook(text, 'lanterns.md')
  expect(report.checks.map((r) => [r.property, r.method, r.verdict])).toEqual([
    ['calm', 'induction', 'inconclusive'], ['calm', 'induction', 'holds'], ['fresh', 'induction', 'holds'],
  ])
  return buildRecord(report, text, analyzeNotebook(text), {})
}

describe('replaying a record of proofs by induction', () => {
  test('proves again: the replay runs the solver and every compared field matches', async () => {
    const rec = await record()
    expect(rec.options.solver).toMatch(/^z3-solver 5\.2\.0 \(Z3 /)
    const { kernel, runs } = keeping()
    const out = await replayRecord(rec, undefined, kernel)
    expect(out.kind).toBe('compared')
    if (out.kind !== 'compared') return
    expect(out.differences).toEqual([])
    expect(runs).toHaveLength(1)
    expect(runs[0].checks.map((r) => [r.method, r.solver, r.counterexample?.kind ?? null])).toEqual([
      ['induction', rec.options.solver, 'induction'], ['induction', rec.options.solver, null], ['induction', rec.options.solver, null],
    ])
  }, 120_000)

  test('a verdict altered in the record is found by proving again', async () => {
    const rec = await record()
    rec.checks[1].verdict = 'inconclusive'
    const out = await replayRecord(rec, undefined, keeping().kernel)
    expect(out.kind === 'compared' && out.differences.map((d) => d.path)).toEqual(['checks[1].verdict'])
  }, 120_000)

  test('a failing conjunct altered in the record is found; the solver\'s particular state is not compared', async () => {
    const rec = await record()
    const cx = rec.checks[0].counterexample!
    const { p, q } = cx.induction!.assignment
    cx.induction!.conjunct = `calm at p = ${q}, q = ${p}`
    cx.induction!.before = { processes: [], inFlight: [] }
    cx.initial = []
    const out = await replayRecord(rec, undefined, keeping().kernel)
    expect(out.kind === 'compared' && out.differences.map((d) => d.path)).toEqual(['checks[0].counterexample.conjunct'])
  }, 120_000)
})
