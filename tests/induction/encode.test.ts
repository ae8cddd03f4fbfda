// The tick encoding against the explicit successor function (model/tick.ts), in both directions:
// for sampled states of the type space (and every reachable state of small instances), the set of
// t the solver accepts with Tick(s, t) and no fault is exactly the set of explicit successors, and
// the solver finds a faulting tick exactly when the explicit function reports a model error.
// Oracle: the explicit successor function, itself tested against tests/reference/interpreter.ts.
import { afterAll, describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { ProtocolModel } from '../../kernels/language/model'
import { explore } from '../../kernels/explore/reach'
import { compileInstance, type Instance } from '../../kernels/model/instance'
import { writeField } from '../../kernels/model/layout'
import { encodeTick } from '../../kernels/induction/encode'
import { isState, stateVars, typeSpace, readState } from '../../kernels/induction/space'
import { loadSolver } from '../../kernels/induction/solver'
import { generateNotebook, Random } from '../reference/generate'
import { protocolOf } from '../model/fixtures'

afterAll(async () => { await (await loadSolver()).close() })

/** A random state of the type space (every field any value of its range). */
function randomState(inst: Instance, r: Random): Uint32Array {
  const { layout } = inst
  const w = new Uint32Array(inst.words)
  for (let p = 0; p < inst.n; p++) {
    writeField(w, 0, layout.alive[p], r.chance(0.75) ? 1 : 0)
    if (layout.idle) writeField(w, 0, layout.idle[p], r.int(0, layout.idleBound - 1))
    layout.vars.forEach((info, v) => {
      const f = layout.scalar[p][v]
      if (f) writeField(w, 0, f, r.int(0, info.hi - info.lo))
      for (const e of layout.entry[p][v]) if (e) writeField(w, 0, e, r.int(0, info.hi - info.lo))
    })
  }
  const ages = layout.tracksAges ? layout.delay : 1
  for (const row of layout.channel) for (const f of row) writeField(w, 0, f, r.chance(0.6) ? 0 : r.int(0, (1 << ages) - 1))
  if (layout.stable) writeField(w, 0, layout.stable, r.int(0, 1))
  return w
}

const key = (w: Uint32Array) => Array.from(w).join(',')

/** Compares the solver's successor set of each state with the explicit one. */
async function compare(inst: Instance, states: Uint32Array[]): Promise<number> {
  const { z } = await loadSolver()
  const { layout, protocol } = inst
  const s = stateVars(z, layout, 's')
  const t = stateVars(z, layout, 't')
  const tick = encodeTick(z, protocol, layout, inst.constants, s, t)
  const fault = tick.errors.length ? z.Or(...tick.errors.map((e) => e.when)) : z.Bool.val(false)
  const solver = new z.Solver()
  solver.add(typeSpace(z, layout, s), tick.relation)
  let compared = 0
  for (const st of states) {
    const explicit = new Set<string>()
    const error = inst.successors(st, 0, (dst) => { explicit.add(key(dst)) })
    solver.push()
    solver.add(isState(z, layout, s, st, 0))
    solver.push()
    solver.add(fault)
    expect(await solver.check(), `fault from ${key(st)}`).toBe(error ? 'sat' : 'unsat')
    solver.pop()
    solver.add(z.Not(fault))
    const succ = [...explicit].map((k) => Uint32Array.from(k.split(',').map(Number)))
    // Solver to explicit: no t outside the explicit successors satisfies the encoding.
    solver.push()
    solver.add(z.Not(z.Or(z.Bool.val(false), ...succ.map((w) => isState(z, layout, t, w, 0)))))
    const extra = await solver.check()
    const stray = extra === 'sat' ? key(readState(z, layout, t, solver.model())) : null
    expect(stray, `solver successor of ${key(st)} that is not explicit`).toBeNull()
    solver.pop()
    // Explicit to solver: every explicit successor satisfies the encoding.
    for (const w of succ) expect(await solver.check(isState(z, layout, t, w, 0)), `explicit successor ${key(w)} of ${key(st)}`).toBe('sat')
    solver.pop()
    compared++
  }
  return compared
}

function reachable(inst: Instance, max: number): Uint32Array[] {
  const r = explore(inst, { limit: 5000, continueOnError: true })
  const out: Uint32Array[] = []
  for (let k = 0; k < Math.min(r.states, max); k++) {
    const w = new Uint32Array(inst.words)
    r.store.get(k, w, 0)
    out.push(w)
  }
  return out
}

const every = (timing: string, faults: string) => `protocol depot {
  const cap = 2
  timing ${timing}
  faults ${faults}
  message load(n: 0..1)
  message done
  state stock: 0..cap = 0
  state mode: {idle, busy} = idle
  state seen[peer]: bool = any
  state tally: 0..2 = 0
  on load(n) from q {
    seen[q] := true
    if n = 1 and stock < cap { stock := stock + 1 } else if n = 0 { skip } else { send done to q }
  }
  on done from q { tally := min(tally + 1, 2) }
  step {
    mode := one of {idle, busy}
    if mode = busy { tally := one of 0..(cap / 2) }
    for q { if not seen[q] { send load(stock % 2) to q } }
    if every q: seen[q] { broadcast load(max(stock - 1, 0)) } else if (count q: seen[q]) >= 1 { broadcast done }
    if some q: seen[q] { stock := if stock > 0 then stock - 1 else 0 }
  }
}`

const TIMINGS = ['synchronous(delay: 2, idle: 2)', 'eventually synchronous(delay: 2, idle: 2)', 'asynchronous', 'synchronous(delay: 1, idle: 1)']

describe('the tick encoding equals the explicit successor function', () => {
  for (const timing of TIMINGS) {
    for (const faults of ['none', 'crash']) {
      test(`every construct, ${timing}, faults ${faults}, N = 1 and 2`, async () => {
        const p = protocolOf(every(timing, faults))
        for (const n of [1, 2]) {
          const inst = compileInstance(p, n, p.consts.map((c) => c.value))
          const r = new Random(n * 31 + timing.length + faults.length)
          const states = [...reachable(inst, 10), ...Array.from({ length: 10 }, () => randomState(inst, r))]
          expect(await compare(inst, states)).toBe(states.length)
        }
      }, 120_000)
    }
  }

  test('a model error in a step is found as a faulting tick', async () => {
    const p = protocolOf(`protocol ferry {
  timing asynchronous
  message go
  state load: 0..2 = 0
  state d: 0..1 = any
  on go from q { load := load + 1 }
  step { load := 2 / d broadcast go }
}`)
    const inst = compileInstance(p, 2, [])
    const r = new Random(5)
    expect(await compare(inst, Array.from({ length: 30 }, () => randomState(inst, r)))).toBe(30)
  }, 60_000)

  test('generated protocols of every timing', async () => {
    const seen = new Set<string>()
    for (let seed = 1; seed <= 12; seed++) {
      const nb = analyzeNotebook(generateNotebook(seed))
      if (nb.diagnostics.some((d) => d.severity === 'error')) continue
      const p: ProtocolModel = nb.protocols[0]
      seen.add(p.timing.kind)
      const inst = compileInstance(p, 2, p.consts.map((c) => c.value))
      const r = new Random(seed)
      const states = [...reachable(inst, 8), ...Array.from({ length: 8 }, () => randomState(inst, r))]
      expect(await compare(inst, states)).toBe(states.length)
    }
    expect([...seen].sort()).toEqual(['asynchronous', 'eventually synchronous', 'synchronous'])
  }, 300_000)
})
