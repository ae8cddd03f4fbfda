import { describe, expect, it } from 'vitest'
import {
  always, and, atom, eventually, implies, type Ltl, next, not, or, release, show, unless, until,
} from '../../kernels/logic/ltl'
import { checkLtl } from '../../kernels/logic/product'
import { holdsOn, Random, randomLtl, randomSystem, wordOf, type ExplicitSystem } from './lasso'

const F = eventually, G = always, X = next

/**
 * Equivalence laws of LTL from Baier and Katoen, Principles of Model Checking (MIT Press, 2008),
 * Sect. 5.1.4 "Equivalence of LTL formulae" (the table of equivalence rules, Fig. 5.7) and Sect.
 * 5.1.5 (weak until and release); the section and figure numbers are recalled from memory.
 * Equivalent formulas have equal verdicts on every system, so each law is checked on generated
 * systems with generated subformulas f and g.
 */
const laws: [string, (f: Ltl, g: Ltl) => [Ltl, Ltl]][] = [
  ['duality: not next f = next not f', (f) => [not(X(f)), X(not(f))]],
  ['duality: not always f = eventually not f', (f) => [not(G(f)), F(not(f))]],
  ['duality: not eventually f = always not f', (f) => [not(F(f)), G(not(f))]],
  ['duality: not (f until g) = (f and not g) unless (not f and not g)', (f, g) => [not(until(f, g)), unless(and(f, not(g)), and(not(f), not(g)))]],
  ['idempotence: always always f = always f', (f) => [G(G(f)), G(f)]],
  ['idempotence: eventually eventually f = eventually f', (f) => [F(F(f)), F(f)]],
  ['idempotence: f until (f until g) = f until g', (f, g) => [until(f, until(f, g)), until(f, g)]],
  ['idempotence: (f until g) until g = f until g', (f, g) => [until(until(f, g), g), until(f, g)]],
  ['absorption: eventually always eventually f = always eventually f', (f) => [F(G(F(f))), G(F(f))]],
  ['absorption: always eventually always f = eventually always f', (f) => [G(F(G(f))), F(G(f))]],
  ['expansion: f until g = g or (f and next (f until g))', (f, g) => [until(f, g), or(g, and(f, X(until(f, g))))]],
  ['expansion: eventually f = f or next eventually f', (f) => [F(f), or(f, X(F(f)))]],
  ['expansion: always f = f and next always f', (f) => [G(f), and(f, X(G(f)))]],
  ['distribution: next (f until g) = (next f) until (next g)', (f, g) => [X(until(f, g)), until(X(f), X(g))]],
  ['distribution: eventually (f or g) = eventually f or eventually g', (f, g) => [F(or(f, g)), or(F(f), F(g))]],
  ['distribution: always (f and g) = always f and always g', (f, g) => [G(and(f, g)), and(G(f), G(g))]],
  ['weak until: f unless g = (f until g) or always f', (f, g) => [unless(f, g), or(until(f, g), G(f))]],
  ['release: f release g = not (not f until not g)', (f, g) => [release(f, g), not(until(not(f), not(g)))]],
]

/** Throws unless a reported violation is a fair run of the system that the direct evaluator rejects. */
function verdict(sys: ExplicitSystem, f: Ltl): boolean {
  const v = checkLtl(sys, f)
  if (v.holds === null) throw new Error('unexpected stop')
  if (v.holds === false && holdsOn(f, wordOf(sys, v.prefix, v.cycle))) {
    throw new Error(`counterexample for ${show(f)} satisfies it`)
  }
  return v.holds
}

describe('published LTL equivalences', () => {
  for (const [name, law] of laws) {
    it(`${name} gives equal verdicts on 120 generated systems`, () => {
      const r = new Random(name.length * 7919)
      let holds = 0
      for (let t = 0; t < 120; t++) {
        const sys = randomSystem(r, 2, 5, r.int(2))
        const [lhs, rhs] = law(randomLtl(r, 2, 2), randomLtl(r, 2, 2))
        const a = verdict(sys, lhs)
        expect(verdict(sys, rhs), `${show(lhs)} vs ${show(rhs)} on ${JSON.stringify(sys.edges)} labels ${sys.labels}`).toBe(a)
        if (a) holds++
      }
      // Both verdicts occur, so agreement is not trivial.
      expect(holds).toBeGreaterThan(0)
      expect(holds).toBeLessThan(120)
    })
  }

  it('tells apart formulas that are not equivalent (the harness can see a difference)', () => {
    // eventually (f and g) implies, but is not implied by, eventually f and eventually g
    // (Baier and Katoen 2008, Sect. 5.1.4, from memory); likewise eventually always p and always eventually p.
    const p = atom(0), q = atom(1)
    const r = new Random(3)
    const differ = (a: Ltl, b: Ltl) => {
      for (let t = 0; t < 300; t++) {
        const sys = randomSystem(r, 2, 5)
        if (verdict(sys, a) !== verdict(sys, b)) return true
      }
      return false
    }
    expect(differ(F(and(p, q)), and(F(p), F(q)))).toBe(true)
    expect(differ(F(G(p)), G(F(p)))).toBe(true)
    // and the one-way implication does hold on every generated system
    for (let t = 0; t < 200; t++) {
      const sys = randomSystem(r, 2, 5, r.int(2))
      expect(verdict(sys, implies(F(and(p, q)), and(F(p), F(q))))).toBe(true)
    }
  })
})
