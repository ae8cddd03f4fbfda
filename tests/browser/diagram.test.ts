// The counterexample diagram and tick table are pure functions of a Counterexample; the oracle is
// the fixture itself (we count what the fixture says must be drawn).
import { describe, expect, it } from 'vitest'
import { changesTable, counterexampleSvg, messageArrows } from '../../src/app/diagram'
import type { Counterexample } from '../../kernels/result'
import { lasso } from './fixtures'

describe('messageArrows', () => {
  it('pairs a receipt with the earlier send of the same message on the same channel', () => {
    const arrows = messageArrows(lasso)
    const beat21 = arrows.filter((a) => a.from === 2 && a.to === 1)
    expect(beat21).toEqual([{ from: 2, to: 1, message: 'beat', sendTick: 0, receiveTick: 1 }])
  })
  it('leaves a send that is never received open', () => {
    const open = messageArrows(lasso).filter((a) => a.from === 1 && a.to === 2)
    expect(open.map((a) => [a.sendTick, a.receiveTick])).toEqual([[0, null], [1, null]])
  })
  it('matches the oldest unmatched send first', () => {
    const cx: Counterexample = {
      kind: 'trace', message: 'm', initial: [], ticks: [
        { tick: 1, crashed: [], stepped: [1], received: [], sent: [{ from: 1, to: 2, message: 'ping' }], changes: [] },
        { tick: 2, crashed: [], stepped: [1], received: [], sent: [{ from: 1, to: 2, message: 'ping' }], changes: [] },
        { tick: 3, crashed: [], stepped: [2], received: [{ from: 1, to: 2, message: 'ping' }], sent: [], changes: [] },
      ],
    }
    expect(messageArrows(cx).map((a) => [a.sendTick, a.receiveTick])).toEqual([[0, 2], [1, null]])
  })
  it('keeps a receipt whose send the trace does not show', () => {
    const cx: Counterexample = { kind: 'lasso', message: 'm', initial: [], loopStart: 0, ticks: [
      { tick: 1, crashed: [], stepped: [2], received: [{ from: 1, to: 2, message: 'ping' }], sent: [], changes: [] },
    ] }
    expect(messageArrows(cx)).toEqual([{ from: 1, to: 2, message: 'ping', sendTick: null, receiveTick: 0 }])
  })
})

describe('counterexampleSvg', () => {
  const svg = counterexampleSvg(lasso, 2)
  it('draws one lane per process', () => {
    expect(svg.match(/class="lane"/g)).toHaveLength(2)
    expect(svg).toContain('process 1')
    expect(svg).toContain('process 2')
  })
  it('marks the crash of process 2', () => {
    expect(svg.match(/class="crash"/g)).toHaveLength(1)
    expect(svg).toContain('process 2 crashes in tick 2')
  })
  it('draws a complete arrow for the received message and open stubs for the others', () => {
    const drawn = svg.replace(/<g class="line-key">.*?<\/g>/g, '')
    expect(drawn.match(/class="msg"/g)).toHaveLength(1)
    // Both beats to process 2 are sent once it has crashed or as it crashes: dropped, not in flight.
    expect(drawn.match(/class="msg msg-dropped"/g)).toHaveLength(2)
    expect(drawn.match(/class="msg msg-open"/g)).toBeNull()
  })
  it('shades each state where an atom holds', () => {
    // the fixture's atoms hold in 2 + 1 states
    expect(svg.match(/class="atom-band"/g)).toHaveLength(3)
  })
  it('shades only the chosen atoms', () => {
    expect(counterexampleSvg(lasso, 2, { atoms: [1] }).match(/class="atom-band"/g)).toHaveLength(1)
  })
  it('brackets the loop of a lasso', () => {
    expect(svg).toContain('class="loop"')
    expect(counterexampleSvg({ ...lasso, kind: 'trace', loopStart: undefined }, 2)).not.toContain('class="loop"')
  })
  it('gives every tick a hover band keyed by its index', () => {
    expect(svg.match(/class="tick-band" data-tick="\d"/g)).toHaveLength(3)
  })
  it('escapes text taken from the counterexample', () => {
    const evil = counterexampleSvg({ ...lasso, message: '<script>x</script>', atoms: [{ text: '"><img src=x>', values: [true] }] }, 2)
    expect(evil).not.toContain('<script>')
    expect(evil).not.toContain('<img')
    expect(evil).toContain('&lt;script&gt;')
  })
})

describe('changesTable', () => {
  const table = changesTable(lasso)
  it('has a start row and one row per tick', () => {
    expect(table.match(/<tr data-tick=/g)).toHaveLength(3)
    expect(table).toContain('class="initial"')
  })
  it('lists crashes, receipts, sends and changes in words', () => {
    expect(table).toContain('process 2 crashes')
    expect(table).toContain('1 receives beat from 2')
    expect(table).toContain('1 sends beat to 2')
    expect(table).toContain('1: suspect[2] false → true')
  })
  it('marks where the loop starts', () => {
    expect(table).toMatch(/data-tick="2"><th scope="row">3<\/th><td><div class="ev-loop">/)
  })
})
