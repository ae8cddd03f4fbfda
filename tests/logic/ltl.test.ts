import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { Term } from '../../kernels/language/model'
import {
  MAX_ATOMS, always, and, atom, atomCount, equal, eventually, FALSE, fromModel, iff, implies, isEventual, isNnf, isUniversal,
  next, nnf, not, or, release, show, simplify, size, TRUE, unless, until,
} from '../../kernels/logic/ltl'
import { evaluate, holdsOn, Random, randomLtl, randomWord } from './lasso'

const p = atom(0), q = atom(1), r = atom(2)
const F = eventually, G = always, X = next

describe('printing', () => {
  it('uses the precedence of the property language and no needless parentheses', () => {
    expect(show(implies(and(G(p), G(q)), F(G(r))))).toBe('always a0 and always a1 implies eventually always a2')
    expect(show(not(and(p, q)))).toBe('not (a0 and a1)')
    expect(show(or(and(p, q), r))).toBe('a0 and a1 or a2')
    expect(show(and(or(p, q), r))).toBe('(a0 or a1) and a2')
  })

  it('treats until, unless and release as right-associative', () => {
    expect(show(until(p, until(q, r)))).toBe('a0 until a1 until a2')
    expect(show(until(until(p, q), r))).toBe('(a0 until a1) until a2')
    expect(show(unless(p, release(q, r)))).toBe('a0 unless a1 release a2')
  })

  it('parenthesises nested iff on both sides', () => {
    expect(show(iff(iff(p, q), r))).toBe('(a0 iff a1) iff a2')
    expect(show(iff(p, iff(q, r)))).toBe('a0 iff (a1 iff a2)')
  })

  it('names atoms with the given function', () => {
    expect(show(F(p), (n) => ['lit', 'seen'][n])).toBe('eventually lit')
  })

  it('accepts atom numbers past 31 and rejects those outside 0..MAX_ATOMS-1', () => {
    expect(atom(32).op).toBe('atom')
    expect(atom(MAX_ATOMS - 1).op).toBe('atom')
    expect(() => atom(MAX_ATOMS)).toThrow(RangeError)
    expect(() => atom(-1)).toThrow(RangeError)
  })
})

describe('fromModel', () => {
  const notebook = [
    '# Harbour lights',
    '```protocol',
    'protocol lights {',
    '  timing asynchronous',
    '  faults crash',
    '  message flash',
    '  state lit: bool = false',
    '  state seen[peer]: bool = false',
    '  on flash from q { seen[q] := true }',
    '  step { lit := true broadcast flash }',
    '}',
    '```',
    '```property',
    'property answers = forall p, q: correct(p) and correct(q) implies eventually p.seen[q] unless not p.lit',
    '```',
    '```check',
    'check lights: answers',
    '```',
  ].join('\n')

  it('maps each atom through atomOf and keeps the operators of the resolved property', () => {
    const model = analyzeNotebook(notebook)
    expect(model.diagnostics).toEqual([])
    const formula = model.checks[0].properties[0].formula
    const seen: string[] = []
    const atomOf = (t: Term) => {
      const k = JSON.stringify(t, (name, v) => (name === 'span' ? undefined : v))
      if (!seen.includes(k)) seen.push(k)
      return seen.indexOf(k)
    }
    const f = fromModel(formula, atomOf)
    // correct(p) is always alive(p) (language.md); alive(p), alive(q), p.seen[q], p.lit in order of appearance.
    expect(show(f)).toBe('always a0 and always a1 implies eventually a2 unless not a3')
    expect(seen).toHaveLength(4)
    expect(atomCount(f)).toBe(4)
  })
})

describe('negation normal form', () => {
  // Oracle: the direct evaluator on lasso words (tests/logic/lasso.ts).
  it('gives a formula in NNF that holds at the same positions, on 3,000 generated pairs', () => {
    const rnd = new Random(11)
    for (let i = 0; i < 3000; i++) {
      const f = randomLtl(rnd, 1 + rnd.int(4), 3)
      const w = randomWord(rnd, 3)
      const g = nnf(f)
      expect(isNnf(g)).toBe(true)
      expect(evaluate(g, w), `${show(f)} vs ${show(g)}`).toEqual(evaluate(f, w))
    }
  })

  it('of a negation holds exactly where the formula fails', () => {
    const rnd = new Random(12)
    for (let i = 0; i < 1000; i++) {
      const f = randomLtl(rnd, 1 + rnd.int(4), 2)
      const w = randomWord(rnd, 2)
      expect(holdsOn(nnf(not(f)), w), show(f)).toBe(!holdsOn(f, w))
    }
  })

  it('expands always, eventually and unless into release and until', () => {
    expect(show(nnf(G(p)))).toBe('false release a0')
    expect(show(nnf(F(p)))).toBe('true until a0')
    expect(show(nnf(unless(p, q)))).toBe('a1 release (a0 or a1)')
    expect(show(nnf(not(until(p, q))))).toBe('not a0 release not a1')
  })
})

describe('simplify', () => {
  // Oracle: the direct evaluator on lasso words.
  it('keeps the meaning of the formula, on 5,000 generated pairs', () => {
    const rnd = new Random(13)
    for (let i = 0; i < 5000; i++) {
      const f = randomLtl(rnd, 1 + rnd.int(4), 3)
      const w = randomWord(rnd, 3, 5, 5)
      const g = simplify(f)
      expect(isNnf(g)).toBe(true)
      expect(evaluate(g, w), `${show(f)} vs ${show(g)}`).toEqual(evaluate(f, w))
    }
  })

  it('never makes a formula larger than its negation normal form', () => {
    const rnd = new Random(14)
    for (let i = 0; i < 3000; i++) {
      const f = randomLtl(rnd, 1 + rnd.int(4), 3)
      expect(size(simplify(f)), show(f)).toBeLessThanOrEqual(size(nnf(f)))
    }
  })

  // The rules are those the doc comment of `simplify` lists (Etessami and Holzmann, CONCUR 2000;
  // Somenzi and Bloem, CAV 2000, Sect. 3); each case names the one it exercises.
  it('removes repeated temporal operators: always always, eventually eventually', () => {
    expect(equal(simplify(G(G(p))), simplify(G(p)))).toBe(true)
    expect(equal(simplify(F(F(p))), simplify(F(p)))).toBe(true)
  })

  it('absorbs eventually always eventually into always eventually, and its dual', () => {
    expect(equal(simplify(F(G(F(p)))), simplify(G(F(p))))).toBe(true)
    expect(equal(simplify(G(F(G(p)))), simplify(F(G(p))))).toBe(true)
  })

  it('merges untils with a common right side and releases with a common left side', () => {
    expect(show(simplify(and(until(p, r), until(q, r))))).toBe('(a0 and a1) until a2')
    expect(show(simplify(or(F(p), F(q))))).toBe('true until (a0 or a1)')
    expect(show(simplify(and(G(p), G(q))))).toBe('false release (a0 and a1)')
  })

  it('pulls next out of conjunctions and untils', () => {
    expect(show(simplify(and(X(p), X(q))))).toBe('next (a0 and a1)')
    expect(show(simplify(until(X(p), X(q))))).toBe('next (a0 until a1)')
  })

  it('folds constants and complementary literals', () => {
    expect(simplify(and(p, not(p)))).toEqual(FALSE)
    expect(simplify(or(p, not(p)))).toEqual(TRUE)
    expect(simplify(X(TRUE))).toEqual(TRUE)
    expect(simplify(until(p, FALSE))).toEqual(FALSE)
  })

  it('drops next in front of a formula that is both a pure eventuality and a pure universality', () => {
    const gfp = nnf(G(F(p)))
    expect(isEventual(gfp) && isUniversal(gfp)).toBe(true)
    expect(equal(simplify(X(G(F(p)))), simplify(G(F(p))))).toBe(true)
    expect(isEventual(nnf(p)) || isUniversal(nnf(p))).toBe(false)
  })
})
