// Oracle: every term is compared with the same quantity read from the canonical JSON of the state
// (decode.ts), an independent path from the packed field reads the terms compile to.
import { describe, expect, it } from 'vitest'
import { explore } from '../../kernels/explore/reach'
import type { ProcRef, Span, Term } from '../../kernels/language/model'
import { canonicalState } from '../../kernels/model/decode'
import { channelEmpty, compileTerm, isCrashed, isStable } from '../../kernels/model/observe'
import { instanceOf } from './fixtures'

const sp: Span = { line: 1, column: 1, endLine: 1, endColumn: 1, from: 0, to: 0 }
const P: ProcRef = { k: 'var', index: 0, span: sp }
const Q: ProcRef = { k: 'var', index: 1, span: sp }

const harbour = `protocol harbour {
  timing synchronous(delay: 2, idle: 1)
  faults crash
  message horn(n: 0..1)
  message bell
  state tally: 0..2 = 0
  state heard[peer]: 0..1 = 0
  on horn(x) from q { heard[q] := x }
  on bell from q { tally := min(tally + 1, 2) }
  step { broadcast horn(tally % 2)  if tally = 0 { broadcast bell } }
}`

function everyState(n: number) {
  const inst = instanceOf(harbour, n)
  const r = explore(inst)
  const out: { off: number; json: any }[] = []
  for (let k = 0; k < r.states; k++) out.push({ off: k * inst.words, json: JSON.parse(canonicalState(inst, r.store.data, k * inst.words)) })
  return { inst, data: r.store.data, out }
}

describe('property terms', () => {
  it('reads p.x and p.x[q] for the assigned processes', () => {
    const { inst, data, out } = everyState(2)
    const count = compileTerm(inst, { k: 'member', proc: P, index: 0, peer: null, span: sp }, [1, 0])
    const heard = compileTerm(inst, { k: 'member', proc: P, index: 1, peer: Q, span: sp }, [1, 0])
    for (const s of out) {
      expect(count(data, s.off)).toBe(s.json.procs[1].vars.tally)
      expect(heard(data, s.off)).toBe(s.json.procs[1].peers.heard['1'])
    }
  })

  it('reads alive and crashed, and #n as process n', () => {
    const { inst, data, out } = everyState(2)
    const alive2 = compileTerm(inst, { k: 'alive', proc: { k: 'fixed', n: 2, span: sp }, span: sp }, [])
    const crashed1 = compileTerm(inst, { k: 'crashed', proc: P, span: sp }, [0, 1])
    const crashedOf1 = isCrashed(inst, 0)
    let someCrash = false
    for (const s of out) {
      expect(alive2(data, s.off)).toBe(s.json.procs[1].alive)
      expect(crashed1(data, s.off)).toBe(1 - s.json.procs[0].alive)
      expect(crashedOf1(data, s.off)).toBe(s.json.procs[0].alive === 0)
      if (s.json.procs[0].alive === 0) someCrash = true
    }
    expect(someCrash).toBe(true)
  })

  it('reads pending(M, q -> p) as some value of kind M in flight on q->p', () => {
    const { inst, data, out } = everyState(2)
    const horn = compileTerm(inst, { k: 'pending', message: 0, from: Q, to: P, span: sp }, [0, 1])
    const bell = compileTerm(inst, { k: 'pending', message: 1, from: Q, to: P, span: sp }, [0, 1])
    const empty = channelEmpty(inst, 1, 0)
    let sawBoth = [false, false]
    for (const s of out) {
      const list: string[] = s.json.channels['2->1']
      const h = list.some((m) => m.startsWith('horn(')) ? 1 : 0
      const b = list.some((m) => m.startsWith('bell@')) ? 1 : 0
      expect(horn(data, s.off)).toBe(h)
      expect(bell(data, s.off)).toBe(b)
      expect(empty(data, s.off)).toBe(list.length === 0)
      sawBoth = [sawBoth[0] || h === 1, sawBoth[1] || b === 1]
    }
    expect(sawBoth).toEqual([true, true])
  })

  it('evaluates arithmetic and comparisons over atoms', () => {
    const { inst, data, out } = everyState(2)
    const c: Term = { k: 'member', proc: P, index: 0, peer: null, span: sp }
    const t: Term = {
      k: 'bin', op: '>=', span: sp,
      left: { k: 'bin', op: '+', left: c, right: { k: 'max', left: { k: 'lit', value: 1, span: sp }, right: { k: 'neg', arg: c, span: sp }, span: sp }, span: sp },
      right: { k: 'lit', value: 2, span: sp },
    }
    const f = compileTerm(inst, t, [0, 1])
    for (const s of out) {
      const v = s.json.procs[0].vars.tally
      expect(f(data, s.off)).toBe(v + Math.max(1, -v) >= 2 ? 1 : 0)
    }
  })

  it('refuses a reference to a process the instance does not have', () => {
    const { inst } = everyState(2)
    expect(() => compileTerm(inst, { k: 'alive', proc: { k: 'fixed', n: 3, span: sp }, span: sp }, [])).toThrow(/#3/)
  })

  it('reads the stable flag under eventually synchronous, and true elsewhere', () => {
    const stab = instanceOf(harbour.replace('synchronous(delay: 2, idle: 1)', 'eventually synchronous(delay: 2, idle: 1)'), 1)
    const init = stab.initialStates()
    expect(isStable(stab)(init, 0)).toBe(false)
    const sync = instanceOf(harbour, 1)
    expect(isStable(sync)(sync.initialStates(), 0)).toBe(true)
  })
})
