// Oracle: the expected error positions are read off the fixture text (line numbers counted by hand).
import { describe, expect, it } from 'vitest'
import { explore } from '../../kernels/explore/reach'
import { modelErrorCounterexample } from '../../kernels/explore/trace'
import { instanceOf } from './fixtures'

// The fixture notebook puts the protocol's first line on notebook line 4.
describe('model errors', () => {
  it('stops an assignment outside the type and names variable, value, type and line', () => {
    const inst = instanceOf(`protocol silo {
  timing synchronous(delay: 1, idle: 1)
  state level: 0..2 = 0
  step { level := level + 1 }
}`, 1)
    const r = explore(inst)
    expect(r.outcome).toBe('model-error')
    expect(r.complete).toBe(false)
    const e = r.error!
    expect(e.variable).toBe('level')
    expect(e.value).toBe(3)
    expect(e.type).toBe('0..2')
    expect(e.line).toBe(7)
    expect(e.column).toBe(10)
    expect(e.process).toBe(1)
    expect(e.message).toMatch(/line 7, column 10.*level to 3, outside its type 0\.\.2/)
    // The error is met stepping from level 2: trace 0 -> 1 -> 2, then the failing tick.
    expect(r.trace).toHaveLength(3)
    const cx = modelErrorCounterexample(inst, r.store, r.trace!, e)
    expect(cx.kind).toBe('model-error')
    expect(cx.ticks).toHaveLength(3)
    expect(cx.ticks[2]).toMatchObject({ tick: 3, stepped: [1], changes: [] })
    expect(cx.initial).toEqual([{ process: 1, values: { level: 0 } }])
  })

  it('names the peer of an entry assignment, 1-based', () => {
    const inst = instanceOf(`protocol silo {
  timing synchronous(delay: 1, idle: 1)
  message tick
  state seen[peer]: 0..1 = 0
  on tick from q { seen[q] := seen[q] + 1 }
  step { broadcast tick }
}`, 2)
    const r = explore(inst)
    expect(r.error!.variable).toMatch(/^seen\[[12]\]$/)
    expect(r.error!.line).toBe(8)
    expect(r.error!.received).toHaveLength(1)
  })

  it('reports division by zero at the statement', () => {
    const inst = instanceOf(`protocol silo {
  timing asynchronous
  state x: 0..4 = 0
  step { x := 4 / x }
}`, 1)
    const r = explore(inst)
    expect(r.outcome).toBe('model-error')
    expect(r.error!.message).toMatch(/division by zero/)
    expect(r.error!.line).toBe(7)
    expect(r.trace).toEqual([0])
  })

  it('reports modulo by zero', () => {
    const r = explore(instanceOf(`protocol silo {
  timing asynchronous
  state x: 0..4 = 0
  step { x := 3 % x }
}`, 1))
    expect(r.error!.message).toMatch(/modulo by zero/)
  })

  it('reports a sent field outside its type', () => {
    const r = explore(instanceOf(`protocol silo {
  timing synchronous(delay: 1, idle: 1)
  message load(t: 0..1)
  state x: 0..3 = 2
  step { broadcast load(x) }
}`, 2))
    expect(r.error!.variable).toBe('load.t')
    expect(r.error!.value).toBe(2)
    expect(r.error!.type).toBe('0..1')
    expect(r.error!.line).toBe(8)
  })

  it('ends only the failing branch: other choices still have successors', () => {
    const inst = instanceOf(`protocol silo {
  timing synchronous(delay: 1, idle: 1)
  state x: 0..2 = 0
  step { x := one of {1, 5} }
}`, 1)
    let count = 0
    const err = inst.successors(inst.initialStates(), 0, () => {
      count++
    })
    expect(err!.value).toBe(5)
    expect(count).toBe(1)
  })
})
