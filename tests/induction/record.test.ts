// Records of proofs by induction (induction.md, Records): rows carry method `induction` and the
// solver's version, the record's options name the solver, and replay compares the verdict, the
// failing conjunct and whether a counterexample exists, not the state the solver happened to pick.
import { describe, expect, test } from 'vitest'
import { buildRecord } from '../../kernels/record/record'
import { compareRecords } from '../../kernels/record/replay'
import type { CheckRow, Counterexample } from '../../kernels/result'
import { harbourModel, harbourText, report, row } from '../record/synthetic'

const cti = (conjunct: string, quiet: number): Counterexample => ({
  kind: 'induction', message: `breaks ${conjunct}`, initial: [{ process: 1, values: { quiet: quiet } }], ticks: [],
  induction: { before: { processes: [], inFlight: [] }, after: null, property: 'calm', conjunct, assignment: { p: 1, q: 2 } },
})

function recordWith(cx: Counterexample | null) {
  const r = report()
  const proved: Partial<CheckRow> = { method: 'induction', search: undefined, solver: 'z3-solver 5.2.0 (Z3 test)', verdict: cx ? 'inconclusive' : 'holds', counterexample: cx }
  r.checks[4] = row(4, proved)
  return buildRecord(r, harbourText, harbourModel, { created: new Date('2026-03-01T08:00:00Z') })
}

describe('records of proofs by induction', () => {
  test('the options name the solver', async () => {
    expect((await recordWith(null)).options.solver).toBe('z3-solver 5.2.0 (Z3 test)')
    const explored = await buildRecord(report(), harbourText, harbourModel, {})
    expect(explored.options.solver).toBeUndefined()
  })

  test('another state for the same conjunct is no difference', async () => {
    expect(compareRecords(await recordWith(cti('calm at p = 1, q = 2', 2)), await recordWith(cti('calm at p = 1, q = 2', 3)))).toEqual([])
  })

  test('another conjunct, or no counterexample, is a difference', async () => {
    const a = await recordWith(cti('calm at p = 1, q = 2', 2))
    expect(compareRecords(a, await recordWith(cti('calm at p = 2, q = 1', 2))).map((d) => d.path)).toEqual(['checks[4].counterexample.conjunct'])
    expect(compareRecords(a, await recordWith(null)).map((d) => d.path)).toContain('checks[4].verdict')
  })
})
