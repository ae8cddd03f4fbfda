// Oracle for the counts below: derivation by hand, written beside each case (state by state).
import { describe, expect, it } from 'vitest'
import { explore } from '../../kernels/explore/reach'
import { canonicalState } from '../../kernels/model/decode'
import { channelIndex } from '../../kernels/model/layout'
import { heardPair, instanceOf } from './fixtures'

const counter = (timing: string, k = 3) => `protocol orchard {
  const k = ${k}
  timing ${timing}
  state c: 0..k - 1 = 0
  step { c := (c + 1) % k }
}`

function counts(body: string, n: number) {
  const r = explore(instanceOf(body, n))
  expect(r.complete).toBe(true)
  return [r.states, r.transitions]
}

describe('synchronous timing', () => {
  it('a lone counter mod 3 in lock-step has 3 states and 3 transitions', () => {
    // idle: 1 forces a step every tick: 0 -> 1 -> 2 -> 0.
    expect(counts(counter('synchronous(delay: 1, idle: 1)'), 1)).toEqual([3, 3])
  })

  it('a lone counter mod 3 with idle bound 2 has 6 states and 9 transitions', () => {
    // States (c, idle) for c in 0..2, idle in 0..1, all reachable. From (c, 0): step to (c+1, 0)
    // or idle to (c, 1); from (c, 1) the step is forced: 3*2 + 3*1 = 9 transitions.
    expect(counts(counter('synchronous(delay: 1, idle: 2)'), 1)).toEqual([6, 9])
  })

  it('two lock-step processes broadcasting one kind have 3 states and 3 transitions', () => {
    // S0 (nothing heard, channels empty) -> S1 (beat@1 both ways) -> S2 (both heard, beat@1 both
    // ways, the overdue copies received and fresh ones sent) -> S2.
    expect(counts(heardPair('synchronous(delay: 1, idle: 1)', 'none'), 2)).toEqual([3, 3])
  })

  it('with crashes the lock-step pair has 13 states and 28 transitions', () => {
    // (alive1 heard1, alive2 heard2, channels). S0, S1, S2 as without crashes; each has 4 crash
    // subsets: S0 -> S1 | A=(dead 0, alive 0) | B (mirror) | D (both dead); S1 -> S2 |
    // E=(dead 0, alive 1: the beat in flight from the crashed sender is still received) | F | D;
    // S2 -> S2 | G=(dead 1, alive 1) | H | I=(both dead, heard). A, B, E, F, G, H loop or crash
    // their survivor (A, B -> D; E -> J=(dead 0, dead 1); F -> K; G, H -> I): 2 each.
    // D, I, J, K only loop. States: 13. Transitions: 3*4 + 6*2 + 4*1 = 28.
    expect(counts(heardPair('synchronous(delay: 1, idle: 1)', 'crash'), 2)).toEqual([13, 28])
  })

  it('a sent message is not received in the tick it is sent', () => {
    const inst = instanceOf(heardPair('synchronous(delay: 1, idle: 1)', 'none'), 2)
    const init = inst.initialStates()
    const next: string[] = []
    inst.successors(init, 0, (dst) => {
      next.push(canonicalState(inst, dst, 0))
    })
    expect(next).toHaveLength(1)
    expect(JSON.parse(next[0]).procs.map((p: { vars: { heard: number } }) => p.vars.heard)).toEqual([0, 0])
    expect(JSON.parse(next[0]).channels).toEqual({ '1->2': ['beat@1'], '2->1': ['beat@1'] })
  })

  it('ages copies up to the delay and then forces their receipt', () => {
    // delay 2, idle 1: the receiver may take a copy at age 1 or leave it to age 2, where it must.
    const body = `protocol quay {
  timing synchronous(delay: 2, idle: 1)
  message bell
  state rung: 0..1 = 0
  state heard: 0..3 = 0
  on bell from q { heard := min(heard + 1, 3) }
  step { if rung = 0 { broadcast bell  rung := 1 } }
}`
    const inst = instanceOf(body, 2)
    const r = explore(inst)
    const states = [...Array(r.states).keys()].map((k) => JSON.parse(canonicalState(inst, r.store.data, k * inst.words)))
    // Every state's channels hold ages 1..2 only, and an age-2 copy never survives a step.
    for (const s of states) for (const list of Object.values(s.channels) as string[][]) for (const m of list) expect(m).toMatch(/^bell@[12]$/)
    // Final states: both heard exactly once, nothing in flight.
    expect(states.some((s) => s.procs.every((p: { vars: { heard: number } }) => p.vars.heard === 1) && Object.values(s.channels).every((l) => (l as string[]).length === 0))).toBe(true)
    expect(states.every((s) => s.procs.every((p: { vars: { heard: number } }) => p.vars.heard <= 1))).toBe(true)
  })
})

describe('asynchronous timing', () => {
  it('a lone counter mod 3 has 3 states and 6 transitions', () => {
    // No idle counter: from each c, idle (stay) or step (c+1).
    expect(counts(counter('asynchronous'), 1)).toEqual([3, 6])
  })

  it('an asynchronous broadcasting pair has 11 states and 43 transitions', () => {
    // State (heard1, heard2, beat in 1->2, beat in 2->1). A step always refills the stepper's
    // outgoing channel, so heard2 = 1 implies beat in 2->1 unless 1 heard it (and mirror), and
    // once both heard some channel is full. Reachable: the 4 with nobody heard, 2 with only 2
    // heard ((0,1,*,1)), 2 mirrored, 3 with both heard (not both channels empty): 11.
    // Successors per state (each process: idle, step, or step and receive when its incoming
    // channel is full; combinations merged by target):
    // (0,0,0,0):4 (0,0,0,1):4 (0,0,1,0):4 (0,0,1,1):6 (0,1,0,1):4 (0,1,1,1):4 (1,0,1,0):4
    // (1,0,1,1):4 (1,1,0,1):3 (1,1,1,0):3 (1,1,1,1):3, total 43.
    expect(counts(heardPair('asynchronous', 'none'), 2)).toEqual([11, 43])
  })

  it('keeps no ages and no idle counters in the canonical form', () => {
    const inst = instanceOf(heardPair('asynchronous', 'none'), 2)
    const r = explore(inst)
    const text = canonicalState(inst, r.store.data, inst.words * (r.states - 1))
    expect(text).not.toMatch(/@|idle|stable/)
  })
})

describe('eventually synchronous timing', () => {
  it('a lone counter mod 2 with idle bound 2 has 8 states and 20 transitions', () => {
    // (c, idle, stable). Unstable: step -> (c+1, 0), idle -> (c, 1), each staying unstable or
    // setting stable; once the bound applies, idle 1 forces the step. From (c,0,0): 2 + 2;
    // from (c,1,0): 2 + 1; from (c,0,1): 2; from (c,1,1): 1. All 8 reachable:
    // 2*4 + 2*3 + 2*2 + 2*1 = 20.
    expect(counts(counter('eventually synchronous(delay: 1, idle: 2)', 2), 1)).toEqual([8, 20])
  })

  it('starts unstable and never unsets the flag', () => {
    const inst = instanceOf(counter('eventually synchronous(delay: 1, idle: 2)', 2), 1)
    const init = inst.initialStates()
    expect(JSON.parse(canonicalState(inst, init, 0)).stable).toBe(0)
    const r = explore(inst)
    const src = new Uint32Array(inst.words)
    for (let k = 0; k < r.states; k++) {
      r.store.get(k, src)
      const was = JSON.parse(canonicalState(inst, src, 0)).stable
      inst.successors(src, 0, (dst) => {
        if (was === 1) expect(JSON.parse(canonicalState(inst, dst, 0)).stable).toBe(1)
      })
    }
  })
})

describe('initial states', () => {
  it('branches every `any` per value, per process and per peer', () => {
    const inst = instanceOf(`protocol depot {
  timing asynchronous
  state a: 0..2 = any
  state b[peer]: bool = any
  state c: bool = true
}`, 2)
    // Per process 3 values of a times 2 of its one entry b: 6; two processes: 36.
    const init = inst.initialStates()
    expect(init.length / inst.words).toBe(36)
    const distinct = new Set<string>()
    for (let k = 0; k < 36; k++) distinct.add(canonicalState(inst, init, k * inst.words))
    expect(distinct.size).toBe(36)
  })

  it('describes initial values as people read them', () => {
    const inst = instanceOf(`protocol depot {
  timing asynchronous
  state mood: {calm, busy} = busy
  state b[peer]: bool = false
  state n: 1..4 = 3
}`, 2)
    expect(inst.describeInitial(inst.initialStates(), 0)).toEqual([
      { process: 1, values: { mood: 'busy', 'b[2]': false, n: 3 } },
      { process: 2, values: { mood: 'busy', 'b[1]': false, n: 3 } },
    ])
  })
})

describe('nondeterministic choice', () => {
  it('enumerates every option of `one of {..}`', () => {
    // x: 0 -> {1, 2}, 1 -> {1, 2}, 2 -> {1, 2}: 3 states, 6 transitions.
    expect(counts(`protocol mill {
  timing synchronous(delay: 1, idle: 1)
  state x: 0..3 = 0
  step { x := one of {1, 2} }
}`, 1)).toEqual([3, 6])
  })

  it('enumerates every combination of several choices in one step', () => {
    const inst = instanceOf(`protocol mill {
  timing synchronous(delay: 1, idle: 1)
  state x: 0..1 = 0
  state y: 0..2 = 0
  step { x := one of 0..1  y := one of 0..2 }
}`, 1)
    const seen = new Set<string>()
    inst.successors(inst.initialStates(), 0, (dst) => {
      seen.add(canonicalState(inst, dst, 0))
    })
    expect(seen.size).toBe(6)
  })

  it('enumerates choices that depend on an earlier choice', () => {
    // y ranges over 0..x: x = 0 gives 1 option, x = 1 two, x = 2 three: 6 outcomes.
    const inst = instanceOf(`protocol mill {
  timing synchronous(delay: 1, idle: 1)
  state x: 0..2 = 0
  state y: 0..2 = 0
  step { x := one of 0..2  y := one of 0..x }
}`, 1)
    let count = 0
    inst.successors(inst.initialStates(), 0, () => {
      count++
    })
    expect(count).toBe(6)
  })
})

describe('successor masks', () => {
  it('reports who stepped and which channels delivered', () => {
    const inst = instanceOf(heardPair('synchronous(delay: 1, idle: 1)', 'none'), 2)
    const init = inst.initialStates()
    const s1 = new Uint32Array(inst.words)
    inst.successors(init, 0, (dst, stepped, recv) => {
      expect(stepped).toBe(0b11)
      expect(recv).toBe(0)
      s1.set(dst)
    })
    inst.successors(s1, 0, (_dst, stepped, recv) => {
      expect(stepped).toBe(0b11)
      expect(recv).toBe((1 << channelIndex(2, 0, 1)) | (1 << channelIndex(2, 1, 0)))
    })
  })
})

describe('tick descriptions', () => {
  it('names crashes, steps, receipts, sends and changes, processes 1-based', () => {
    const inst = instanceOf(heardPair('synchronous(delay: 1, idle: 1)', 'crash'), 2)
    const init = inst.initialStates()
    const s1 = new Uint32Array(inst.words)
    inst.successors(init, 0, (dst, stepped) => {
      if (stepped === 0b11) s1.set(dst)
    })
    // From S1, the tick where process 1 crashes: 2 still receives 1's beat and sends nothing that lands.
    let target: Uint32Array | null = null
    inst.successors(s1, 0, (dst, stepped) => {
      if (stepped === 0b10) target = dst.slice()
    })
    const rec = inst.describeTick(s1, 0, target!, 0, 2)
    expect(rec).toEqual({
      tick: 2,
      crashed: [1],
      stepped: [2],
      received: [{ from: 1, to: 2, message: 'beat' }],
      sent: [],
      changes: [{ process: 2, variable: 'heard', from: false, to: true }],
    })
  })

  it('shows message fields as people read them', () => {
    const inst = instanceOf(`protocol signal {
  timing synchronous(delay: 1, idle: 1)
  message flag(colour: {red, white}, up: bool)
  state sent: bool = false
  step { broadcast flag(white, true)  sent := true }
}`, 2)
    const init = inst.initialStates()
    let next: Uint32Array | null = null
    inst.successors(init, 0, (dst) => {
      next = dst.slice()
    })
    const rec = inst.describeTick(init, 0, next!, 0, 1)
    expect(rec.sent).toEqual([
      { from: 1, to: 2, message: 'flag(white, true)' },
      { from: 2, to: 1, message: 'flag(white, true)' },
    ])
  })
})
