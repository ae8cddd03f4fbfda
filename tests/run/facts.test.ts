// Facts of the trade, checked on example notebooks of our own. Each names its source; the
// definitions of completeness and accuracy are those of Chandra and Toueg, "Unreliable failure
// detectors for reliable distributed systems", JACM 43(2), 1996.
import { readFileSync } from 'node:fs'
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { planRows, runRow } from '../../kernels/run'
import type { CheckRow } from '../../kernels/result'

function rows(file: string): CheckRow[] {
  const model = analyzeNotebook(readFileSync(new URL(`../../notebooks/${file}`, import.meta.url), 'utf8'))
  expect(model.diagnostics).toEqual([])
  return planRows(model).map((p) => runRow(model, p))
}

describe('heartbeat detector with a growing timeout (notebooks/depot-radios.md)', () => {
  const all = rows('depot-radios.md')
  const bounded = all.filter((r) => r.protocol === 'bounded')
  const unbounded = all.filter((r) => r.protocol === 'unbounded')

  test('under synchronous timing it has strong completeness and eventual strong accuracy (Chandra and Toueg 1996 definitions)', () => {
    expect(bounded.map((r) => [r.property, r.verdict, r.cutoff.applies, r.processes])).toEqual([
      ['completeness', 'holds', true, 2],
      ['accuracy', 'holds', true, 2],
    ])
  })

  test('under asynchronous timing eventual strong accuracy fails (common knowledge in the field: no timing bounds, no such detector)', () => {
    expect(unbounded).toHaveLength(1)
    expect(unbounded[0].verdict).toBe('violated')
  })

  test('the asynchronous counterexample is a lasso in which a correct process is suspected again and again', () => {
    const cx = unbounded[0].counterexample!
    expect(cx.kind).toBe('lasso')
    const loop = cx.loopStart!
    expect(loop).toBeGreaterThanOrEqual(0)
    expect(loop).toBeLessThan(cx.ticks.length)
    // Nobody crashes anywhere in the run, so both processes are correct.
    expect(cx.ticks.flatMap((t) => t.crashed)).toEqual([])
    const suspect = cx.atoms!.find((a) => a.text === `#${unbounded[0].assignment.p}.suspect[#${unbounded[0].assignment.q}]`)!
    // States 0..ticks.length; the loop covers states loopStart..ticks.length (the last equals loopStart).
    const inLoop = suspect.values.slice(loop)
    expect(inLoop).toContain(true)
    expect(inLoop).toContain(false)
    expect(suspect.values[loop]).toBe(suspect.values[cx.ticks.length])
  })
})

describe('heartbeat detector with a fixed timeout (notebooks/harbour-cranes.md)', () => {
  const all = rows('harbour-cranes.md').filter((r) => r.property === 'accurate')

  // The worst gap, derived by hand for lock-step (idle: 1) and delay D: a ping sent at tick t is
  // received at a tick in [t+1, t+D]; the adversary delivers one ping as early as possible and the
  // next as late as possible, so the receipts of one peer can be D ticks apart. The handler resets
  // `silent` to 0 before the step adds 1, so `silent` peaks at D. Strong accuracy therefore holds
  // exactly when timeout > D.
  const gap = (delay: number) => delay

  test('strong accuracy holds exactly when the timeout exceeds the worst gap between heartbeats', () => {
    expect(all.length).toBe(6)
    for (const r of all) {
      const expected = r.constants.timeout > gap(r.constants.delay) ? 'holds' : 'violated'
      expect([r.constants, r.verdict]).toEqual([r.constants, expected])
    }
  })

  test('a violation comes with the shortest trace, ending where a live crane is marked stalled', () => {
    const r = all.find((x) => x.constants.delay === 2 && x.constants.timeout === 2)!
    const cx = r.counterexample!
    expect(cx.kind).toBe('trace')
    // timeout 2 is first reached after two ticks of silence: tick 0 (nothing in flight yet) and
    // tick 1 (the first ping may still be in flight), so the shortest trace has 2 ticks.
    expect(cx.ticks).toHaveLength(2)
    expect(r.complete).toBe(false)
  })
})
