// Information-flow labels. Oracle: labels worked out by hand from cutoff.md for each small template.
import { describe, expect, it } from 'vitest'
import { analyzeFlow, explainScalar, join, MIXED, OWN } from '../../kernels/symmetry/flow'
import { depot, notebook, SEEN } from './fixtures'

const labelsOf = (body: string, extra = '') => {
  const c = notebook(depot(body, extra), [SEEN])
  const flow = analyzeFlow(c.protocol)
  const byName = Object.fromEntries(c.protocol.vars.map((v, i) => [v.name, flow.scalar[i].k]))
  return { c, flow, byName }
}

describe('join', () => {
  it('puts own below every peer and joins distinct peers to mixed', () => {
    expect(join(OWN, { k: 'peer', binder: 1 })).toEqual({ k: 'peer', binder: 1 })
    expect(join({ k: 'peer', binder: 1 }, { k: 'peer', binder: 1 })).toEqual({ k: 'peer', binder: 1 })
    expect(join({ k: 'peer', binder: 1 }, { k: 'peer', binder: 2 })).toEqual(MIXED)
    expect(join(MIXED, OWN)).toEqual(MIXED)
  })
})

describe('analyzeFlow', () => {
  it('keeps a scalar own when it is written only from own values', () => {
    expect(labelsOf('  step { level := (level + 1) % 3\n    broadcast ack(level) }').byName.level).toBe('own')
  })
  it('makes a scalar written in a handler mixed, even from a constant', () => {
    expect(labelsOf('  on ping from q { heard := true }\n  step { broadcast ping }').byName.heard).toBe('mixed')
  })
  it('makes a scalar written inside a loop mixed (it runs once per peer)', () => {
    expect(labelsOf('  step { broadcast ping\n    for q { level := 1 } }').byName.level).toBe('mixed')
  })
  it('reaches the fixed point through a chain of scalars written in any order', () => {
    // `a` reads `b` before `b` is known to be mixed: only a second round finds it.
    const { byName } = labelsOf('  step { broadcast ping\n    a := b\n    b := some q: seen[q] }', '  state a: bool = false\n  state b: bool = false')
    expect(byName).toMatchObject({ a: 'mixed', b: 'mixed' })
  })
  it('records the aggregates that feed a scalar through other scalars', () => {
    const { c, flow } = labelsOf('  step { broadcast ping\n    a := b\n    b := some q: seen[q] }', '  state a: bool = false\n  state b: bool = false')
    const a = c.protocol.vars.findIndex((v) => v.name === 'a')
    expect(flow.aggregates[a].length).toBe(1)
    expect(explainScalar(c.protocol, flow, a)).toMatch(/^`a` at line \d+ is mixed because its assignment reads `b` .*, and `b` at line \d+ is mixed because its assignment reads the aggregate `some q: \.\.\.`/)
  })
  it('labels a reply inside a handler with the handled peer', () => {
    const { flow } = labelsOf('  on ping from q { send ack(1) to q }\n  step { broadcast ping }')
    const send = flow.sinks.find((s) => s.kind === 'send')!
    expect(send.sources.map((s) => s.label)).toEqual([{ k: 'peer', binder: send.binder }])
  })
})
