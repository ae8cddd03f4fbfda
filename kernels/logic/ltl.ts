// LTL formulas over numbered atoms 0..k-1, independent of the protocol language: the runner maps a
// property's atoms to numbers, the automaton and the product only ever see the numbers.
//
// Three forms of the same type are used along the pipeline:
// - as written (every operator, from `fromModel` or the constructors);
// - negation normal form (`nnf`): only true, false, atom, not-atom, and, or, next, until, release;
// - simplified NNF (`simplify`): NNF rewritten with published rules, the input of `buildAutomaton`.
import { MAX_ATOMS } from '../language/limits'
import type { Formula, Term } from '../language/model'

/**
 * An LTL formula. Atoms are numbers 0..MAX_ATOMS-1; a set of atoms is a row of 32-bit words
 * (atom i is bit i % 32 of word i / 32), one word while a formula uses at most 32 atoms.
 */
export type Ltl =
  | { readonly op: 'true' }
  | { readonly op: 'false' }
  | { readonly op: 'atom'; readonly atom: number }
  | { readonly op: 'not' | 'next' | 'always' | 'eventually'; readonly arg: Ltl }
  | {
      readonly op: 'and' | 'or' | 'implies' | 'iff' | 'until' | 'release' | 'unless'
      readonly left: Ltl
      readonly right: Ltl
    }

/** The operators that take one argument. */
export type UnaryOp = 'not' | 'next' | 'always' | 'eventually'
/** The operators that take two arguments. `release` is the dual of `until`; `unless` is weak until. */
export type BinaryOp = 'and' | 'or' | 'implies' | 'iff' | 'until' | 'release' | 'unless'

/** The largest number of distinct atoms a formula may use (language/limits.ts). */
export { MAX_ATOMS }

/** The formula that every word satisfies. */
export const TRUE: Ltl = { op: 'true' }
/** The formula that no word satisfies. */
export const FALSE: Ltl = { op: 'false' }

/** Atom number `n` (0..MAX_ATOMS-1). */
export function atom(n: number): Ltl {
  if (!Number.isInteger(n) || n < 0 || n >= MAX_ATOMS) throw new RangeError(`atom number ${n} is outside 0..${MAX_ATOMS - 1}`)
  return { op: 'atom', atom: n }
}
/** Negation. */
export function not(arg: Ltl): Ltl { return { op: 'not', arg } }
/** `next f`: f holds at the next position. */
export function next(arg: Ltl): Ltl { return { op: 'next', arg } }
/** `always f`. */
export function always(arg: Ltl): Ltl { return { op: 'always', arg } }
/** `eventually f`. */
export function eventually(arg: Ltl): Ltl { return { op: 'eventually', arg } }
/** Conjunction. */
export function and(left: Ltl, right: Ltl): Ltl { return { op: 'and', left, right } }
/** Disjunction. */
export function or(left: Ltl, right: Ltl): Ltl { return { op: 'or', left, right } }
/** Implication. */
export function implies(left: Ltl, right: Ltl): Ltl { return { op: 'implies', left, right } }
/** Equivalence. */
export function iff(left: Ltl, right: Ltl): Ltl { return { op: 'iff', left, right } }
/** Strong until: `right` eventually holds, and `left` holds at every position before. */
export function until(left: Ltl, right: Ltl): Ltl { return { op: 'until', left, right } }
/** Release, the dual of until: `right` holds up to and including the first position where `left` holds, or forever. */
export function release(left: Ltl, right: Ltl): Ltl { return { op: 'release', left, right } }
/** Weak until: `left until right`, or `always left`. */
export function unless(left: Ltl, right: Ltl): Ltl { return { op: 'unless', left, right } }

/** Structural equality. */
export function equal(a: Ltl, b: Ltl): boolean {
  return a === b || key(a) === key(b)
}

const keys = new WeakMap<Ltl, string>()

/** A canonical string for a formula (prefix form), equal for structurally equal formulas. */
export function key(f: Ltl): string {
  let k = keys.get(f)
  if (k !== undefined) return k
  switch (f.op) {
    case 'true': k = 't'; break
    case 'false': k = 'f'; break
    case 'atom': k = String(f.atom); break
    case 'not': case 'next': case 'always': case 'eventually': k = `${f.op[0]}${f.op === 'next' ? 'x' : ''}(${key(f.arg)})`; break
    default: k = `${f.op}(${key(f.left)},${key(f.right)})`
  }
  keys.set(f, k)
  return k
}

/** One more than the highest atom number the formula uses (0 when it uses none). */
export function atomCount(f: Ltl): number {
  switch (f.op) {
    case 'true': case 'false': return 0
    case 'atom': return f.atom + 1
    case 'not': case 'next': case 'always': case 'eventually': return atomCount(f.arg)
    default: return Math.max(atomCount(f.left), atomCount(f.right))
  }
}

/** Number of operator and atom nodes in the formula tree. */
export function size(f: Ltl): number {
  switch (f.op) {
    case 'true': case 'false': case 'atom': return 1
    case 'not': case 'next': case 'always': case 'eventually': return 1 + size(f.arg)
    default: return 1 + size(f.left) + size(f.right)
  }
}

// Binding strength for printing, loosest first, as in language.md: iff, implies, or, and,
// until/unless/release (right-associative), prefix operators.
const PREC: Record<Ltl['op'], number> = {
  iff: 1, implies: 2, or: 3, and: 4, until: 5, unless: 5, release: 5,
  not: 6, next: 6, always: 6, eventually: 6, true: 7, false: 7, atom: 7,
}
const RIGHT_ASSOC = new Set<Ltl['op']>(['implies', 'until', 'unless', 'release'])

/**
 * Prints a formula in the property syntax of language.md, with the fewest parentheses that keep
 * its structure (`release` is printed as a keyword of its own; the language has no syntax for it).
 * `name` gives each atom's text, `a0`, `a1`, ... by default.
 */
export function show(f: Ltl, name: (atom: number) => string = (n) => `a${n}`): string {
  const go = (f: Ltl): string => {
    switch (f.op) {
      case 'true': case 'false': return f.op
      case 'atom': return name(f.atom)
      case 'not': case 'next': case 'always': case 'eventually':
        return `${f.op} ${wrap(f.arg, PREC[f.arg.op] < PREC.not)}`
      default: {
        const p = PREC[f.op]
        const lp = PREC[f.left.op], rp = PREC[f.right.op]
        // iff has no stated associativity: parenthesise nested iffs on both sides.
        const right = RIGHT_ASSOC.has(f.op)
        const l = wrap(f.left, right || f.op === 'iff' ? lp <= p : lp < p)
        const r = wrap(f.right, right ? rp < p : rp <= p && (f.op === 'iff' || f.right.op !== f.op))
        return `${l} ${f.op} ${r}`
      }
    }
  }
  const wrap = (g: Ltl, paren: boolean) => (paren ? `(${go(g)})` : go(g))
  return go(f)
}

/**
 * Converts a resolved property formula of the typed model. `atomOf` maps each atom's state term to
 * its atom number; it is called once per atom occurrence, left to right, so that it can number
 * terms as it meets them.
 */
export function fromModel(f: Formula, atomOf: (term: Term) => number): Ltl {
  switch (f.k) {
    case 'true': return TRUE
    case 'false': return FALSE
    case 'atom': return atom(atomOf(f.term))
    case 'not': return not(fromModel(f.arg, atomOf))
    case 'always': return always(fromModel(f.arg, atomOf))
    case 'eventually': return eventually(fromModel(f.arg, atomOf))
    case 'next': return next(fromModel(f.arg, atomOf))
    case 'and': case 'or': case 'implies': case 'iff': case 'until': case 'unless': {
      const left = fromModel(f.left, atomOf)
      return { op: f.k, left, right: fromModel(f.right, atomOf) }
    }
  }
}

/**
 * Negation normal form: negations only on atoms, and only true, false, atom, not-atom, and, or,
 * next, until and release remain. Uses the textbook dualities (not until = release of the
 * negations, not next = next not) and `always f = false release f`, `eventually f = true until f`,
 * `f unless g = g release (f or g)`. `iff` is expanded, so nested iffs grow the formula.
 */
export function nnf(f: Ltl): Ltl {
  return pos(f)
}

function pos(f: Ltl): Ltl {
  switch (f.op) {
    case 'true': case 'false': case 'atom': return f
    case 'not': return neg(f.arg)
    case 'next': return next(pos(f.arg))
    case 'always': return release(FALSE, pos(f.arg))
    case 'eventually': return until(TRUE, pos(f.arg))
    case 'and': case 'or': case 'until': case 'release': return { op: f.op, left: pos(f.left), right: pos(f.right) }
    case 'implies': return or(neg(f.left), pos(f.right))
    case 'iff': return or(and(pos(f.left), pos(f.right)), and(neg(f.left), neg(f.right)))
    case 'unless': { const r = pos(f.right); return release(r, or(pos(f.left), r)) }
  }
}

function neg(f: Ltl): Ltl {
  switch (f.op) {
    case 'true': return FALSE
    case 'false': return TRUE
    case 'atom': return not(f)
    case 'not': return pos(f.arg)
    case 'next': return next(neg(f.arg))
    case 'always': return until(TRUE, neg(f.arg))
    case 'eventually': return release(FALSE, neg(f.arg))
    case 'and': return or(neg(f.left), neg(f.right))
    case 'or': return and(neg(f.left), neg(f.right))
    case 'until': return release(neg(f.left), neg(f.right))
    case 'release': return until(neg(f.left), neg(f.right))
    case 'implies': return and(pos(f.left), neg(f.right))
    case 'iff': return or(and(pos(f.left), neg(f.right)), and(neg(f.left), pos(f.right)))
    // not (g release (f or g)) = (not g) until (not f and not g)
    case 'unless': { const r = neg(f.right); return until(r, and(neg(f.left), r)) }
  }
}

/**
 * The number of nodes `nnf(f)` has as a tree, computed without building it (it is exponential in
 * the nesting of `iff` over temporal parts), so that a caller can refuse before expanding.
 */
export function nnfSize(f: Ltl): number {
  const memo = new Map<Ltl, [number, number]>()
  const go = (g: Ltl): [number, number] => {
    let r = memo.get(g)
    if (r) return r
    switch (g.op) {
      case 'true': case 'false': r = [1, 1]; break
      case 'atom': r = [1, 2]; break
      case 'not': { const [p, n] = go(g.arg); r = [n, p]; break }
      case 'next': { const [p, n] = go(g.arg); r = [1 + p, 1 + n]; break }
      case 'always': case 'eventually': { const [p, n] = go(g.arg); r = [2 + p, 2 + n]; break }
      default: {
        const [lp, ln] = go(g.left), [rp, rn] = go(g.right)
        switch (g.op) {
          case 'implies': r = [1 + ln + rp, 1 + lp + rn]; break
          case 'iff': r = [3 + lp + rp + ln + rn, 3 + lp + rp + ln + rn]; break
          case 'unless': r = [2 + lp + 2 * rp, 2 + ln + 2 * rn]; break
          default: r = [1 + lp + rp, 1 + ln + rn]
        }
      }
    }
    memo.set(g, r)
    return r
  }
  return go(f)[0]
}

/** True when the formula is in negation normal form (see `nnf`). */
export function isNnf(f: Ltl): boolean {
  switch (f.op) {
    case 'true': case 'false': case 'atom': return true
    case 'not': return f.arg.op === 'atom'
    case 'next': return isNnf(f.arg)
    case 'and': case 'or': case 'until': case 'release': return isNnf(f.left) && isNnf(f.right)
    default: return false
  }
}

// Pure eventualities and pure universalities (Etessami and Holzmann, "Optimizing Büchi automata",
// CONCUR 2000; used again by Somenzi and Bloem, "Efficient Büchi automata from LTL formulae",
// CAV 2000). A pure eventuality is closed under prepending any finite prefix (`eventually f`
// is one); a pure universality is closed under taking suffixes (`always f` is one). The syntactic
// classes below are sufficient conditions, on NNF, that follow from those closure properties.

/** Whether an NNF formula is syntactically a pure eventuality (its truth ignores any finite prefix added in front). */
export function isEventual(f: Ltl): boolean {
  switch (f.op) {
    case 'true': case 'false': return true
    case 'and': case 'or': return isEventual(f.left) && isEventual(f.right)
    case 'next': return isEventual(f.arg)
    case 'until': return f.left.op === 'true' || isEventual(f.right)
    case 'release': return isEventual(f.right)
    default: return false
  }
}

/** Whether an NNF formula is syntactically a pure universality (it holds of every suffix of a word it holds of). */
export function isUniversal(f: Ltl): boolean {
  switch (f.op) {
    case 'true': case 'false': return true
    case 'and': case 'or': return isUniversal(f.left) && isUniversal(f.right)
    case 'next': return isUniversal(f.arg)
    case 'release': return f.left.op === 'false' || isUniversal(f.right)
    case 'until': return isUniversal(f.right)
    default: return false
  }
}

const isF = (f: Ltl): f is { op: 'until'; left: Ltl; right: Ltl } => f.op === 'until' && f.left.op === 'true'
const isG = (f: Ltl): f is { op: 'release'; left: Ltl; right: Ltl } => f.op === 'release' && f.left.op === 'false'
const complementary = (a: Ltl, b: Ltl) =>
  (a.op === 'not' && a.arg.op === 'atom' && b.op === 'atom' && a.arg.atom === b.atom) ||
  (b.op === 'not' && b.arg.op === 'atom' && a.op === 'atom' && b.arg.atom === a.atom)

/**
 * Negation normal form, then rewriting bottom-up to a fixed point. The rules, each an equivalence:
 * - constants: `f and false = false`, `f and true = f`, `f and f = f`, `p and not p = false`, and duals;
 *   `next true = true`, `f until false = false`, `f until true = true`, `false until f = f`,
 *   `f until f = f`, and duals for release;
 * - from Etessami and Holzmann (CONCUR 2000), as listed by Somenzi and Bloem (CAV 2000, Sect. 3):
 *   `(f until h) and (g until h) = (f and g) until h`, `(f until g) or (f until h) = f until (g or h)`,
 *   `(f release g) and (f release h) = f release (g and h)`, `(f release h) or (g release h) = (f or g) release h`,
 *   `next f and next g = next (f and g)`, `next f or next g = next (f or g)`,
 *   `(next f) until (next g) = next (f until g)`, `(next f) release (next g) = next (f release g)`,
 *   `always eventually f or always eventually g = always eventually (f or g)`,
 *   `eventually always f and eventually always g = eventually always (f and g)`;
 * - pure eventualities e and universalities u (Somenzi and Bloem, CAV 2000, Sect. 3):
 *   `f until e = e`, `f release u = u`, `next x = x` for x both, which also gives
 *   `eventually eventually f = eventually f`, `always always f = always f`,
 *   `eventually always eventually f = always eventually f` and `always eventually always f = eventually always f`;
 * - `eventually (f until g) = eventually g` (both say g eventually holds) and its dual
 *   `always (f release g) = always g`.
 */
export function simplify(f: Ltl): Ltl {
  return rewrite(nnf(f))
}

function rewrite(f: Ltl): Ltl {
  switch (f.op) {
    case 'true': case 'false': case 'atom': case 'not': return f
    case 'next': return mkNext(rewrite(f.arg))
    case 'and': return mkAnd(rewrite(f.left), rewrite(f.right))
    case 'or': return mkOr(rewrite(f.left), rewrite(f.right))
    case 'until': return mkUntil(rewrite(f.left), rewrite(f.right))
    case 'release': return mkRelease(rewrite(f.left), rewrite(f.right))
    default: throw new Error(`rewrite expects negation normal form, got '${f.op}'`)
  }
}

// Smart constructors: each applies the rules at its root and re-enters the others on the parts it
// builds, so a result is fully rewritten when its arguments are.

function mkNext(a: Ltl): Ltl {
  if (a.op === 'true' || a.op === 'false') return a
  if (isEventual(a) && isUniversal(a)) return a
  return next(a)
}

function mkAnd(a: Ltl, b: Ltl): Ltl {
  if (a.op === 'false' || b.op === 'false') return FALSE
  if (a.op === 'true') return b
  if (b.op === 'true') return a
  if (equal(a, b)) return a
  if (complementary(a, b)) return FALSE
  if (a.op === 'next' && b.op === 'next') return mkNext(mkAnd(a.arg, b.arg))
  if (a.op === 'until' && b.op === 'until' && equal(a.right, b.right)) return mkUntil(mkAnd(a.left, b.left), a.right)
  if (a.op === 'release' && b.op === 'release' && equal(a.left, b.left)) return mkRelease(a.left, mkAnd(a.right, b.right))
  if (isF(a) && isF(b) && isG(a.right) && isG(b.right)) return mkUntil(TRUE, mkRelease(FALSE, mkAnd(a.right.right, b.right.right)))
  return and(a, b)
}

function mkOr(a: Ltl, b: Ltl): Ltl {
  if (a.op === 'true' || b.op === 'true') return TRUE
  if (a.op === 'false') return b
  if (b.op === 'false') return a
  if (equal(a, b)) return a
  if (complementary(a, b)) return TRUE
  if (a.op === 'next' && b.op === 'next') return mkNext(mkOr(a.arg, b.arg))
  if (a.op === 'until' && b.op === 'until' && equal(a.left, b.left)) return mkUntil(a.left, mkOr(a.right, b.right))
  if (a.op === 'release' && b.op === 'release' && equal(a.right, b.right)) return mkRelease(mkOr(a.left, b.left), a.right)
  if (isG(a) && isG(b) && isF(a.right) && isF(b.right)) return mkRelease(FALSE, mkUntil(TRUE, mkOr(a.right.right, b.right.right)))
  return or(a, b)
}

function mkUntil(a: Ltl, b: Ltl): Ltl {
  if (b.op === 'true' || b.op === 'false') return b
  if (a.op === 'false' || equal(a, b)) return b
  if (isEventual(b)) return b
  if (a.op === 'next' && b.op === 'next') return mkNext(mkUntil(a.arg, b.arg))
  if (a.op === 'true' && b.op === 'until') return mkUntil(TRUE, b.right)
  return until(a, b)
}

function mkRelease(a: Ltl, b: Ltl): Ltl {
  if (b.op === 'true' || b.op === 'false') return b
  if (a.op === 'true' || equal(a, b)) return b
  if (isUniversal(b)) return b
  if (a.op === 'next' && b.op === 'next') return mkNext(mkRelease(a.arg, b.arg))
  if (a.op === 'false' && b.op === 'release') return mkRelease(FALSE, b.right)
  return release(a, b)
}


/** Whether the formula has no temporal operator (it speaks of one state only). */
export function isStateFormula(f: Ltl): boolean {
  switch (f.op) {
    case 'true': case 'false': case 'atom': return true
    case 'not': return isStateFormula(f.arg)
    case 'next': case 'always': case 'eventually': case 'until': case 'release': case 'unless': return false
    default: return isStateFormula(f.left) && isStateFormula(f.right)
  }
}

/**
 * The truth of a temporal-free formula in one state, whose atoms are read a 32-bit word at a time:
 * atom i holds when bit i % 32 of `atomWord(i >>> 5)` is set. `iff` is evaluated as it stands, so
 * a chain of them costs its length, not the size of its negation normal form.
 */
export function stateHolds(f: Ltl, atomWord: (word: number) => number): boolean {
  switch (f.op) {
    case 'true': return true
    case 'false': return false
    case 'atom': return ((atomWord(f.atom >>> 5) >>> (f.atom & 31)) & 1) === 1
    case 'not': return !stateHolds(f.arg, atomWord)
    case 'and': return stateHolds(f.left, atomWord) && stateHolds(f.right, atomWord)
    case 'or': return stateHolds(f.left, atomWord) || stateHolds(f.right, atomWord)
    case 'implies': return !stateHolds(f.left, atomWord) || stateHolds(f.right, atomWord)
    case 'iff': return stateHolds(f.left, atomWord) === stateHolds(f.right, atomWord)
    default: throw new Error(`stateHolds expects a formula without temporal operators, got '${f.op}'`)
  }
}

/** A formula over state predicates: atom i of `formula` stands for the state formula `predicates[i]`. */
export interface Abstraction {
  formula: Ltl
  /** Temporal-free formulas over the original atoms; absent when `formula` is the input itself. */
  predicates?: Ltl[]
}

/**
 * Replaces every maximal temporal-free subformula by one atom, a predicate on states, so that the
 * translation never expands the propositional structure inside a state (a chain of `iff` over
 * state formulas is one letter, not an exponential negation normal form). A subformula and its
 * negation share the predicate (`not g` becomes the negated atom of g); equal subformulas share it
 * too. The word a run of the system spells over the predicates is determined by its states, and
 * the formula over predicates holds of that word exactly when the input holds of the original one
 * (each predicate is evaluated in the state it speaks of), so verdicts are kept. When every
 * maximal temporal-free subformula is already an atom, a negated atom or a constant, nothing is
 * replaced and `predicates` is absent.
 */
export function abstractStates(f: Ltl): Abstraction {
  const maximal: Ltl[] = []
  const collect = (g: Ltl): void => {
    if (isStateFormula(g)) { maximal.push(g); return }
    if ('arg' in g) collect(g.arg)
    else if ('left' in g) { collect(g.left); collect(g.right) }
  }
  collect(f)
  const literal = (g: Ltl) => g.op === 'true' || g.op === 'false' || g.op === 'atom' || (g.op === 'not' && g.arg.op === 'atom')
  if (maximal.every(literal)) return { formula: f }
  const predicates: Ltl[] = []
  const ids = new Map<string, number>()
  const replace = (g: Ltl): Ltl => {
    if (isStateFormula(g)) {
      let negated = false
      while (g.op === 'not') { negated = !negated; g = g.arg }
      if (g.op === 'true' || g.op === 'false') return (g.op === 'true') !== negated ? TRUE : FALSE
      const k = key(g)
      let id = ids.get(k)
      if (id === undefined) { id = predicates.length; predicates.push(g); ids.set(k, id) }
      const a: Ltl = { op: 'atom', atom: id }
      return negated ? not(a) : a
    }
    switch (g.op) {
      case 'not': case 'next': case 'always': case 'eventually': return { op: g.op, arg: replace(g.arg) }
      case 'true': case 'false': case 'atom': return g
      default: return { op: g.op, left: replace(g.left), right: replace(g.right) }
    }
  }
  return { formula: replace(f), predicates }
}
