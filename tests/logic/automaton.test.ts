import { describe, expect, it } from 'vitest'
import { type Automaton, buildAutomaton, labelHolds, ltlToAutomaton, showAutomaton, transitionMarks } from '../../kernels/logic/automaton'
import { findAcceptingLasso } from '../../kernels/logic/emptiness'
import { always, and, atom, eventually, FALSE, next, nnf, not, show, TRUE, until, type Ltl } from '../../kernels/logic/ltl'
import { checkLtl, productGraph } from '../../kernels/logic/product'
import { holdsOn, Random, randomLtl, randomWord, wordSystem, type LassoWord } from './lasso'

const p = atom(0), q = atom(1), r = atom(2)

/** Whether the automaton has an accepting run on the word: emptiness of its product with the word. */
function accepts(aut: Automaton, w: LassoWord): boolean {
  const g = productGraph(wordSystem(w), aut)
  return findAcceptingLasso(g, g.allMarks).kind === 'lasso'
}

const showWord = (w: LassoWord) => `${JSON.stringify(w.prefix)} (${JSON.stringify(w.loop)})^ω`

describe('automaton language', () => {
  // Oracle: the direct evaluator of tests/logic/lasso.ts (textbook semantics on u·v^ω), which uses
  // neither normal forms nor automata.
  it('accepts exactly the words that satisfy the formula, on 10,000 generated (formula, lasso word) pairs', () => {
    const r = new Random(20260401)
    let satisfied = 0
    for (let i = 0; i < 10_000; i++) {
      const atoms = 2 + r.int(2)
      const f = randomLtl(r, 1 + r.int(4), atoms)
      const w = randomWord(r, atoms)
      const expected = holdsOn(f, w)
      if (expected) satisfied++
      const aut = ltlToAutomaton(f)
      const got = accepts(aut, w)
      if (got !== expected) {
        throw new Error(`case ${i}: ${show(f)} on ${showWord(w)}: evaluator ${expected}, automaton ${got}\n${showAutomaton(aut)}`)
      }
    }
    // Both outcomes occur often enough for the comparison to mean something.
    expect(satisfied).toBeGreaterThan(2000)
    expect(satisfied).toBeLessThan(8000)
  })

  it('checkLtl on the word as a one-run system agrees with the evaluator, on the same kind of pairs', () => {
    const r = new Random(7)
    for (let i = 0; i < 3000; i++) {
      const atoms = 2 + r.int(2)
      const f = randomLtl(r, 1 + r.int(4), atoms)
      const w = randomWord(r, atoms)
      const v = checkLtl(wordSystem(w), f)
      if (v.holds !== holdsOn(f, w)) throw new Error(`case ${i}: ${show(f)} on ${showWord(w)}: evaluator ${holdsOn(f, w)}, checkLtl ${v.holds}`)
    }
  })

  it('the tableau without rewriting accepts the same words as the evaluator', () => {
    // Same oracle; this exercises GPVW on formulas that simplify would have reshaped.
    const r = new Random(99)
    for (let i = 0; i < 2000; i++) {
      const f = randomLtl(r, 1 + r.int(3), 2)
      const w = randomWord(r, 2)
      const aut = buildAutomaton(nnf(f))
      if (accepts(aut, w) !== holdsOn(f, w)) throw new Error(`case ${i}: ${show(f)} on ${showWord(w)}\n${showAutomaton(aut)}`)
    }
  })

  it('handles the highest atom, 31, whose bit is the sign bit of a 32-bit mask', () => {
    // Oracle: the direct evaluator.
    const hi = atom(31), lo = atom(0)
    const w = { prefix: [1 << 31], loop: [1, (1 << 31) | 1] }
    for (const f of [hi, always(hi), eventually(always(lo)), always(eventually(hi)), until(hi, lo), not(hi)]) {
      expect(accepts(ltlToAutomaton(f), w), show(f)).toBe(holdsOn(f, w))
    }
  })

  it('checks the first letter against an initial state', () => {
    // p holds at position 0 only: `p` is satisfied, `next p` is not (evaluator agrees, asserted too).
    const w = { prefix: [1], loop: [0] }
    expect(holdsOn(p, w)).toBe(true)
    expect(accepts(ltlToAutomaton(p), w)).toBe(true)
    expect(holdsOn(next(p), w)).toBe(false)
    expect(accepts(ltlToAutomaton(next(p)), w)).toBe(false)
  })
})

describe('automaton size', () => {
  // Baier and Katoen, Principles of Model Checking (2008), Sect. 4.3 and 5.2 (sizes recalled from
  // memory): their NBAs carry letters on transitions and have 1 state for `always p`, 2 for
  // `eventually p`, `always eventually p`, `eventually always p` and `p until q`. Our labels sit on
  // states, and then an automaton that must accept every continuation after reading p (or q) needs a
  // state for that continuation besides the one that reads p: the bound for `eventually p` and
  // `p until q` is the textbook's plus that one state (3), and it is also the least possible: with
  // two states, one must read p and the other accept the rest with label true, which leaves no
  // non-accepting state to wait in.
  const cases: [string, Ltl, number][] = [
    ['always p', always(p), 1],
    ['eventually p', eventually(p), 3],
    ['always eventually p', always(eventually(p)), 2],
    ['eventually always p', eventually(always(p)), 2],
    ['p until q', until(p, q), 3],
  ]
  for (const [name, f, bound] of cases) {
    it(`${name} has at most ${bound} state${bound > 1 ? 's' : ''}`, () => {
      const aut = ltlToAutomaton(f)
      expect(aut.states, showAutomaton(aut)).toBeLessThanOrEqual(bound)
      // Not smaller than possible either: each of these needs at least this many states with labels on states.
      expect(aut.states).toBe(bound)
    })
  }

  it('always p is one state labelled p with a self-loop and no acceptance sets', () => {
    const aut = ltlToAutomaton(always(p))
    expect(Array.from(aut.initial)).toEqual([0])
    expect(aut.mustTrue[0]).toBe(1)
    expect(Array.from(aut.succ.subarray(aut.succStart[0], aut.succStart[1]))).toEqual([0])
    expect(aut.acceptanceSets).toBe(0)
  })

  it('always eventually p has one acceptance set, on the state that reads p', () => {
    const aut = ltlToAutomaton(always(eventually(p)))
    expect(aut.acceptanceSets).toBe(1)
    for (let s = 0; s < aut.states; s++) expect(transitionMarks(aut, s) === 1).toBe(aut.mustTrue[s] === 1)
  })

  it('drops a state that another state can stand in for', () => {
    // The negation of a detector property, always a0 and eventually not a1 and always eventually not a2.
    // Before seeing not a1 the automaton needs two states for the always-eventually part and one
    // to read not a1, after it two more: 5 (counted by hand from the construction; not a
    // published size). Without the removal, the tableau also keeps a state reading
    // a0, not a1 and not a2 at once, which the state reading a0 and not a1 stands in for.
    const f = and(always(p), and(eventually(not(q)), always(eventually(not(r)))))
    expect(ltlToAutomaton(f).states).toBeLessThanOrEqual(5)
  })

  it('false has no states and true is one unconstrained state', () => {
    expect(ltlToAutomaton(FALSE).states).toBe(0)
    expect(ltlToAutomaton(not(TRUE)).initial.length).toBe(0)
    const t = ltlToAutomaton(TRUE)
    expect(t.states).toBe(1)
    expect(labelHolds(t, 0, 0)).toBe(true)
  })
})
