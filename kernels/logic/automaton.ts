// Translation of an LTL formula to a generalized Büchi automaton by the on-the-fly tableau of
// R. Gerth, D. Peled, M. Y. Vardi and P. Wolper, "Simple on-the-fly automatic verification of
// linear temporal logic", PSTV 1995, followed by reductions that keep the language: removal of
// states that lie on no accepting run, removal of redundant acceptance sets, removal of states
// that another state can stand in for, and the quotient by the coarsest bisimulation that
// respects labels and acceptance.
//
// Before the tableau (`ltlToAutomaton`):
// - every maximal temporal-free subformula becomes one letter, a state predicate (`abstractStates`
//   in ltl.ts), so a chain of `iff` over state formulas is one letter;
// - the formula is simplified (`simplify`);
// - a disjunction is translated disjunct by disjunct and the automata joined side by side (the
//   union of their languages), so `eventually always a or eventually always b` costs the sum of
//   two small automata instead of the product the tableau would build;
// - the conjuncts `always eventually p` of a conjunction, p a letter or its negation, become one
//   automaton of k+1 states for k of them (one state per p, in its own acceptance set, and one
//   waiting state; every state leads to every state), or for more than 12 of them one of 2k states
//   with a single acceptance set that waits for each p in turn, intersected with the automaton of
//   the other conjuncts; the tableau would build 2^k states;
// - an and/or combination of `eventually l` and `always l` over 3 to 9 literals (an `iff` chain of
//   such parts) becomes a deterministic automaton that records which literals have held.
// The tableau itself expands each set of obligations (GPVW's Next) once and keys its states by
// (label, unfulfilled promises, next obligations), so two nodes that differ only in the
// bookkeeping of Old are one state. Within the expansion of one set, a node is dropped when
// another node reads a weaker label, owes a subset of its next obligations and leaves a subset
// of its promises unfulfilled (as in the simplifications of P. Gastin and D. Oddoux, "Fast LTL to
// Büchi automata translation", CAV 2001, Sect. 4); and a next obligation φ is dropped when
// `ψ release φ` is also owed (which implies φ).
//
// Every step counts what it creates (nodes expanded, states, transitions) against a budget; above
// it, or when asked to stop, the translation ends with `TranslationAborted`, never a verdict.
//
// Conventions of the result:
// - Labels are on states. A state's label is a conjunction of letter literals, two bit rows: the
//   letters that must hold and those that must not. A run q0 q1 q2 ... reads the word a0 a1 a2
//   ... when every q_i's label holds of a_i: the first letter is checked against an initial state.
//   Letters are the formula's atoms, or, when `predicates` is present, the state predicates it
//   lists (letter i holds in a state when `predicates[i]` does).
// - Acceptance is state-based (the tableau's rule: a state is in the set of `f until g` when it
//   does not promise `f until g` or it fulfils g), minus the sets that the reductions prove
//   redundant. A run is accepting when it visits every set infinitely often. As transition marks
//   (what the product and the emptiness check use) an edge carries the sets of its source state:
//   `transitionMarks`.
import { type Ltl, abstractStates, atomCount, isNnf, key, nnf, nnfSize, show, simplify, stateHolds } from './ltl'
import { csrFromEdges, tarjanScc } from './scc'

/** A generalized Büchi automaton with state labels; plain data, see the file comment for the conventions. */
export interface Automaton {
  /** Number of states; states are 0..states-1. */
  states: number
  /** Initial states, ascending. */
  initial: Int32Array
  /** 32-bit words per label row (letters 0..32 * labelWords - 1); 1 while there are at most 32 letters. */
  labelWords: number
  /** Per state, `labelWords` words from q * labelWords: the letters that must hold (bit i of word w = letter 32w + i). */
  mustTrue: Uint32Array
  /** Per state, likewise: the letters that must not hold. */
  mustFalse: Uint32Array
  /** Successors in CSR form: the successors of q are `succ[succStart[q] .. succStart[q+1])`, ascending. */
  succStart: Int32Array
  succ: Int32Array
  /** Per state: bit j set when the state belongs to acceptance set j. */
  accept: Uint32Array
  /** Number of acceptance sets (bits 0..acceptanceSets-1 of `accept`); at most 31. */
  acceptanceSets: number
  /** When present, letter i is this temporal-free formula over the atoms (see `abstractStates`); else letter i is atom i. */
  predicates?: Ltl[]
  /** One more than the highest atom the letters read (0 when none): the atom row of a state needs ceil(atoms / 32) words. */
  atoms: number
}

/** Default budget of one translation: nodes expanded plus states and transitions created. */
export const TRANSLATION_BUDGET = 1_500_000

/** Work counters of one translation (filled in when passed as `TranslationOptions.work`). */
export interface TranslationWork {
  /** Everything counted against the budget: tableau nodes expanded, states and transitions created. */
  created: number
  /** States and transitions before the reductions (of every piece, summed). */
  rawStates: number
  rawTransitions: number
}

/** Options of `ltlToAutomaton`. */
export interface TranslationOptions {
  /** Most work (see `TranslationWork.created`) before the translation gives up; `TRANSLATION_BUDGET` by default. */
  budget?: number
  /** Polled every 1024 units of work; returning true ends the translation with reason 'stopped'. */
  shouldStop?: () => boolean
  /** Called at most every 100 ms with the work done so far. */
  onProgress?: (created: number) => void
  work?: TranslationWork
}

/** A translation that ended without an automaton: over budget, stopped, or needing too many acceptance sets. */
export class TranslationAborted extends Error {
  constructor(readonly reason: 'budget' | 'stopped' | 'acceptance', readonly created: number, readonly budget: number, message: string) {
    super(message)
    this.name = 'TranslationAborted'
  }
}

class Budget {
  created = 0
  rawStates = 0
  rawTransitions = 0
  private polled = 0
  private lastReport = Date.now()
  readonly limit: number
  constructor(private readonly opts: TranslationOptions) {
    this.limit = opts.budget ?? TRANSLATION_BUDGET
  }
  spend(n: number): void {
    this.created += n
    if (this.created > this.limit) {
      throw new TranslationAborted('budget', this.created, this.limit,
        `the automaton of the property's negation needs more than the translation budget of ${this.limit} tableau nodes, states and transitions`)
    }
    if (this.created - this.polled >= 1024) {
      this.polled = this.created
      if (this.opts.shouldStop?.()) throw new TranslationAborted('stopped', this.created, this.limit, 'the translation was stopped')
      if (this.opts.onProgress) {
        const now = Date.now()
        if (now - this.lastReport >= 100) { this.lastReport = now; this.opts.onProgress(this.created) }
      }
    }
  }
  report(): void {
    if (!this.opts.work) return
    this.opts.work.created = this.created
    this.opts.work.rawStates = this.rawStates
    this.opts.work.rawTransitions = this.rawTransitions
  }
}

/** The letter row of a state for an automaton, from the state's atom words (`atomWord(w)`: atoms 32w..32w+31). */
export function letterOf(aut: Automaton, atomWord: (word: number) => number, out: Uint32Array = new Uint32Array(aut.labelWords), at = 0): Uint32Array {
  const W = aut.labelWords
  out.fill(0, at, at + W)
  if (!aut.predicates) {
    for (let w = 0; w < W; w++) out[at + w] = atomWord(w) >>> 0
  } else {
    const ps = aut.predicates
    for (let i = 0; i < ps.length; i++) if (stateHolds(ps[i], atomWord)) out[at + (i >>> 5)] |= 1 << (i & 31)
  }
  return out
}

/** Whether state q's label holds of the letter row `letter[at .. at + labelWords)`. */
export function labelHoldsRow(aut: Automaton, q: number, letter: ArrayLike<number>, at = 0): boolean {
  const W = aut.labelWords, mt = aut.mustTrue, mf = aut.mustFalse
  for (let w = 0, o = q * W; w < W; w++, o++) {
    const a = letter[at + w]
    // xor rather than ===, so that bit 31 compares alike in signed and unsigned masks.
    if ((((a & mt[o]) ^ mt[o]) | (a & mf[o])) !== 0) return false
  }
  return true
}

/**
 * Whether state q's label holds of a state whose atoms are `atoms`: a mask of atoms 0..31, or a
 * row of words (atom i is bit i % 32 of word i / 32). Predicates, if any, are evaluated on them.
 */
export function labelHolds(aut: Automaton, q: number, atoms: number | ArrayLike<number>): boolean {
  const word = typeof atoms === 'number' ? (w: number) => (w === 0 ? atoms : 0) : (w: number) => (w < atoms.length ? atoms[w] : 0)
  return labelHoldsRow(aut, q, letterOf(aut, word))
}

/** Acceptance marks of the transition from state `from` (to any successor): the sets `from` belongs to. */
export function transitionMarks(aut: Automaton, from: number): number {
  return aut.accept[from]
}

/** Bitmask of every acceptance set of the automaton. */
export function allAcceptance(aut: Automaton): number {
  return aut.acceptanceSets === 0 ? 0 : (2 ** aut.acceptanceSets - 1) | 0
}

/**
 * Translates `f` to a reduced generalized Büchi automaton: state predicates, simplification, the
 * splits of the file comment, the tableau and the reductions. Throws `TranslationAborted` when
 * the budget runs out, when stopped, or when more than 31 acceptance sets remain.
 */
export function ltlToAutomaton(f: Ltl, opts: TranslationOptions = {}): Automaton {
  const { formula, predicates } = abstractStates(f)
  const budget = new Budget(opts)
  try {
    // The negation normal form is built as a tree: its size counts against the budget first.
    budget.spend(nnfSize(formula))
    // Seen on the negation normal form before rewriting, which keeps `eventually a or eventually
    // b` apart (simplify would merge them into `eventually (a or b)`).
    const ev = eventualities(nnf(formula))
    const g = simplify(formula)
    const letters = predicates ? predicates.length : atomCount(formula)
    const aut = reduce(ev ? subsetAutomaton(ev, budget) : translate(g, budget), letters, budget)
    aut.atoms = atomCount(f)
    if (predicates) aut.predicates = predicates
    return aut
  } finally {
    budget.report()
  }
}

/**
 * Translates a formula in negation normal form (see `nnf`) to a generalized Büchi automaton by
 * the tableau alone (no predicates, no splits), then reduces it. Throws when the formula is not
 * in NNF, and `TranslationAborted` as `ltlToAutomaton` does.
 */
export function buildAutomaton(f: Ltl, opts: TranslationOptions = {}): Automaton {
  if (!isNnf(f)) throw new Error('buildAutomaton expects a formula in negation normal form')
  const budget = new Budget(opts)
  try {
    const aut = reduce(tableau(f, budget), atomCount(f), budget)
    aut.atoms = atomCount(f)
    return aut
  } finally {
    budget.report()
  }
}

// ---- Splitting before the tableau -------------------------------------------------------------

const isGFLiteral = (f: Ltl): boolean =>
  f.op === 'release' && f.left.op === 'false' && f.right.op === 'until' && f.right.left.op === 'true' &&
  (f.right.right.op === 'atom' || (f.right.right.op === 'not' && f.right.right.arg.op === 'atom'))

function flatten(f: Ltl, op: 'and' | 'or', out: Ltl[] = []): Ltl[] {
  if (f.op === op) { flatten(f.left, op, out); flatten(f.right, op, out) } else out.push(f)
  return out
}

const isGAnd = (f: Ltl) => f.op === 'release' && f.left.op === 'false' && f.right.op === 'and'
const mkG = (f: Ltl): Ltl => (f.op === 'release' && f.left.op === 'false' ? f : { op: 'release', left: { op: 'false' }, right: f })

function translate(f: Ltl, budget: Budget): Raw {
  if (f.op === 'or') {
    const parts = flatten(f, 'or')
    return parts.map((p) => translate(p, budget)).reduce((a, b) => union(a, b, budget))
  }
  if (f.op === 'and' || isGAnd(f)) {
    // always (f and g) = always f and always g, so that every `always eventually l` is seen.
    const parts = flatten(f, 'and').flatMap((p) => (isGAnd(p) ? flatten((p as { right: Ltl }).right, 'and').map((c) => mkG(c)) : [p]))
    const gf = parts.filter(isGFLiteral)
    if (gf.length >= 2) {
      const block = gfBlock(gf.map((g) => literalBits((g as { right: { right: Ltl } }).right.right)), budget)
      const rest = parts.filter((p) => !isGFLiteral(p))
      if (rest.length === 0) return block
      return intersect(translate(rest.reduce((a, b) => ({ op: 'and', left: a, right: b })), budget), block, budget)
    }
  }
  return tableau(f, budget)
}

const bit = (atom: number) => 1n << BigInt(atom)

function literalBits(l: Ltl): { pos: bigint; neg: bigint } {
  if (l.op === 'atom') return { pos: bit(l.atom), neg: 0n }
  if (l.op === 'not' && l.arg.op === 'atom') return { pos: 0n, neg: bit(l.arg.atom) }
  throw new Error('expected a literal')
}

/**
 * The automaton of `always eventually l_1 and ... and always eventually l_k`: state 0 reads any
 * letter, state i reads l_i and is the only member of acceptance set i-1; every state is initial
 * and leads to every state. An accepting run visits each state i infinitely often, so each l_i
 * holds infinitely often; conversely, on such a word, a run can sit in state i at chosen positions
 * where l_i holds, one i after another, and in state 0 elsewhere.
 */
function gfBlock(lits: { pos: bigint; neg: bigint }[], budget: Budget): Raw {
  if (lits.length > GF_SETS) return gfRound(lits, budget)
  const n = lits.length + 1
  budget.spend(n + n * n)
  budget.rawStates += n
  budget.rawTransitions += n * n
  const all = Array.from({ length: n }, (_, i) => i)
  return {
    states: n,
    initial: all.map(() => true),
    pos: [0n, ...lits.map((l) => l.pos)],
    neg: [0n, ...lits.map((l) => l.neg)],
    succ: all.map(() => [...all]),
    acceptance: lits.map((_, j) => all.map((q) => q === j + 1)),
  }
}

/** Above this many `always eventually` conjuncts, `gfRound` (one acceptance set) replaces `gfBlock`'s set per conjunct. */
const GF_SETS = 12

/**
 * `always eventually l_1 and ... and always eventually l_k` with one acceptance set, for many
 * conjuncts (each set is a mark of the product, and it has 31): state w_i waits for l_i (any
 * letter), h_i reads l_i; w_i leads to w_i and h_i, h_i to w_(i+1) and h_(i+1) (cyclically); w_1
 * and h_1 are initial; the set is {h_k}. An accepting run passes h_1, ..., h_k in turn infinitely
 * often, so each l_i holds infinitely often; conversely, on such a word a run waits in w_i for
 * the next position where l_i holds, reads it in h_i and moves on to i + 1.
 */
function gfRound(lits: { pos: bigint; neg: bigint }[], budget: Budget): Raw {
  const k = lits.length
  budget.spend(6 * k)
  budget.rawStates += 2 * k
  budget.rawTransitions += 4 * k
  // w_i is state 2i, h_i is state 2i + 1 (i from 0).
  const succ: number[][] = []
  for (let i = 0; i < k; i++) {
    const j = (i + 1) % k
    succ.push([2 * i, 2 * i + 1], [2 * j, 2 * j + 1])
  }
  return {
    states: 2 * k,
    initial: succ.map((_, q) => q < 2),
    pos: succ.map((_, q) => (q % 2 === 1 ? lits[q >> 1].pos : 0n)),
    neg: succ.map((_, q) => (q % 2 === 1 ? lits[q >> 1].neg : 0n)),
    succ,
    acceptance: [succ.map((_, q) => q === 2 * k - 1)],
  }
}

/**
 * A formula that is an and/or combination of `eventually l` and `always l`, l a letter literal,
 * mixing both connectives (as the negation normal form of an `iff` chain of such parts does), with
 * 3 to 9 distinct literals l_j behind its eventualities (`always l` is `not eventually not l`).
 * `value(S)` is its truth on a word where exactly the l_j with j in S ever hold.
 */
interface Eventualities { lits: Ltl[]; value: (seen: number) => boolean }

function eventualities(f: Ltl): Eventualities | null {
  const lits: Ltl[] = []
  const ids = new Map<string, number>()
  let ands = 0, ors = 0
  const negate = (l: Ltl): Ltl => (l.op === 'not' ? l.arg : { op: 'not', arg: l })
  const isLit = (l: Ltl) => l.op === 'atom' || (l.op === 'not' && l.arg.op === 'atom')
  const leaf = (l: Ltl) => {
    const k = key(l)
    let j = ids.get(k)
    if (j === undefined) { j = lits.length; lits.push(l); ids.set(k, j) }
    return j
  }
  const walk = (g: Ltl): ((seen: number) => boolean) | null => {
    if (g.op === 'true') return () => true
    if (g.op === 'false') return () => false
    if (g.op === 'until' && g.left.op === 'true' && isLit(g.right)) { const j = leaf(g.right); return (seen) => ((seen >>> j) & 1) === 1 }
    if (g.op === 'release' && g.left.op === 'false' && isLit(g.right)) { const j = leaf(negate(g.right)); return (seen) => ((seen >>> j) & 1) === 0 }
    if (g.op === 'and' || g.op === 'or') {
      if (g.op === 'and') ands++; else ors++
      const l = walk(g.left), r = walk(g.right)
      if (!l || !r) return null
      return g.op === 'and' ? (seen) => l(seen) && r(seen) : (seen) => l(seen) || r(seen)
    }
    return null
  }
  const value = walk(f)
  if (!value || ands === 0 || ors === 0 || lits.length < 3 || lits.length > 9) return null
  return { lits, value }
}

/**
 * The deterministic automaton of `Eventualities`: a state (S, T) has seen the literals of S at
 * earlier positions and reads exactly those of T now among the others (its label: l_j for j in
 * T, not l_j for j outside S and T); it leads to every (S + T, T'). The one run on a word reaches
 * (S*, {}) for good, S* the literals that ever hold; the acceptance set is the (S, {}) whose
 * value is true. 3^k states at most (labels that contradict are left out).
 */
function subsetAutomaton(ev: Eventualities, budget: Budget): Raw {
  const k = ev.lits.length
  const full = (1 << k) - 1
  const lit = ev.lits.map(literalBits)
  const ids = new Map<number, number>()
  const pos: bigint[] = [], neg: bigint[] = [], key2: [number, number][] = []
  for (let S = 0; S <= full; S++) {
    for (let T = 0; T <= full; T++) {
      if ((S & T) !== 0) continue
      let p = 0n, n = 0n
      for (let j = 0; j < k; j++) {
        if ((T >>> j) & 1) { p |= lit[j].pos; n |= lit[j].neg } else if (!((S >>> j) & 1)) { p |= lit[j].neg; n |= lit[j].pos }
      }
      if ((p & n) !== 0n) continue
      budget.spend(1)
      ids.set(S * (full + 1) + T, pos.length)
      pos.push(p); neg.push(n); key2.push([S, T])
    }
  }
  const succ = key2.map(([S, T]) => {
    const U = S | T, out: number[] = []
    for (let T2 = 0; T2 <= full; T2++) {
      if ((T2 & U) !== 0) continue
      const q = ids.get(U * (full + 1) + T2)
      if (q !== undefined) out.push(q)
    }
    budget.spend(out.length)
    return out
  })
  budget.rawStates += pos.length
  budget.rawTransitions += succ.reduce((a, o) => a + o.length, 0)
  return {
    states: pos.length,
    initial: key2.map(([S]) => S === 0),
    pos, neg, succ,
    acceptance: [key2.map(([S, T]) => T === 0 && ev.value(S))],
  }
}

/** Side by side: a run of the union is a run of one of them; each one's states are in every set of the other. */
function union(a: Raw, b: Raw, budget: Budget): Raw {
  budget.spend(a.states + b.states)
  const n = a.states
  return {
    states: a.states + b.states,
    initial: [...a.initial, ...b.initial],
    pos: [...a.pos, ...b.pos],
    neg: [...a.neg, ...b.neg],
    succ: [...a.succ, ...b.succ.map((rs) => rs.map((r) => r + n))],
    acceptance: [
      ...a.acceptance.map((s) => [...s, ...b.pos.map(() => true)]),
      ...b.acceptance.map((s) => [...a.pos.map(() => true), ...s]),
    ],
  }
}

/** The synchronous product (the intersection of the languages): pairs of states whose labels agree, both automata's sets. */
function intersect(a: Raw, b: Raw, budget: Budget): Raw {
  const ids = new Map<number, number>()
  const pairs: [number, number][] = []
  const pos: bigint[] = [], neg: bigint[] = []
  const agree = (x: number, y: number) => (a.pos[x] & b.neg[y]) === 0n && (a.neg[x] & b.pos[y]) === 0n
  const id = (x: number, y: number) => {
    const k = x * b.states + y
    let i = ids.get(k)
    if (i === undefined) {
      budget.spend(1)
      i = pairs.length
      ids.set(k, i)
      pairs.push([x, y])
      pos.push(a.pos[x] | b.pos[y])
      neg.push(a.neg[x] | b.neg[y])
    }
    return i
  }
  const initial: number[] = []
  for (let x = 0; x < a.states; x++) if (a.initial[x]) for (let y = 0; y < b.states; y++) if (b.initial[y] && agree(x, y)) initial.push(id(x, y))
  const succ: number[][] = []
  for (let i = 0; i < pairs.length; i++) {
    const [x, y] = pairs[i]
    const out: number[] = []
    for (const x2 of a.succ[x]) for (const y2 of b.succ[y]) if (agree(x2, y2)) { budget.spend(1); out.push(id(x2, y2)) }
    succ.push(out)
  }
  budget.rawStates += pairs.length
  budget.rawTransitions += succ.reduce((t, o) => t + o.length, 0)
  const init = new Array<boolean>(pairs.length).fill(false)
  for (const i of initial) init[i] = true
  return {
    states: pairs.length, initial: init, pos, neg, succ,
    acceptance: [...a.acceptance.map((s) => pairs.map(([x]) => s[x])), ...b.acceptance.map((s) => pairs.map(([, y]) => s[y]))],
  }
}

// ---- The tableau ----------------------------------------------------------------------------

/** Subformulas numbered once each; nodes of the tableau hold sets of these numbers. */
class Closure {
  readonly formulas: Ltl[] = []
  private ids = new Map<string, number>()
  id(f: Ltl): number {
    const k = key(f)
    let i = this.ids.get(k)
    if (i === undefined) {
      i = this.formulas.length
      this.formulas.push(f)
      this.ids.set(k, i)
    }
    return i
  }
}

/**
 * One way to meet a set of obligations now: the letter literals it reads, the `until`s it
 * postpones (promises without fulfilling them now) and the obligations it passes to the next
 * position. All four are bit rows in one word array, laid out by `Layout`; `pop` counts its bits.
 */
interface Node {
  w: Uint32Array
  pop: number
}

interface Raw {
  states: number
  initial: boolean[]
  pos: bigint[]
  neg: bigint[]
  succ: number[][]
  /** acceptance[j][q]: state q is in set j. */
  acceptance: boolean[][]
}

/** Word offsets of a node's rows: literals that hold, that do not hold (LW words each), postponed untils, next obligations (CW words each). */
class Layout {
  readonly len: number
  readonly neg: number
  readonly miss: number
  readonly next: number
  constructor(readonly LW: number, readonly CW: number) {
    this.neg = LW
    this.miss = 2 * LW
    this.next = 2 * LW + CW
    this.len = 2 * LW + 2 * CW
  }
  node(set: (w: Uint32Array) => void): Node {
    const w = new Uint32Array(this.len)
    set(w)
    return { w, pop: popcount(w) }
  }
}

function popcount(w: Uint32Array): number {
  let c = 0
  for (let i = 0; i < w.length; i++) {
    let v = w[i] - ((w[i] >>> 1) & 0x55555555)
    v = (v & 0x33333333) + ((v >>> 2) & 0x33333333)
    c += (((v + (v >>> 4)) & 0xf0f0f0f) * 0x1010101) >>> 24
  }
  return c
}

const rowKey = (w: Uint32Array, from = 0, to = w.length) => {
  let k = ''
  for (let i = from; i < to; i++) k += w[i].toString(36) + ','
  return k
}
const setBit = (w: Uint32Array, at: number, i: number) => { w[at + (i >>> 5)] |= 1 << (i & 31) }
const hasBit = (w: Uint32Array, at: number, i: number) => ((w[at + (i >>> 5)] >>> (i & 31)) & 1) === 1
const rowBigint = (w: Uint32Array, at: number, n: number) => {
  let b = 0n
  for (let i = n - 1; i >= 0; i--) b = (b << 32n) | BigInt(w[at + i])
  return b
}

/**
 * Drops every node that another stands in for: a weaker (or equal) label, a subset of the next
 * obligations and of the postponed promises. Replacing the first by the second in a run keeps
 * the word read, owes less afterwards and fulfils at least as often, so the language is kept;
 * and the order is strict on distinct nodes, so the nodes kept stand in for all the others.
 */
function prune(xs: Node[], budget: Budget): Node[] {
  const distinct = [...new Map(xs.map((x) => [rowKey(x.w), x])).values()]
  budget.spend(distinct.length)
  if (distinct.length > 4000) return distinct
  // A node that stands in for x has no more bits than x: try those first, stop at the first.
  distinct.sort((a, b) => a.pop - b.pop)
  const kept: Node[] = []
  for (const x of distinct) {
    const xw = x.w
    let dominated = false
    for (const y of kept) {
      if (y.pop >= x.pop) break
      const yw = y.w
      let inside = true
      for (let i = 0; i < yw.length; i++) if ((yw[i] & ~xw[i]) !== 0) { inside = false; break }
      if (inside) { dominated = true; break }
    }
    if (!dominated) {
      // keep `kept` sorted by pop (distinct is, so pushing keeps it)
      kept.push(x)
    }
  }
  return kept
}

/** Both at once: every pair whose literals agree, with everything of both. */
function conjoin(L: Layout, a: Node[], b: Node[], budget: Budget): Node[] {
  const out: Node[] = []
  const LW = L.LW
  for (const x of a) {
    const xw = x.w
    next: for (const y of b) {
      budget.spend(1)
      const yw = y.w
      for (let i = 0; i < LW; i++) if ((xw[i] & yw[LW + i]) !== 0 || (xw[LW + i] & yw[i]) !== 0) continue next
      const w = new Uint32Array(L.len)
      for (let i = 0; i < w.length; i++) w[i] = xw[i] | yw[i]
      out.push({ w, pop: popcount(w) })
    }
  }
  return prune(out, budget)
}

/**
 * The tableau of Gerth, Peled, Vardi and Wolper, with each set of obligations expanded once and
 * compositionally: the ways to meet `f and g` are the agreeing pairs of ways to meet f and g, the
 * ways to meet `f or g` those of either, and GPVW's rules for the rest (f until g: g now, or f
 * now and f until g next, postponed; f release g: f and g now, or g now and f release g next), as
 * the transitions of an alternating automaton are combined in Gastin and Oddoux (CAV 2001,
 * Sect. 2 and 3). The ways are kept pruned (`prune`) at every step. A state of the result is a
 * way (label, postponed untils, next obligations); its successors are the ways of its next
 * obligations. A state is in the acceptance set of `f until g` unless it postpones it.
 */
function tableau(f: Ltl, budget: Budget): Raw {
  const cl = new Closure()
  const visit = (g: Ltl): void => { cl.id(g); if ('arg' in g) visit(g.arg); else if ('left' in g) { visit(g.left); visit(g.right) } }
  visit(f)
  const letters = atomCount(f)
  const L = new Layout(Math.max(1, Math.ceil(letters / 32)), Math.max(1, Math.ceil(cl.formulas.length / 32)))
  const ways = new Map<number, Node[]>()
  const untils = new Set<number>()
  const TOP = L.node(() => {})
  const waysOf = (i: number): Node[] => {
    let w = ways.get(i)
    if (w !== undefined) return w
    const g = cl.formulas[i]
    switch (g.op) {
      case 'true': w = [TOP]; break
      case 'false': w = []; break
      case 'atom': { const a = g.atom; w = [L.node((r) => setBit(r, 0, a))]; break }
      case 'not': { const a = (g.arg as { atom: number }).atom; w = [L.node((r) => setBit(r, L.neg, a))]; break }
      case 'next': { const n = cl.id(g.arg); w = [L.node((r) => setBit(r, L.next, n))]; break }
      case 'and': w = conjoin(L, waysOf(cl.id(g.left)), waysOf(cl.id(g.right)), budget); break
      case 'or': w = prune([...waysOf(cl.id(g.left)), ...waysOf(cl.id(g.right))], budget); break
      case 'until':
        untils.add(i)
        w = prune([...waysOf(cl.id(g.right)), ...conjoin(L, waysOf(cl.id(g.left)), [L.node((r) => { setBit(r, L.miss, i); setBit(r, L.next, i) })], budget)], budget)
        break
      case 'release': {
        const r = waysOf(cl.id(g.right))
        w = prune([...conjoin(L, waysOf(cl.id(g.left)), r, budget), ...conjoin(L, r, [L.node((x) => setBit(x, L.next, i))], budget)], budget)
        break
      }
      default: throw new Error(`unexpected '${g.op}' in negation normal form`)
    }
    budget.spend(w.length)
    ways.set(i, w)
    return w
  }
  // A set of obligations (the next row of a node), normalised in place: `true` is dropped, and so
  // is φ when `ψ release φ` is owed too (which requires φ now).
  const normalise = (w: Uint32Array): void => {
    for (let i = 0; i < cl.formulas.length; i++) {
      if (!hasBit(w, L.next, i)) continue
      const g = cl.formulas[i]
      if (g.op === 'true') w[L.next + (i >>> 5)] &= ~(1 << (i & 31))
    }
    for (let i = 0; i < cl.formulas.length; i++) {
      if (!hasBit(w, L.next, i)) continue
      const g = cl.formulas[i]
      if (g.op === 'release') { const r = cl.id(g.right); w[L.next + (r >>> 5)] &= ~(1 << (r & 31)) }
    }
  }
  const expansions = new Map<string, Node[]>()
  const expand = (x: Node): Node[] => {
    const k = rowKey(x.w, L.next, L.len)
    let w = expansions.get(k)
    if (w !== undefined) return w
    w = [TOP]
    for (let i = 0; i < cl.formulas.length; i++) if (hasBit(x.w, L.next, i)) w = conjoin(L, w, waysOf(i), budget)
    w = w.map((y) => { const c = y.w.slice(); normalise(c); return { w: c, pop: popcount(c) } })
    expansions.set(k, w)
    return w
  }

  const stateIds = new Map<string, number>()
  const states: Node[] = []
  const stateOf = (x: Node) => {
    const k = rowKey(x.w)
    let q = stateIds.get(k)
    if (q === undefined) { budget.spend(1); q = states.length; states.push(x); stateIds.set(k, q) }
    return q
  }
  const root = L.node((r) => setBit(r, L.next, cl.id(f)))
  normalise(root.w)
  const initial = new Set(expand(root).map(stateOf))
  const succ: number[][] = []
  for (let q = 0; q < states.length; q++) {
    const out = expand(states[q]).map(stateOf)
    budget.spend(out.length)
    succ.push(out)
  }
  const m = states.length
  budget.rawStates += m
  budget.rawTransitions += succ.reduce((a, s) => a + s.length, 0)
  const order = [...untils].sort((a, b) => a - b)
  return {
    states: m,
    initial: states.map((_, q) => initial.has(q)),
    pos: states.map((x) => rowBigint(x.w, 0, L.LW)),
    neg: states.map((x) => rowBigint(x.w, L.neg, L.LW)),
    succ,
    acceptance: order.map((u) => states.map((x) => !hasBit(x.w, L.miss, u))),
  }
}

// ---- Reductions -----------------------------------------------------------------------------

function reduce(raw: Raw, letters: number, budget: Budget): Automaton {
  const { keep, transient } = usefulStates(raw)
  const ids = new Int32Array(raw.states).fill(-1)
  const kept: number[] = []
  for (let q = 0; q < raw.states; q++) if (keep[q]) { ids[q] = kept.length; kept.push(q) }

  // Acceptance sets over the states that remain: drop the sets every state is in, duplicates, and
  // the strict supersets of another set (visiting the subset infinitely often visits the superset).
  const sets0 = raw.acceptance.map((s) => kept.map((q) => s[q])).filter((s) => s.some((x) => !x))
  budget.spend(sets0.length * sets0.length)
  const distinct = [...new Map(sets0.map((s) => [s.map(Number).join(''), s])).values()]
  const sets = distinct.filter((s) => !distinct.some((t) => t !== s && t.every((x, i) => !x || s[i])))
  if (sets.length > 31) {
    throw new TranslationAborted('acceptance', budget.created, budget.limit,
      `the automaton of the property's negation needs ${sets.length} acceptance sets; at most 31 are supported`)
  }

  const n = kept.length
  const pos = kept.map((q) => raw.pos[q])
  const neg = kept.map((q) => raw.neg[q])
  const acc = kept.map((_, i) => sets.reduce((a, s, j) => (s[i] ? a | (1 << j) : a), 0))
  const succ = kept.map((q) => raw.succ[q].filter((r) => keep[r]).map((r) => ids[r]))
  const initial = kept.map((q) => raw.initial[q])
  const edgeCount = succ.reduce((a, s) => a + s.length, 0)
  // An optimisation only: skipped when its pairwise comparison would cost more than the rest.
  if (n <= 600) {
    budget.spend(n * n)
    removeLittleBrothers(initial, kept.map((q) => transient[q]), pos, neg, acc, succ)
  }

  // Coarsest bisimulation respecting label and acceptance, by naive partition refinement.
  // Bisimilar states accept the same words from there, so merging them keeps the language.
  let block = new Int32Array(n)
  let blocks = renumber(block, kept.map((_, i) => `${pos[i]}/${neg[i]}/${acc[i]}`))
  for (;;) {
    budget.spend(n + edgeCount)
    const sig = kept.map((_, i) => `${block[i]}:${[...new Set(succ[i].map((r) => block[r]))].sort((a, b) => a - b).join(',')}`)
    const next = new Int32Array(n)
    const count = renumber(next, sig)
    block = next
    if (count === blocks) break
    blocks = count
  }

  // Number the blocks breadth-first from the initial ones, for a deterministic, readable result.
  const order = new Int32Array(blocks).fill(-1)
  const rep = new Int32Array(blocks).fill(-1)
  for (let i = 0; i < n; i++) if (rep[block[i]] < 0) rep[block[i]] = i
  const queue: number[] = []
  const initialBlocks = new Set<number>()
  for (let i = 0; i < n; i++) if (initial[i]) initialBlocks.add(block[i])
  for (const b of [...initialBlocks].sort((a, b) => a - b)) { order[b] = queue.length; queue.push(b) }
  for (let h = 0; h < queue.length; h++) {
    const i = rep[queue[h]]
    for (const r of [...new Set(succ[i].map((x) => block[x]))].sort((a, b) => a - b)) {
      if (order[r] < 0) { order[r] = queue.length; queue.push(r) }
    }
  }
  const m = queue.length
  const W = Math.max(1, Math.ceil(letters / 32))
  const edges: [number, number][] = []
  const out = {
    mustTrue: new Uint32Array(m * W), mustFalse: new Uint32Array(m * W), accept: new Uint32Array(m),
  }
  for (let s = 0; s < m; s++) {
    const i = rep[queue[s]]
    for (let w = 0; w < W; w++) {
      out.mustTrue[s * W + w] = Number((pos[i] >> BigInt(32 * w)) & 0xffffffffn)
      out.mustFalse[s * W + w] = Number((neg[i] >> BigInt(32 * w)) & 0xffffffffn)
    }
    out.accept[s] = acc[i]
    for (const r of [...new Set(succ[i].map((x) => order[block[x]]))].sort((a, b) => a - b)) edges.push([s, r])
  }
  const csr = csrFromEdges(m, edges)
  return {
    states: m,
    initial: Int32Array.from([...initialBlocks].map((b) => order[b]).sort((a, b) => a - b)),
    labelWords: W,
    mustTrue: out.mustTrue,
    mustFalse: out.mustFalse,
    succStart: csr.start,
    succ: csr.adj,
    accept: out.accept,
    acceptanceSets: sets.length,
    atoms: 0,
  }
}

/**
 * Removes every state x that another state y can stand in for: y's label is implied by x's, y is
 * in every acceptance set x is in (unless x is on no cycle, so visited at most once), y leads everywhere x leads (y itself standing for x), every
 * state that leads to x also leads to y, and y is initial if x is. Replacing each visit of x by y
 * in a run gives a run that reads the same word and is accepting if the first one was, so the
 * language is kept. A removed state keeps no edges and is not initial; the bisimulation quotient
 * then drops it as unreachable.
 */
function removeLittleBrothers(initial: boolean[], transient: boolean[], pos: bigint[], neg: bigint[], acc: number[], succ: number[][]): void {
  const n = initial.length
  const alive = new Array<boolean>(n).fill(true)
  const out = succ.map((rs) => new Set(rs))
  const into: Set<number>[] = Array.from({ length: n }, () => new Set())
  succ.forEach((rs, u) => rs.forEach((v) => into[v].add(u)))
  const covers = (y: number, x: number) => {
    if ((pos[y] & ~pos[x]) !== 0n || (neg[y] & ~neg[x]) !== 0n) return false
    if (!transient[x] && (acc[x] & ~acc[y]) !== 0) return false
    if (initial[x] && !initial[y]) return false
    for (const v of out[x]) if (!out[y].has(v === x ? y : v)) return false
    for (const u of into[x]) if (u !== x && !out[u].has(y)) return false
    return true
  }
  for (let changed = true; changed;) {
    changed = false
    for (let x = 0; x < n; x++) {
      if (!alive[x]) continue
      let y = 0
      while (y < n && (y === x || !alive[y] || !covers(y, x))) y++
      if (y === n) continue
      alive[x] = false
      initial[x] = false
      for (const v of out[x]) into[v].delete(x)
      for (const u of into[x]) out[u].delete(x)
      out[x].clear()
      into[x].clear()
      changed = true
    }
  }
  for (let u = 0; u < n; u++) succ[u] = succ[u].filter((v) => out[u].has(v))
}

/** Gives equal signatures equal block numbers 0..k-1 (in order of first appearance); returns k. */
function renumber(into: Int32Array, sig: string[]): number {
  const seen = new Map<string, number>()
  sig.forEach((s, i) => {
    let b = seen.get(s)
    if (b === undefined) { b = seen.size; seen.set(s, b) }
    into[i] = b
  })
  return seen.size
}

/** The states that lie on some accepting run: reachable from an initial state and reaching an accepting cycle. */
function usefulStates(raw: Raw): { keep: boolean[]; transient: boolean[] } {
  const m = raw.states
  const edges: [number, number][] = []
  raw.succ.forEach((rs, q) => rs.forEach((r) => edges.push([q, r])))
  const { component, count } = tarjanScc(csrFromEdges(m, edges))
  // A component can carry an accepting cycle when it has an inner edge and meets every set.
  const inner = new Array<boolean>(count).fill(false)
  for (const [q, r] of edges) if (component[q] === component[r]) inner[component[q]] = true
  const meets = raw.acceptance.map(() => new Array<boolean>(count).fill(false))
  raw.acceptance.forEach((s, j) => s.forEach((x, q) => { if (x) meets[j][component[q]] = true }))
  const forward = new Array<boolean>(m).fill(false)
  const stack: number[] = []
  for (let q = 0; q < m; q++) if (raw.initial[q]) { forward[q] = true; stack.push(q) }
  while (stack.length) for (const r of raw.succ[stack.pop()!]) if (!forward[r]) { forward[r] = true; stack.push(r) }
  const pred: number[][] = Array.from({ length: m }, () => [])
  for (const [q, r] of edges) pred[r].push(q)
  const backward = new Array<boolean>(m).fill(false)
  for (let q = 0; q < m; q++) {
    const c = component[q]
    if (forward[q] && inner[c] && meets.every((x) => x[c])) { backward[q] = true; stack.push(q) }
  }
  while (stack.length) for (const p of pred[stack.pop()!]) if (!backward[p] && forward[p]) { backward[p] = true; stack.push(p) }
  // A state outside every cycle is visited at most once by a run: its acceptance membership never matters.
  const transient = raw.succ.map((_, q) => !inner[component[q]])
  return { keep: backward, transient }
}

/** A readable listing of an automaton, one state per line (for diagnostics and test failures). */
export function showAutomaton(aut: Automaton, name: (atom: number) => string = (n) => `a${n}`): string {
  const lines: string[] = []
  const init = new Set(aut.initial)
  for (let q = 0; q < aut.states; q++) {
    const lits: string[] = []
    const W = aut.labelWords
    const letter = (a: number) => (aut.predicates ? `[${aut.predicates[a] ? show(aut.predicates[a], name) : a}]` : name(a))
    for (let a = 0; a < 32 * W; a++) {
      if ((aut.mustTrue[q * W + (a >>> 5)] >>> (a & 31)) & 1) lits.push(letter(a))
      if ((aut.mustFalse[q * W + (a >>> 5)] >>> (a & 31)) & 1) lits.push(`not ${letter(a)}`)
    }
    const sets: number[] = []
    for (let j = 0; j < aut.acceptanceSets; j++) if ((aut.accept[q] >>> j) & 1) sets.push(j)
    const succ = Array.from(aut.succ.subarray(aut.succStart[q], aut.succStart[q + 1]))
    lines.push(`${init.has(q) ? '>' : ' '}${q} [${lits.join(' and ') || 'true'}] {${sets.join(',')}} -> ${succ.join(' ')}`)
  }
  return lines.join('\n')
}
