// Issue 10, items 13 and 15: short temporal properties that used to explode in the translation,
// the translation's budget (with Stop and progress), and formulas over more than 32 atoms.
// Oracle throughout: the direct evaluator of tests/logic/lasso.ts (textbook semantics on u·v^ω),
// which uses no normal form, no rewriting, no predicates and no automaton. Sizes are asserted
// through the translation's work counters, never through time.
import { describe, expect, it, vi } from 'vitest'
import {
  type Automaton, ltlToAutomaton, showAutomaton, TRANSLATION_BUDGET, TranslationAborted, type TranslationWork,
} from '../../kernels/logic/automaton'
import { findAcceptingLasso } from '../../kernels/logic/emptiness'
import {
  abstractStates, always as G, and, atom, eventually as F, iff, type Ltl, nnf, nnfSize, not, or, show, size, stateHolds,
} from '../../kernels/logic/ltl'
import { checkLtl, productGraph } from '../../kernels/logic/product'
import { holdsOn, type LassoWord, letterWord, Random, randomLtl, randomWideWord, randomWord, wordSystem } from './lasso'

const a = (i: number) => atom(i)

/** Six levels of `eventually (a and always (b or eventually ...))`, the first reproduction. */
function nested(levels: number, i = 0): Ltl {
  return levels === 0 ? a(i) : F(and(a(i), G(or(a(i + 1), nested(levels - 1, i + 2)))))
}
/** `eventually always a0 or ... or eventually always a(n-1)`, the second. */
const fgDisjunction = (n: number) => Array.from({ length: n }, (_, i) => F(G(a(i)))).reduce((x, y) => or(x, y))
/** `a0 iff a1 iff ... iff a(n-1)`, the third (state atoms; as written, it nests to the left). */
const iffChain = (n: number, term: (i: number) => Ltl = a) => Array.from({ length: n }, (_, i) => term(i)).reduce((x, y) => iff(x, y))

/** Whether the automaton accepts the word: emptiness of its product with the word. */
function accepts(aut: Automaton, w: LassoWord): boolean {
  const g = productGraph(wordSystem(w), aut)
  return findAcceptingLasso(g, g.allMarks).kind === 'lasso'
}

/** The automaton of the negation (what a check builds) with its work counters. */
function negationAutomaton(f: Ltl, budget?: number) {
  const work = {} as TranslationWork
  const aut = ltlToAutomaton(not(f), { work, budget })
  return { aut, work }
}

/** Checks `f` on `count` random words over its atoms against the direct evaluator; returns how many it satisfies. */
function agreesOnWords(f: Ltl, atoms: number, count: number, seed: number, density = 0.7): number {
  const r = new Random(seed)
  let satisfied = 0
  for (let i = 0; i < count; i++) {
    const w = atoms <= 8 ? randomWord(r, atoms, 5, 5) : randomWideWord(r, atoms, 5, 5, density)
    const expected = holdsOn(f, w)
    if (expected) satisfied++
    const v = checkLtl(wordSystem(w), f)
    if (v.holds !== expected) throw new Error(`word ${i}: ${show(f)}: evaluator ${expected}, checkLtl ${v.holds}`)
  }
  return satisfied
}

describe('the three reproductions of item 13 translate within the budget', () => {
  it('six nested eventually (a and always (b or eventually ...)): 971 states, down from a translation that did not end in 60 s', () => {
    // Measured on this code: 971 states and 306,945 transitions, 1,148,549 units of work. The
    // previous tableau (GPVW with nodes keyed by Old and Next) built 718 raw states for four
    // levels and did not finish six.
    const f = nested(6)
    const { aut, work } = negationAutomaton(f)
    expect(work.created).toBeLessThanOrEqual(TRANSLATION_BUDGET)
    expect(aut.states).toBeLessThanOrEqual(971)
    agreesOnWords(nested(3), 8, 150, 31)
  })

  it('ten disjuncts of eventually always: 11 states (one per conjunct of the negation and one waiting state)', () => {
    // The negation is a conjunction of ten `always eventually not a_i`: the k+1-state automaton of
    // automaton.ts instead of the tableau's 2^10 = 1024 states with 2^20 transitions.
    const { aut, work } = negationAutomaton(fgDisjunction(10))
    expect(aut.states).toBe(11)
    expect(aut.acceptanceSets).toBe(10)
    expect(work.created).toBeLessThan(1000)
    const satisfied = agreesOnWords(fgDisjunction(10), 10, 200, 32, 0.3)
    expect(satisfied).toBeGreaterThan(10)
    expect(satisfied).toBeLessThan(190)
  })

  it('twenty disjuncts: the negation waits for each conjunct in turn, 40 states and one acceptance set', () => {
    // One set per conjunct would need 20 of the product's 31 marks; past 12 conjuncts the
    // translation uses the round-robin automaton instead.
    const { aut } = negationAutomaton(fgDisjunction(20))
    expect(aut.acceptanceSets).toBe(1)
    expect(aut.states).toBeLessThanOrEqual(40)
    const satisfied = agreesOnWords(fgDisjunction(20), 20, 150, 35, 0.15)
    expect(satisfied).toBeGreaterThan(5)
    expect(satisfied).toBeLessThan(145)
  })

  it('the formula itself, a disjunction of eventually always, is the union of small automata', () => {
    const work = {} as TranslationWork
    const aut = ltlToAutomaton(fgDisjunction(10), { work })
    // Two states per `eventually always a_i` before the reductions: 20.
    expect(work.rawStates).toBeLessThanOrEqual(20)
    expect(aut.states).toBeLessThanOrEqual(20)
  })

  it('eight-term iff chains of state atoms are one predicate: always (chain) negates to a 3-state automaton', () => {
    for (const f of [iffChain(8), G(iffChain(8)), F(G(iffChain(8))), G(F(iffChain(8)))]) {
      const { aut, work } = negationAutomaton(f)
      expect(aut.states, show(f)).toBeLessThanOrEqual(3)
      expect(aut.predicates?.length, show(f)).toBe(1)
      expect(work.created).toBeLessThan(200)
      agreesOnWords(f, 8, 150, 33)
    }
  })

  it('an eight-term iff chain of eventually a_i: a deterministic automaton of at most 3^8 states with one acceptance set', () => {
    // Measured: 6,305 states, 58,975 transitions, 137,378 units of work; the tableau alone built
    // 32,640 states with 15 acceptance sets (698,760 units).
    const { aut, work } = negationAutomaton(iffChain(8, (i) => F(a(i))))
    expect(aut.states).toBeLessThanOrEqual(3 ** 8)
    expect(aut.acceptanceSets).toBe(1)
    expect(work.created).toBeLessThan(200_000)
    for (const f of [iffChain(4, (i) => F(a(i))), iffChain(5, (i) => (i % 2 ? G(a(i % 3)) : F(a(i)))), G(iffChain(3, (i) => F(a(i))))]) {
      const satisfied = agreesOnWords(f, 5, 200, 34, 0.1)
      expect(satisfied, show(f)).toBeGreaterThan(0)
      expect(satisfied, show(f)).toBeLessThan(200)
    }
  })

  it('a 40-term iff chain of temporal parts is refused before its negation normal form is built', () => {
    // Its negation normal form has about 7 * 2^40 nodes: counted, not built.
    const work = {} as TranslationWork
    expect(() => ltlToAutomaton(not(iffChain(40, (i) => F(a(i)))), { work })).toThrow(TranslationAborted)
    expect(work.created).toBeGreaterThan(TRANSLATION_BUDGET)
    expect(nnfSize(not(iffChain(40, (i) => F(a(i)))))).toBeGreaterThan(2 ** 40)
  })

  it('nnfSize is the size of the negation normal form, on 2,000 generated formulas', () => {
    const r = new Random(12)
    for (let i = 0; i < 2000; i++) {
      const f = randomLtl(r, 1 + r.int(5), 3)
      expect(nnfSize(f), show(f)).toBe(size(nnf(f)))
    }
  })

})

describe('the translation budget, Stop and progress (item 13b)', () => {
  it('over budget, checkLtl gives no verdict and a reason naming the budget', () => {
    const v = checkLtl(wordSystem({ prefix: [], loop: [0] }), nested(6), { translation: { budget: 5000 } })
    expect(v.holds).toBe(null)
    expect(v.stopped).toBe(false)
    expect('reason' in v && v.reason).toMatch(/translation budget of 5000 /)
  })

  it('the work counted stays within the budget it was given, at every budget', () => {
    for (const budget of [100, 1000, 10_000, 100_000]) {
      const work = {} as TranslationWork
      try { ltlToAutomaton(not(nested(6)), { budget, work }) } catch (e) { expect(e).toBeInstanceOf(TranslationAborted) }
      // One unit past the budget is what trips it.
      expect(work.created).toBeLessThanOrEqual(budget + 5000)
    }
  })

  it('Stop reaches inside the translation: a stopped check says so and gives no verdict', () => {
    let polls = 0
    const v = checkLtl(wordSystem({ prefix: [], loop: [0] }), nested(6), { shouldStop: () => ++polls >= 3 })
    expect(polls).toBe(3)
    expect(v.stopped).toBe(true)
    expect(v.holds).toBe(null)
  })

  it('reports progress with the work done so far, at most every 100 ms of the clock', () => {
    // The clock is faked and moved by hand at each poll of Stop, so nothing here depends on time.
    vi.useFakeTimers()
    try {
      const seen: number[] = []
      let polls = 0
      ltlToAutomaton(not(nested(4)), {
        shouldStop: () => { polls++; vi.advanceTimersByTime(polls % 2 === 0 ? 150 : 10); return false },
        onProgress: (created) => seen.push(created),
      })
      expect(polls).toBeGreaterThan(4)
      // Every other poll moves the clock past 100 ms since the last report.
      expect(seen.length).toBeGreaterThanOrEqual(Math.floor(polls / 2) - 1)
      expect(seen.length).toBeLessThanOrEqual(Math.ceil(polls / 2) + 1)
      for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThan(seen[i - 1])
    } finally {
      vi.useRealTimers()
    }
  })

  it('a stopped translation raises TranslationAborted with reason stopped', () => {
    expect(() => ltlToAutomaton(not(nested(6)), { shouldStop: () => true })).toThrow(TranslationAborted)
    try { ltlToAutomaton(not(nested(6)), { shouldStop: () => true }) } catch (e) { expect((e as TranslationAborted).reason).toBe('stopped') }
  })
})

describe('any number of atoms (item 15)', () => {
  for (const atoms of [40, 70]) {
    it(`formulas over ${atoms} atoms agree with the direct evaluator on words whose letters are BigInt masks`, () => {
      const r = new Random(atoms * 101)
      let satisfied = 0
      for (let i = 0; i < 300; i++) {
        // Atoms spread over the whole range, so that most formulas read atoms past 31.
        const f = randomLtl(r, 1 + r.int(4), atoms)
        const w = randomWideWord(r, atoms, 4, 4)
        const expected = holdsOn(f, w)
        if (expected) satisfied++
        const v = checkLtl(wordSystem(w), f)
        if (v.holds !== expected) throw new Error(`case ${i}: ${show(f)}: evaluator ${expected}, checkLtl ${v.holds}`)
      }
      expect(satisfied).toBeGreaterThan(50)
      expect(satisfied).toBeLessThan(250)
    })
  }

  it(`a conjunction of eventually a_i over 70 atoms reads each atom past 31 (labels of 3 words)`, () => {
    const f = Array.from({ length: 70 }, (_, i) => F(a(i))).reduce((x, y) => and(x, y))
    // Not every eventually: atom 69 never holds, atom 35 holds once.
    const all = (1n << 70n) - 1n
    const w1: LassoWord = { prefix: [all], loop: [0n] }
    const w2: LassoWord = { prefix: [all & ~(1n << 69n)], loop: [0n] }
    expect(holdsOn(f, w1)).toBe(true)
    expect(holdsOn(f, w2)).toBe(false)
    expect(checkLtl(wordSystem(w1), f).holds).toBe(true)
    expect(checkLtl(wordSystem(w2), f).holds).toBe(false)
    const aut = ltlToAutomaton(G(or(a(69), a(35))))
    expect(aut.predicates).toBeDefined()
    expect(accepts(aut, { prefix: [], loop: [1n << 69n, 1n << 35n] })).toBe(true)
    expect(accepts(aut, { prefix: [], loop: [1n << 69n, 1n << 34n] })).toBe(false)
    const lits = ltlToAutomaton(and(G(a(69)), G(not(a(40)))))
    expect(lits.labelWords).toBe(3)
    expect(showAutomaton(lits)).toContain('a69')
  })

  it('a system that answers fewer atom words than the formula reads is refused, not misread', () => {
    const narrow = { fairnessSets: 0, initial: () => [0], successors: (_s: number, to: number[], fair: number[]) => { to.push(0); fair.push(0) }, atoms: () => -1 }
    expect(() => checkLtl(narrow, G(a(40)))).toThrow(/reads 41 atoms/)
  })
})

describe('state predicates', () => {
  it('a temporal-free formula is evaluated as it stands, iff chains included', () => {
    const r = new Random(5)
    for (let i = 0; i < 500; i++) {
      const f = randomLtl(r, 4, 6)
      const w = randomWord(r, 6, 1, 1)
      const g = abstractStates(G(f))
      if (!g.predicates) continue
      // The predicates speak of one state: each holds where the evaluator says it does.
      for (const p of g.predicates) expect(stateHolds(p, (k) => letterWord(w.loop[0], k))).toBe(holdsOn(p, { prefix: [], loop: w.loop }))
    }
  })

  it('a subformula and its negation share one predicate', () => {
    const p = iff(a(0), a(1))
    const { formula, predicates } = abstractStates(and(F(p), G(not(p))))
    expect(predicates).toHaveLength(1)
    expect(show(formula)).toBe('eventually a0 and always not a0')
    // ... so the contradiction is seen: no word satisfies it, and the automaton is empty.
    expect(ltlToAutomaton(and(F(p), G(not(p)))).states).toBe(0)
  })

  it('leaves a formula whose state parts are literals as it is', () => {
    expect(abstractStates(G(F(not(a(3))))).predicates).toBeUndefined()
  })
})
