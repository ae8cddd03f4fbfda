import { describe, expect, it } from 'vitest'
import { ltlToAutomaton } from '../../kernels/logic/automaton'
import { ChunkedInt32 } from '../../kernels/base/chunked'
import { CURSOR_WORDS, findAcceptingLasso } from '../../kernels/logic/emptiness'
import { always, atom, eventually, type Ltl, next, not, show, until } from '../../kernels/logic/ltl'
import { checkLtl, type LtlVerdict, productGraph } from '../../kernels/logic/product'
import { type ExplicitSystem, explicitSystem, holdsOn, lassosOf, Random, randomLtl, randomSystem, wordOf } from './lasso'

const p = atom(0), q = atom(1)

/** Throws unless a violation's lasso is a real, fair run of the system on which the evaluator says f fails. */
function expectRealCounterexample(sys: ExplicitSystem, f: Ltl, v: LtlVerdict): void {
  if (v.holds !== false) throw new Error('expected a violation')
  const run = [...v.prefix, v.cycle[0]]
  expect(sys.starts).toContain(run[0])
  const has = (a: number, b: number, fair?: number) => sys.edges.some((e) => e.from === a && e.to === b && (fair === undefined || e.fair === fair))
  for (let i = 0; i + 1 < run.length; i++) expect(has(run[i], run[i + 1])).toBe(true)
  let fair = 0
  v.cycle.forEach((s, i) => {
    const t = v.cycle[(i + 1) % v.cycle.length]
    expect(has(s, t, v.cycleFairness[i]), `cycle edge ${s}->${t}`).toBe(true)
    fair |= v.cycleFairness[i]
  })
  const allFair = (1 << sys.fairnessSets) - 1
  expect(fair & allFair).toBe(allFair)
  // Oracle: the direct evaluator says the run violates f.
  expect(holdsOn(f, wordOf(sys, v.prefix, v.cycle)), show(f)).toBe(false)
}

describe('checkLtl', () => {
  // Two orchard valves: state 0 waits (p false), state 1 is open (p true).
  const edges = [{ from: 0, to: 0, fair: 0 }, { from: 0, to: 1, fair: 1 }, { from: 1, to: 1, fair: 1 }]

  it('ignores unfair runs: when the only violating run is unfair, the property holds', () => {
    const fairSys = explicitSystem(2, [0, 1], edges, [0], 1)
    expect(checkLtl(fairSys, eventually(p)).holds).toBe(true)
  })

  it('reports the same run as a violation when nothing is required of runs', () => {
    const free = explicitSystem(2, [0, 1], edges.map((e) => ({ ...e, fair: 0 })), [0], 0)
    const v = checkLtl(free, eventually(p))
    expect(v.holds).toBe(false)
    expect(v.holds === false && [v.prefix, v.cycle]).toEqual([[], [0]])
    expectRealCounterexample(free, eventually(p), v)
  })

  it('counts the atoms of the initial state', () => {
    // p holds in the initial state only (a harbour gate that opens once).
    const sys = explicitSystem(2, [1, 0], [{ from: 0, to: 1, fair: 0 }, { from: 1, to: 1, fair: 0 }], [0])
    expect(checkLtl(sys, p).holds).toBe(true)
    expect(checkLtl(sys, next(p)).holds).toBe(false)
    expect(checkLtl(sys, not(p)).holds).toBe(false)
  })

  // Oracle: brute-force enumeration of every fair lasso of up to 6 states, each judged by the
  // direct evaluator. A violation the enumeration finds must be found; a violation reported must
  // be a real fair run that the evaluator rejects.
  it('agrees with brute-force lasso enumeration on 600 generated systems under 0 to 2 fairness sets', () => {
    const r = new Random(31)
    let violated = 0
    for (let t = 0; t < 600; t++) {
      const fairness = r.int(3)
      const sys = randomSystem(r, 2, 4, fairness)
      const f = randomLtl(r, 1 + r.int(3), 2)
      const v = checkLtl(sys, f)
      const allFair = (1 << fairness) - 1
      let bruteViolated = false
      for (const l of lassosOf(sys, 6)) {
        if ((l.cycleFair & allFair) !== allFair) continue
        if (!holdsOn(f, wordOf(sys, l.states.slice(0, l.loopStart), l.states.slice(l.loopStart)))) { bruteViolated = true; break }
      }
      if (bruteViolated) expect(v.holds, `${show(f)} on ${JSON.stringify(sys.edges)}`).toBe(false)
      if (v.holds === false) { violated++; expectRealCounterexample(sys, f, v) }
    }
    expect(violated).toBeGreaterThan(100)
    expect(violated).toBeLessThan(500)
  })

  it('stops when asked and says so instead of giving a verdict', () => {
    const big = { fairnessSets: 0, initial: () => [0], successors: (s: number, to: number[], fair: number[]) => { to.push(s + 1); fair.push(0) }, atoms: () => 0 }
    const v = checkLtl(big, eventually(p), { shouldStop: () => true })
    expect(v.stopped).toBe(true)
    expect(v.holds).toBe(null)
  })
})

describe('productGraph', () => {
  it('numbers nodes densely and decodes them to (system state, automaton state)', () => {
    const sys = explicitSystem(3, [0, 1, 2], [{ from: 0, to: 1, fair: 0 }, { from: 1, to: 2, fair: 0 }, { from: 2, to: 0, fair: 0 }], [0])
    const aut = ltlToAutomaton(always(eventually(p)))
    const g = productGraph(sys, aut)
    const res = findAcceptingLasso(g, g.allMarks)
    expect(res.kind).toBe('lasso')
    // Nodes are numbered when first seen as a successor, so at least every visited node has an id.
    expect(g.size).toBeGreaterThanOrEqual(res.nodes)
    for (let id = 0; id < g.size; id++) {
      const { state, automaton } = g.decode(id)
      expect(state).toBeGreaterThanOrEqual(0)
      expect(state).toBeLessThan(3)
      expect(automaton).toBeLessThan(aut.states)
    }
  })

  it('puts fairness marks below the acceptance marks', () => {
    const sys = explicitSystem(1, [1], [{ from: 0, to: 0, fair: 3 }], [0], 2)
    const aut = ltlToAutomaton(always(eventually(p)))
    const g = productGraph(sys, aut)
    expect(g.allMarks).toBe(0b111)
    findAcceptingLasso(g, g.allMarks)
    const to: number[] = [], marks: number[] = []
    for (let id = 0; id < g.size; id++) g.successors(id, to, marks)
    // The automaton state that reads p is in the single acceptance set (bit 0 shifted by f = 2, so
    // bit 2); the other state is in none. Every edge keeps the system's fairness bits 0 and 1.
    expect(new Set(marks)).toEqual(new Set([0b011, 0b111]))
  })

  it('refuses more than 31 marks', () => {
    const sys = explicitSystem(1, [0], [{ from: 0, to: 0, fair: 0 }], [0], 31)
    expect(() => productGraph(sys, ltlToAutomaton(always(eventually(p))))).toThrow(/31 marks/)
  })

  it('pairs an automaton state only with system states its label holds of', () => {
    const sys = explicitSystem(2, [0b01, 0b10], [{ from: 0, to: 1, fair: 0 }, { from: 1, to: 1, fair: 0 }], [0])
    const aut = ltlToAutomaton(until(p, q))
    // Both numberings: dense (the system says how many states it has) and hashed (it does not).
    for (const s of [sys, { ...sys, states: undefined }]) {
      const g = productGraph(s, aut)
      expect(g.dense).toBe(s.states !== undefined)
      // Every node reachable from the initial nodes, found by a plain search of the graph.
      const seen = new Set(g.initial()), todo = [...seen]
      while (todo.length > 0) {
        const to: number[] = [], marks: number[] = []
        g.successors(todo.pop()!, to, marks)
        for (const w of to) if (!seen.has(w)) { seen.add(w); todo.push(w) }
      }
      expect(seen.size).toBeGreaterThan(1)
      for (const id of seen) {
        const { state, automaton } = g.decode(id)
        const a = sys.atoms(state)
        expect(((a & aut.mustTrue[automaton]) ^ aut.mustTrue[automaton]) | (a & aut.mustFalse[automaton])).toBe(0)
      }
    }
  })

  it('dense and hashed numberings give the same verdicts, node counts and lassos on 300 generated systems', () => {
    const r = new Random(77)
    let violated = 0
    for (let t = 0; t < 300; t++) {
      const sys = randomSystem(r, 2, 6, r.int(3))
      const f = randomLtl(r, 1 + r.int(3), 2)
      const dense = checkLtl(sys, f)
      const hashed = checkLtl({ ...sys, states: undefined }, f)
      expect(dense, show(f)).toEqual(hashed)
      if (dense.holds === false) violated++
    }
    expect(violated).toBeGreaterThan(30)
    expect(violated).toBeLessThan(270)
  })

  it('reads each node\'s edges lazily, in place or recomputed, with or without the letter table, exactly as successors appends them', () => {
    // Oracle: `successors`, which builds each row whole from the system's own `successors`.
    const r = new Random(91)
    for (let t = 0; t < 200; t++) {
      const sys = randomSystem(r, 2, 8, r.int(3))
      // The same edges as packed rows, as a recorded fair graph hands them to the product.
      const start = new ChunkedInt32(), target = new ChunkedInt32(), marks = new ChunkedInt32()
      for (let s = 0; s < sys.states; s++) {
        start.push(target.length)
        const to: number[] = [], fair: number[] = []
        sys.successors(s, to, fair)
        to.forEach((v, k) => { target.push(v); marks.push(fair[k]) })
      }
      start.push(target.length)
      const f = randomLtl(r, 1 + r.int(3), 2)
      const aut = ltlToAutomaton(not(f))
      const rows = { start, target, marks }
      const variants = [sys, { ...sys, rows }, { ...sys, states: undefined }, { ...sys, states: undefined, rows }]
      // The whole check agrees too: verdict, node count and lasso.
      const verdicts = variants.map((v) => checkLtl(v, f))
      for (const v of verdicts) expect(v, show(f)).toEqual(verdicts[0])
      for (const [variant, letters] of variants.flatMap((v) => [[v, true], [v, false]] as const)) {
        const g = productGraph(variant, aut, letters)
        const cursor = g.cursor!
        const cur = new Int32Array(2 * CURSOR_WORDS)
        // Every node the eager rows reach, each read through the cursor; a second node opened
        // above the first (as the search nests them) leaves the first one's cursor intact.
        const seen = new Set(g.initial()), todo = [...seen]
        while (todo.length > 0) {
          const v = todo.pop()!
          const to: number[] = [], ms: number[] = []
          g.successors(v, to, ms)
          cursor.open(v, cur, 0)
          const first = cursor.next(v, cur, 0), firstMark = cursor.mark
          cursor.open(v, cur, CURSOR_WORDS)
          const inner: number[][] = []
          for (let w = cursor.next(v, cur, CURSOR_WORDS); w >= 0; w = cursor.next(v, cur, CURSOR_WORDS)) inner.push([w, cursor.mark])
          cursor.close(v, cur, CURSOR_WORDS)
          const outer: number[][] = first < 0 ? [] : [[first, firstMark]]
          for (let w = cursor.next(v, cur, 0); w >= 0; w = cursor.next(v, cur, 0)) outer.push([w, cursor.mark])
          cursor.close(v, cur, 0)
          const want = to.map((w, k) => [w, ms[k]])
          expect(inner).toEqual(want)
          expect(outer).toEqual(want)
          for (const w of to) if (!seen.has(w)) { seen.add(w); todo.push(w) }
        }
      }
    }
  })
})
