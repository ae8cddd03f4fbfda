// Running out of memory (issue 10, item 20): the search stops with the states reached, says that
// memory ran out, and the row is `inconclusive` with those states, never `error` with 0 states.
// Deterministic through a memory budget (`memoryBudget`), and through a recorder that fails its
// allocation the way the runtime does. Oracle for the states reached: the counter below visits
// c = 0, 1, 2, ... in breadth-first order (by hand), so the store must hold exactly 0..states-1.
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { explore, type EdgeRecorder } from '../../kernels/explore/reach'
import { isOutOfMemory, MemoryExhausted, StateStore } from '../../kernels/base/stateset'
import { readField } from '../../kernels/model/layout'
import { planRows, runRow } from '../../kernels/run'
import { instanceOf } from '../model/fixtures'

const counter = (k: number) => `protocol orchard {
  const k = ${k}
  timing synchronous(delay: 1, idle: 1)
  state c: 0..k - 1 = 0
  step { c := (c + 1) % k }
}`

const BUDGET = 64 * 1024

describe('memory budget of the explorer', () => {
  it('stops within the budget with the states reached, incomplete, and says memory ran out', () => {
    const inst = instanceOf(counter(100_000), 1)
    const r = explore(inst, { memoryBudget: BUDGET })
    expect(r.memoryHit).toBe(true)
    expect(r.complete).toBe(false)
    expect(r.limitHit).toBe(false)
    expect(r.outcome).toBe('ok')
    expect(r.store.bytes).toBeLessThanOrEqual(BUDGET)
    // More than the store's first allocation (1024 states), far fewer than the 100,000.
    expect(r.states).toBeGreaterThan(1024)
    expect(r.states).toBeLessThan(100_000)
    const field = inst.layout.scalar[0][0]!
    const values = Array.from({ length: r.states }, (_, s) => readField(r.store.data, s * inst.words, field))
    expect(values).toEqual(Array.from({ length: r.states }, (_, i) => i))
    // The same budget stops at the same state.
    expect(explore(inst, { memoryBudget: BUDGET }).states).toBe(r.states)
  })

  it('is not hit when the instance fits', () => {
    const r = explore(instanceOf(counter(100), 1), { memoryBudget: BUDGET })
    expect(r.memoryHit).toBe(false)
    expect(r.complete).toBe(true)
    expect(r.states).toBe(100)
  })

  it('a refused allocation (as the runtime refuses one) stops the search the same way', () => {
    let edges = 0
    const failing: EdgeRecorder = {
      beginSource() {},
      edge() { if (++edges > 500) throw new RangeError('Array buffer allocation failed') },
    }
    const r = explore(instanceOf(counter(100_000), 1), { edges: failing })
    expect(r.memoryHit).toBe(true)
    expect(r.complete).toBe(false)
    // The 501st edge's target (state 501) was stored just before its edge failed: 502 states.
    expect(r.states).toBe(502)
  })

  it('any other error is not taken for memory', () => {
    const broken: EdgeRecorder = { beginSource() {}, edge() { throw new RangeError('Maximum call stack size exceeded') } }
    expect(() => explore(instanceOf(counter(10), 1), { edges: broken })).toThrow('Maximum call stack')
    expect(isOutOfMemory(new RangeError('Invalid typed array length: 4294967296'))).toBe(true)
    expect(isOutOfMemory(new TypeError('Array buffer allocation failed'))).toBe(false)
  })

  it('a store refused its growth is left as it was', () => {
    const s = new StateStore(1, 16)
    s.budget = s.bytes
    const w = new Uint32Array(1)
    let refused: unknown = null
    for (let v = 0; v < 64 && !refused; v++) {
      w[0] = v
      try { s.insert(w, 0) } catch (e) { refused = e }
    }
    expect(refused).toBeInstanceOf(MemoryExhausted)
    const size = s.size
    for (let v = 0; v < size; v++) { w[0] = v; expect(s.lookup(w, 0)).toBe(v) }
    w[0] = size
    expect(s.lookup(w, 0)).toBe(-1)
  })
})

describe('a row that runs out of memory', () => {
  const notebook = (property: string) => '```protocol\n' + counter(100_000).replace('step', 'state lit: bool = false\n  step') +
    '\n```\n\n```property\n' + property + '\n```\n\n```check\ncheck orchard: p at N = 1\n```\n'

  for (const [route, property] of [
    ['invariant', 'property p = forall p: always p.c >= 0'],
    ['temporal', 'property p = forall p: always eventually p.c = 0'],
  ]) {
    it(`is inconclusive with the states reached (${route} route)`, () => {
      const model = analyzeNotebook(notebook(property))
      expect(model.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
      const [plan] = planRows(model)
      const row = runRow(model, plan, { memoryBudget: BUDGET })
      expect(row.verdict).toBe('inconclusive')
      expect(row.complete).toBe(false)
      expect(row.states).toBeGreaterThan(1024)
      expect(row.note).toMatch(new RegExp(`^memory ran out after ${row.states} states`))
      // Without the budget the same row holds (so the budget alone made it inconclusive).
      expect(runRow(model, plan).verdict).toBe('holds')
    })
  }
})
