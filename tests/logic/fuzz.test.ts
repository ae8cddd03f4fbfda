// Generated temporal formulas of the kinds that used to explode in the translation (issue 10,
// item 13) or could not be written (item 15): deep eventually/always nesting, many disjuncts of
// eventually always and always eventually, iff chains over state and temporal parts, many atoms.
// Each is checked on a generated lasso word against the direct evaluator of lasso.ts (the oracle:
// textbook semantics, no rewriting, predicates, splits or automata). A translation that runs out
// of its budget gives no verdict, which is allowed here (and counted: it must stay rare); a
// verdict must be right. Runs are few, for a small shared machine; fast-check prints the seed of a
// failure, so that it repeats.
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { always as G, and, atom, eventually as F, iff, implies, type Ltl, next as X, not, or, show, until, unless } from '../../kernels/logic/ltl'
import { checkLtl } from '../../kernels/logic/product'
import { holdsOn, type LassoWord, wordSystem } from './lasso'

const BUDGET = 150_000

/** A lasso word over `atoms` atoms, letters as BigInt masks, atoms holding with probability about `density`. */
const wordArb = (atoms: number): fc.Arbitrary<LassoWord> => {
  const letter = fc.array(fc.boolean(), { minLength: atoms, maxLength: atoms })
    .map((bits) => bits.reduce((m, b, i) => (b ? m | (1n << BigInt(i)) : m), 0n))
  return fc.record({
    prefix: fc.array(letter, { maxLength: 4 }),
    loop: fc.array(letter, { minLength: 1, maxLength: 4 }),
  })
}

const atomArb = (atoms: number) => fc.integer({ min: 0, max: atoms - 1 }).map((i) => atom(i))
/** A state formula: a literal, or a small and/or/iff of literals. */
const stateArb = (atoms: number): fc.Arbitrary<Ltl> => fc.letrec<{ s: Ltl }>((tie) => ({
  s: fc.oneof({ depthSize: 'small', withCrossShrink: true },
    atomArb(atoms), atomArb(atoms).map(not),
    fc.tuple(tie('s'), tie('s')).map(([l, r]) => and(l, r)),
    fc.tuple(tie('s'), tie('s')).map(([l, r]) => or(l, r)),
    fc.tuple(tie('s'), tie('s')).map(([l, r]) => iff(l, r))),
})).s

/** `eventually (s and always (s or ...))` and its dual, nested up to `depth` levels. */
const nestedArb = (atoms: number, depth: number): fc.Arbitrary<Ltl> => {
  const level = (d: number): fc.Arbitrary<Ltl> => d === 0
    ? stateArb(atoms)
    : fc.tuple(stateArb(atoms), stateArb(atoms), level(d - 1), fc.boolean()).map(([p, q, inner, dual]) =>
      dual ? G(or(p, F(and(q, inner)))) : F(and(p, G(or(q, inner)))))
  return fc.integer({ min: 1, max: depth }).chain(level)
}

/** Many disjuncts (or conjuncts) of eventually always / always eventually of state formulas. */
const fairnessLikeArb = (atoms: number): fc.Arbitrary<Ltl> =>
  fc.tuple(
    fc.array(fc.tuple(stateArb(atoms), fc.boolean()).map(([s, fg]) => (fg ? F(G(s)) : G(F(s)))), { minLength: 2, maxLength: 16 }),
    fc.boolean(),
  ).map(([parts, disjoin]) => parts.reduce((x, y) => (disjoin ? or(x, y) : and(x, y))))

/** iff chains whose terms are state formulas or small temporal formulas. */
const iffChainArb = (atoms: number): fc.Arbitrary<Ltl> => {
  const term = fc.oneof(stateArb(atoms), stateArb(atoms).map(F), stateArb(atoms).map(G), stateArb(atoms).map(X))
  return fc.tuple(fc.array(term, { minLength: 2, maxLength: 6 }), fc.boolean())
    .map(([terms, wrap]) => { const c = terms.reduce((x, y) => iff(x, y)); return wrap ? G(c) : c })
}

/** Any operator, to mix the kinds above. */
const mixedArb = (atoms: number): fc.Arbitrary<Ltl> => fc.letrec<{ f: Ltl }>((tie) => ({
  f: fc.oneof({ depthSize: 'small', withCrossShrink: true },
    stateArb(atoms),
    tie('f').map(F), tie('f').map(G), tie('f').map(X), tie('f').map(not),
    fc.tuple(tie('f'), tie('f')).map(([l, r]) => and(l, r)),
    fc.tuple(tie('f'), tie('f')).map(([l, r]) => or(l, r)),
    fc.tuple(tie('f'), tie('f')).map(([l, r]) => iff(l, r)),
    fc.tuple(tie('f'), tie('f')).map(([l, r]) => implies(l, r)),
    fc.tuple(tie('f'), tie('f')).map(([l, r]) => until(l, r)),
    fc.tuple(tie('f'), tie('f')).map(([l, r]) => unless(l, r))),
})).f

const kinds: [string, (atoms: number) => fc.Arbitrary<Ltl>][] = [
  ['deep eventually/always nesting', (n) => nestedArb(n, 3)],
  ['many disjuncts or conjuncts of eventually always and always eventually', fairnessLikeArb],
  ['iff chains over state and temporal parts', iffChainArb],
  ['formulas mixing every operator', mixedArb],
]

describe('generated temporal formulas agree with the direct evaluator', () => {
  for (const [name, arb] of kinds) {
    it(`${name}, over 4, 40 and 70 atoms`, () => {
      let runs = 0, refused = 0
      fc.assert(
        fc.property(
          fc.constantFrom(4, 40, 70).chain((n) => fc.tuple(arb(n), wordArb(n))),
          ([f, w]) => {
            runs++
            const v = checkLtl(wordSystem(w), f, { translation: { budget: BUDGET } })
            if (v.holds === null) { refused++; return true }
            const expected = holdsOn(f, w)
            if (v.holds !== expected) throw new Error(`${show(f)}: evaluator ${expected}, checkLtl ${v.holds}`)
            return true
          },
        ),
        { numRuns: 120 },
      )
      // A refusal is honest but must stay rare for formulas of this size.
      expect(refused).toBeLessThanOrEqual(runs / 10)
    })
  }
})
