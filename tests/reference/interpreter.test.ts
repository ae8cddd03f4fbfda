// Hand-checked tests of the reference interpreter itself, so that the oracle of the differential
// tests is checked too. Oracle here: counts derived by hand from semantics.md, the derivation in
// a comment beside each case.
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { ProtocolModel } from '../../kernels/language/model'
import { referenceReachable } from './interpreter'

function protocolOf(body: string): ProtocolModel {
  const nb = analyzeNotebook('```protocol\n' + body + '\n```\n')
  const errors = nb.diagnostics.filter((d) => d.severity === 'error')
  expect(errors.map((d) => `${d.line}:${d.column} ${d.message}`)).toEqual([])
  return nb.protocols[0]
}

function parsed(s: string): any {
  return JSON.parse(s)
}

const lighthouse = (timing: string, faults = 'none') => `protocol lighthouse {
  timing ${timing}
  faults ${faults}
  message flash
  state seen: bool = false
  on flash from q { seen := true }
  step { broadcast flash }
}`

describe('canonical form', () => {
  it('writes the DEVELOPERS.md shape with sorted keys, 1-based peers and @age', () => {
    const p = protocolOf(`protocol buoys {
  timing synchronous(delay: 1, idle: 1)
  message bell(tone: 0..2)
  state rang[peer]: bool = false
  state tone: 0..2 = 2
  step { broadcast bell(tone) }
}`)
    const r = referenceReachable(p, 2)
    // Lock-step: the empty initial state, then every tick both send bell(2), which arrives at age 1.
    expect([...r.states].sort()).toEqual([
      '{"channels":{"1->2":["bell(2)@1"],"2->1":["bell(2)@1"]},"procs":[{"alive":1,"idle":0,"peers":{"rang":{"2":0}},"vars":{"tone":2}},{"alive":1,"idle":0,"peers":{"rang":{"1":0}},"vars":{"tone":2}}]}',
      '{"channels":{"1->2":[],"2->1":[]},"procs":[{"alive":1,"idle":0,"peers":{"rang":{"2":0}},"vars":{"tone":2}},{"alive":1,"idle":0,"peers":{"rang":{"1":0}},"vars":{"tone":2}}]}',
    ])
  })

  it('omits idle and ages under asynchronous and adds stable under eventually synchronous', () => {
    const a = referenceReachable(protocolOf(lighthouse('asynchronous')), 2)
    for (const s of a.states) {
      const o = parsed(s)
      expect(o.procs[0].idle).toBeUndefined()
      expect('stable' in o).toBe(false)
      for (const items of Object.values(o.channels) as string[][]) for (const m of items) expect(m).toBe('flash')
    }
    const b = referenceReachable(protocolOf(lighthouse('eventually synchronous(delay: 1, idle: 1)')), 2)
    for (const s of b.states) expect([0, 1]).toContain(parsed(s).stable)
  })
})

describe('lock-step ticks', () => {
  it('a lock-step heartbeat of two reaches three states', () => {
    // s0 empty -> s1 (flash in flight both ways, seen 0) -> s2 (seen 1) -> s2: 3 states and
    // the pairs s0s1, s1s2, s2s2.
    const r = referenceReachable(protocolOf(lighthouse('synchronous(delay: 1, idle: 1)')), 2)
    expect([r.states.size, r.transitions, r.complete, r.modelError]).toEqual([3, 3, true, null])
  })

  it('handles two messages from one sender in message-value order', () => {
    // Each tick both send tide(0) and tide(1); the handler of tide(1) runs last, so mark becomes 1:
    // s0 -> s1 (messages in flight, mark 0) -> s2 (mark 1) -> s2. Handling in the reverse order
    // would leave mark at 0 and give only 2 states.
    const r = referenceReachable(
      protocolOf(`protocol quay {
  timing synchronous(delay: 1, idle: 1)
  message tide(a: 0..1)
  state mark: 0..1 = 0
  on tide(a) from q { mark := a }
  step {
    broadcast tide(1)
    broadcast tide(0)
  }
}`),
      2,
    )
    expect([r.states.size, r.transitions]).toEqual([3, 3])
  })

  it('an overdue message must be received, a younger one may wait', () => {
    // delay 2, everyone steps: after any tick each channel holds flash@1 (just sent) and maybe
    // flash@2 (sent the tick before and not taken; it must be taken next tick). States: the
    // initial one and {@1} or {@1,@2} per channel: 1 + 4. From the initial state one successor;
    // from each other state the two receivers each take flash@1 or not: 4. Pairs: 1 + 4 * 4.
    const r = referenceReachable(
      protocolOf(`protocol ferry {
  timing synchronous(delay: 2, idle: 1)
  message flash
  state lit: bool = false
  step { broadcast flash }
}`),
      2,
    )
    expect([r.states.size, r.transitions]).toEqual([5, 17])
  })

  it('the idle bound forces a step once the idle counter reaches idle - 1', () => {
    // idle 2, one process toggling lamp when it steps. (lamp, idle): (0,0) -> (0,1) | (1,0);
    // (0,1) must step -> (1,0); (1,0) -> (1,1) | (0,0); (1,1) -> (0,0). 4 states, 6 pairs.
    const r = referenceReachable(
      protocolOf(`protocol beacon {
  timing synchronous(delay: 1, idle: 2)
  state lamp: bool = false
  step { lamp := not lamp }
}`),
      1,
    )
    expect([r.states.size, r.transitions]).toEqual([4, 6])
  })
})

describe('asynchronous ticks', () => {
  it('two processes that only broadcast reach every channel combination', () => {
    // Each channel is empty or {flash}: 4 states. From (empty, empty) 4 successors; from a state
    // with one full channel 3 (the receiver empties it only by stepping, which refills the
    // other); from (full, full) 3 (both empty at once would need both to take and neither to
    // send). Pairs: 4 + 3 + 3 + 3.
    const r = referenceReachable(
      protocolOf(`protocol jetty {
  timing asynchronous
  message flash
  state lit: bool = false
  step { broadcast flash }
}`),
      2,
    )
    expect([r.states.size, r.transitions]).toEqual([4, 13])
  })
})

describe('eventually synchronous ticks', () => {
  it('the stable flag is set once and the bound applies from that tick', () => {
    // One process toggling lamp, idle 1. (lamp, stable): (0,0) -> (0,0) idle | (1,0) step |
    // (1,1) stable now, so it must step; (1,0) -> (1,0) | (0,0) | (0,1); (1,1) -> (0,1) -> (1,1).
    // 4 states, 3 + 3 + 1 + 1 pairs.
    const r = referenceReachable(
      protocolOf(`protocol signal {
  timing eventually synchronous(delay: 1, idle: 1)
  state lamp: bool = false
  step { lamp := not lamp }
}`),
      1,
    )
    expect([r.states.size, r.transitions]).toEqual([4, 8])
  })
})

describe('crashes', () => {
  it('one process either keeps stepping or crashes for good', () => {
    // s0 -> s0 (steps) | s0' (crashed); s0' -> s0'. 2 states, 3 pairs.
    const r = referenceReachable(protocolOf(lighthouse('synchronous(delay: 1, idle: 1)', 'crash')), 1)
    expect([r.states.size, r.transitions]).toEqual([2, 3])
  })

  it('discards messages to a crashed process and keeps those it sent', () => {
    const r = referenceReachable(protocolOf(lighthouse('synchronous(delay: 2, idle: 1)', 'crash')), 2)
    let senderCrashedWithMailInFlight = false
    for (const s of r.states) {
      const o = parsed(s)
      if (o.procs[1].alive === 0) expect(o.channels['1->2']).toEqual([])
      if (o.procs[0].alive === 0) {
        expect(o.procs[0].idle).toBe(0)
        if (o.channels['1->2'].length > 0 && o.procs[1].alive === 1) senderCrashedWithMailInFlight = true
      }
    }
    expect(senderCrashedWithMailInFlight).toBe(true)
  })
})

describe('initial states and choices', () => {
  it('any branches per process and per peer', () => {
    // Three processes, two peers each, a bool entry per peer: 2^6 initial states, all fixed points.
    const r = referenceReachable(
      protocolOf(`protocol moorings {
  timing synchronous(delay: 1, idle: 1)
  state tied[peer]: bool = any
  step { skip }
}`),
      3,
    )
    expect([r.states.size, r.transitions]).toEqual([64, 64])
  })

  it('one of a range branches once per value', () => {
    // One process: mark 0 -> {0, 1, 2}, and each of the 3 states -> the same 3: 3 states, 9 pairs.
    const r = referenceReachable(
      protocolOf(`protocol dock {
  timing synchronous(delay: 1, idle: 1)
  state mark: 0..2 = 0
  step { mark := one of 0..2 }
}`),
      1,
    )
    expect([r.states.size, r.transitions]).toEqual([3, 9])
  })
})

describe('model errors', () => {
  it('a value outside its type ends the branch and is reported', () => {
    // mark 0 -> mark 1 -> (mark 2 is outside 0..1): 2 states, 1 pair, an error.
    const r = referenceReachable(
      protocolOf(`protocol tally {
  timing synchronous(delay: 1, idle: 1)
  state mark: 0..1 = 0
  step { mark := mark + 1 }
}`),
      1,
    )
    expect([r.states.size, r.transitions]).toEqual([2, 1])
    expect(r.modelError).toMatch(/mark/)
  })

  it('division by zero ends the branch and is reported', () => {
    const r = referenceReachable(
      protocolOf(`protocol gauge {
  timing synchronous(delay: 1, idle: 1)
  state mark: 0..1 = 0
  step { mark := 1 / mark }
}`),
      1,
    )
    expect([r.states.size, r.transitions]).toEqual([1, 0])
    expect(r.modelError).toMatch(/division by zero/)
  })
})

describe('limits', () => {
  const moorings = `protocol moorings {
  timing synchronous(delay: 1, idle: 1)
  state tied[peer]: bool = any
  step { skip }
}`

  it('stops as incomplete at the state limit', () => {
    // 64 initial states (see above) exceed a limit of 10.
    const r = referenceReachable(protocolOf(moorings), 3, undefined, 10)
    expect(r.complete).toBe(false)
    expect(r.states.size).toBe(10)
  })

  it('stops as incomplete when the tick budget runs out', () => {
    // Each of the 64 states has one tick; a budget of 20 ticks runs out before all are expanded.
    const r = referenceReachable(protocolOf(moorings), 3, undefined, 1000, 20)
    expect(r.complete).toBe(false)
    const full = referenceReachable(protocolOf(moorings), 3, undefined, 1000, 64)
    expect(full.complete).toBe(true)
  })

  it('overrides constants by name or by position', () => {
    // mark starts at `start`: one state per setting, a fixed point.
    const p = protocolOf(`protocol weir {
  const start = 1
  timing synchronous(delay: 1, idle: 1)
  state mark: 0..2 = start
  step { skip }
}`)
    const at = (r: ReturnType<typeof referenceReachable>) => [...r.states].map((s) => parsed(s).procs[0].vars.mark)
    expect(at(referenceReachable(p, 1))).toEqual([1])
    expect(at(referenceReachable(p, 1, { start: 2 }))).toEqual([2])
    expect(at(referenceReachable(p, 1, [0]))).toEqual([0])
  })
})
