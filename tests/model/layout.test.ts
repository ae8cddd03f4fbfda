import { describe, expect, it } from 'vitest'
import { ModelSetupError } from '../../kernels/model/errors'
import { bitsFor, channelIndex, makeLayout } from '../../kernels/model/layout'
import { compileInstance } from '../../kernels/model/instance'
import { protocolOf } from './fixtures'

const lighthouse = `protocol lighthouse {
  const delay = 3
  const top = 5
  timing synchronous(delay: delay, idle: 2)
  faults crash
  message flash(beam: 0..2, loud: bool)
  message dark
  state lamp: 0..top = 0
  state seen[peer]: bool = false
  step { broadcast dark }
}`

describe('layout', () => {
  it('counts bits without 32-bit wrap-around (2^32 values need 32 bits, not 0)', () => {
    // Exact powers of two, by definition: k bits hold 2^k values.
    expect([1, 2, 3, 4, 2 ** 31, 2 ** 31 + 1, 2 ** 32, 2 ** 32 + 1, 2 ** 53].map(bitsFor)).toEqual([0, 1, 2, 2, 31, 32, 32, 33, 53])
  })

  it('has n(n-1) channels for n processes', () => {
    const p = protocolOf(lighthouse)
    for (const n of [1, 2, 3, 4]) {
      const inst = compileInstance(p, n, [3, 5])
      expect(inst.channelCount).toBe(n * (n - 1))
      expect(inst.layout.channel.length).toBe(n * (n - 1))
    }
  })

  it('numbers channels j->i as j*(n-1) + (i < j ? i : i-1), each exactly once', () => {
    const l = makeLayout(protocolOf(lighthouse), 4, [3, 5])
    const seen = new Set<number>()
    for (let j = 0; j < 4; j++) for (let i = 0; i < 4; i++) {
      if (i === j) continue
      const c = channelIndex(4, j, i)
      expect(l.channelFrom[c]).toBe(j)
      expect(l.channelTo[c]).toBe(i)
      seen.add(c)
    }
    expect(seen.size).toBe(12)
  })

  it('never lets a field straddle a word', () => {
    const l = makeLayout(protocolOf(lighthouse), 4, [3, 5])
    for (const f of l.fields) expect(f.shift + f.bits).toBeLessThanOrEqual(32)
    for (const f of l.fields) expect(f.word).toBeLessThan(l.words)
  })

  it('gives no two fields the same bits', () => {
    const l = makeLayout(protocolOf(lighthouse), 3, [3, 5])
    const used = new Set<string>()
    for (const f of l.fields) for (let b = 0; b < f.bits; b++) {
      const key = `${f.word}:${f.shift + b}`
      expect(used.has(key)).toBe(false)
      used.add(key)
    }
  })

  it('numbers message values by kind, then fields lexicographically', () => {
    const l = makeLayout(protocolOf(lighthouse), 2, [3, 5])
    // flash has 3 * 2 values (beam-major), dark one: 7 in all.
    expect(l.messageValues).toBe(7)
    const vf = (v: number) => [l.valueFields[v * l.maxFields], l.valueFields[v * l.maxFields + 1]]
    expect(vf(0)).toEqual([0, 0])
    expect(vf(1)).toEqual([0, 1])
    expect(vf(2)).toEqual([1, 0])
    expect(vf(5)).toEqual([2, 1])
    expect(l.valueKind[6]).toBe(1)
  })

  it('sizes channel fields by the delay, and by one bit under asynchronous', () => {
    const sync = makeLayout(protocolOf(lighthouse), 2, [3, 5])
    expect(sync.channel[0][0].bits).toBe(3)
    const asyncP = protocolOf(lighthouse.replace('timing synchronous(delay: delay, idle: 2)', 'timing asynchronous'))
    const a = makeLayout(asyncP, 2, [3, 5])
    expect(a.channel[0][0].bits).toBe(1)
    expect(a.idle).toBeNull()
  })

  it('evaluates type bounds with the constants given, not the declared ones', () => {
    const l = makeLayout(protocolOf(lighthouse), 1, [3, 12])
    expect(l.vars[0].hi).toBe(12)
    expect(l.scalar[0][0]!.bits).toBe(4)
  })

  it('refuses a non-positive delay with the timing span', () => {
    const p = protocolOf(lighthouse)
    let err: unknown
    try {
      makeLayout(p, 2, [0, 5])
    } catch (e) {
      err = e
    }
    expect(err).toBeInstanceOf(ModelSetupError)
    expect((err as ModelSetupError).message).toMatch(/delay/)
    expect((err as ModelSetupError).span.line).toBe(p.timing.span.line)
  })

  it('refuses an empty range', () => {
    expect(() => makeLayout(protocolOf(lighthouse), 2, [3, -1])).toThrow(/empty/)
  })

  it('refuses an initial value outside its type', () => {
    const p = protocolOf(`protocol buoy {
  const start = 2
  timing asynchronous
  state level: 0..3 = start
}`)
    expect(() => compileInstance(p, 1, [7])).toThrow(/initial value 7 of 'level'.*outside its type 0\.\.3/)
  })
})
