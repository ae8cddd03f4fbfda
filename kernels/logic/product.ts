// The on-the-fly product of a system (an instance under fairness) with the automaton of a
// negated property, as a marked graph for the emptiness check. An accepting lasso of the product
// is a fair run of the system that violates the property.
//
// Label convention: a product node (s, q) exists only when q's label holds of the atoms of s, so
// the automaton reads each system state when it is paired with it, starting with the initial
// state. An edge (s, q) -> (s', q') exists for every system edge s -> s' and automaton edge
// q -> q' with the label of q' holding of s'. Its marks are the system edge's fairness marks
// (bits 0..f-1) together with q's acceptance sets shifted above them (bits f..f+a-1): q's sets,
// the source's, are the automaton's transition marks (see automaton.ts).
import { type Automaton, type TranslationOptions, TranslationAborted, allAcceptance, letterOf, ltlToAutomaton } from './automaton'
import { Int32Buffer } from '../base/buffer'
import type { ChunkedInt32 } from '../base/chunked'
import { type EdgeCursor, type EdgeSink, type EmptinessOptions, type MarkedGraph, findAcceptingLasso } from './emptiness'
import { type Ltl, not } from './ltl'
import { PairMap } from '../base/pairmap'

/** A system explored on the fly: states are integer ids the system assigns. */
export interface System {
  /** The initial state ids. */
  initial(): number[]
  /** Appends the successors of `s` to `to` and the fairness marks of each edge (bits 0..f-1) to `fair`. */
  successors(s: number, to: EdgeSink, fair: EdgeSink): void
  /**
   * The same edges as ranges of packed tables, when the system keeps them (a recorded fair graph):
   * the product's search then reads them where they are, one at a time, instead of copying rows.
   */
  rows?: EdgeRows
  /**
   * The atoms that hold in state s, one 32-bit word at a time: word w has atom 32w + i at bit i.
   * A system whose formulas use at most 32 atoms may ignore `word` (it is then always 0).
   */
  atoms(s: number, word?: number): number
  /** Words of `atoms` the system can answer (1 when absent): at least ceil(atoms / 32) for the formula checked. */
  atomWords?: number
  /** f: the number of fairness sets; a fair run passes infinitely often through edges marked with each. */
  fairnessSets: number
  /**
   * When known, every state id is below this: the product then numbers (s, q) as s * Q + q with
   * no hash table (while that fits `DENSE_NODES`).
   */
  states?: number
}

/**
 * A system's edges in place: those of state s are cells start.get(s) .. start.get(s + 1) of
 * `target` and `marks`, in the order `System.successors` appends them.
 */
export interface EdgeRows {
  start: ChunkedInt32
  target: ChunkedInt32
  marks: ChunkedInt32
}

/** Largest id range numbered densely (4 bytes of the search's table per id: 128 MiB at most). */
export const DENSE_NODES = 1 << 25

/** The product graph, with a way back from node ids to (system state, automaton state). */
export type ProductGraph = MarkedGraph & {
  decode(node: number): { state: number; automaton: number }
  /**
   * Every node id handed out so far is below this. Hashed numbering: the number of nodes
   * numbered so far, each a real node. Dense numbering: states x automaton states.
   */
  readonly size: number
  /** Whether ids are s * Q + q (dense) rather than handed out by a hash table in order of discovery. */
  readonly dense: boolean
  /** Mask of every mark of the product: all fairness sets and all acceptance sets. */
  readonly allMarks: number
}

/**
 * Each system state's letter row for the automaton (see automaton.ts `letterOf`), computed once per
 * state when first asked for: `at(s)` is where the row of s starts in `rows`.
 */
class Letters {
  rows: Uint32Array
  private used = 0
  private readonly dense: Int32Array | null
  private readonly hashed: Map<number, number> | null
  constructor(private readonly sys: AtomSource, private readonly aut: Automaton) {
    const W = aut.labelWords
    this.rows = new Uint32Array(W * 64)
    this.dense = sys.states !== undefined ? new Int32Array(sys.states).fill(-1) : null
    this.hashed = this.dense ? null : new Map()
  }
  at(s: number): number {
    let o = this.dense ? this.dense[s] : this.hashed!.get(s) ?? -1
    if (o >= 0) return o
    const W = this.aut.labelWords
    if (this.used + W > this.rows.length) {
      const grown = new Uint32Array(this.rows.length * 2)
      grown.set(this.rows)
      this.rows = grown
    }
    o = this.used
    this.used += W
    letterOf(this.aut, (w) => this.sys.atoms(s, w), this.rows, o)
    if (this.dense) this.dense[s] = o
    else this.hashed!.set(s, o)
    return o
  }
}

/** What a label test reads of a system: its atoms, word by word, and how many states it has. */
export type AtomSource = Pick<System, 'atoms' | 'atomWords' | 'states'>

/**
 * Whether automaton state r's label holds in system state t (`holds(r, t)`), for every product
 * over `sys` (the plain one here and the quotient's): `direct` when one word of atoms is read as
 * the letter itself (the common case, which callers may inline); otherwise each state's letter
 * row is computed once from its atoms (letters may be predicates over atoms, `abstractStates`).
 */
export function labelTest(sys: AtomSource, aut: Automaton): { direct: boolean; holds: (r: number, t: number) => boolean } {
  const atomWords = Math.ceil(aut.atoms / 32)
  if (atomWords > (sys.atomWords ?? 1)) {
    throw new Error(`the formula reads ${aut.atoms} atoms but the system answers only ${32 * (sys.atomWords ?? 1)}`)
  }
  const { mustTrue, mustFalse } = aut
  const W = aut.labelWords
  const direct = !aut.predicates && W === 1
  if (direct) {
    return {
      direct,
      holds: (r, t) => {
        const a = sys.atoms(t, 0)
        return ((a & mustTrue[r]) ^ mustTrue[r]) === 0 && (a & mustFalse[r]) === 0
      },
    }
  }
  const letters = new Letters(sys, aut)
  return {
    direct,
    holds: (r, t) => {
      const o = letters.at(t), rows = letters.rows
      for (let w = 0; w < W; w++) {
        const a = rows[o + w], mt = mustTrue[r * W + w]
        if ((((a & mt) ^ mt) | (a & mustFalse[r * W + w])) !== 0) return false
      }
      return true
    },
  }
}

/** Largest states x letters for which `lettersOf` builds a table. */
const LETTER_TABLE_CELLS = 1 << 14

/**
 * The successors of each automaton state q whose label holds for each letter a (a set of atoms):
 * `succ[start[(q << shift) | a] .. start[((q << shift) | a) + 1])`, in the automaton's order (see
 * `lettersOf`). Only
 * for direct labels (letters are atoms, one word) over few atoms; null otherwise.
 */
interface LetterTable {
  shift: number
  start: Int32Array
  succ: Int32Array
}

function lettersOf(aut: Automaton): LetterTable | null {
  const A = aut.atoms
  if (aut.predicates || aut.labelWords !== 1 || A > 12 || aut.states << A > LETTER_TABLE_CELLS) return null
  const L = 1 << A
  const start = new Int32Array(aut.states * L + 1)
  const succ: number[] = []
  for (let q = 0; q < aut.states; q++) {
    for (let a = 0; a < L; a++) {
      start[q * L + a] = succ.length
      for (let j = aut.succStart[q]; j < aut.succStart[q + 1]; j++) {
        const r = aut.succ[j]
        if (((a & aut.mustTrue[r]) ^ aut.mustTrue[r]) === 0 && (a & aut.mustFalse[r]) === 0) succ.push(r)
      }
    }
  }
  start[aut.states * L] = succ.length
  return { shift: A, start, succ: Int32Array.from(succ) }
}

/**
 * The product's edges read lazily (`EdgeCursor`): for node (s, q) the cursor walks s's system
 * edges and, for each, q's automaton successors whose label holds at the target, in the order
 * `successors` appends them. Its state per open node: cur[at] the system edge, cur[at + 1] the end
 * of s's edges, cur[at + 2] the next automaton edge of q, cur[at + 3] q. With `EdgeRows` the
 * system edges are read in place; without, each open node's row is recomputed onto one packed
 * stack (and cut off when the node closes; `rowFrom` remembers where each row starts).
 *
 * When the letters are the atoms themselves and there are few (`LetterTable`), the subclass
 * `LetterEdges` looks q's successors up by the target's atoms instead of testing them one by one:
 * cur[at + 2] .. cur[at + 4] is then the range of q's successors whose label holds at the current
 * system edge's target, cur[at + 5] that target and cur[at + 6] the edge's marks. Both hand out
 * the same edges in the same order.
 */
class ProductEdges implements EdgeCursor {
  mark = 0
  protected readonly rows: EdgeRows | null
  protected readonly to = new Int32Buffer()
  protected readonly fair = new Int32Buffer()
  private readonly rowFrom = new Int32Buffer()
  private readonly succStart: Int32Array
  private readonly succ: Int32Array
  protected readonly accept: Uint32Array
  private readonly mustTrue: Uint32Array
  private readonly mustFalse: Uint32Array

  constructor(protected readonly sys: System, aut: Automaton, protected readonly Q: number, protected readonly pairs: PairMap | null,
              private readonly direct: boolean, private readonly holds: (r: number, t: number) => boolean) {
    this.rows = sys.rows ?? null
    this.succStart = aut.succStart
    this.succ = aut.succ
    this.accept = aut.accept
    this.mustTrue = aut.mustTrue
    this.mustFalse = aut.mustFalse
  }

  get bytes(): number {
    return this.to.data.byteLength + this.fair.data.byteLength + this.rowFrom.data.byteLength
  }

  open(node: number, cur: Int32Array, at: number): void {
    const { pairs, Q, rows } = this
    const s = pairs ? pairs.first.data[node] : Math.floor(node / Q)
    const q = pairs ? pairs.second.data[node] : node - s * Q
    let from: number, end: number
    if (rows) {
      from = rows.start.get(s)
      end = rows.start.get(s + 1)
    } else {
      from = this.to.length
      this.rowFrom.push(from)
      this.sys.successors(s, this.to, this.fair)
      end = this.to.length
    }
    // Positioned before the first system edge, with q's automaton edges used up.
    cur[at] = from - 1
    cur[at + 1] = end
    cur[at + 2] = this.succStart[q + 1]
    cur[at + 3] = q
    cur[at + 4] = cur[at + 2]
  }

  next(_node: number, cur: Int32Array, at: number): number {
    const { rows, succ, mustTrue, mustFalse, direct } = this
    const q = cur[at + 3], e = cur[at + 1]
    const from = this.succStart[q], end = this.succStart[q + 1]
    const toData = this.to.data
    let k = cur[at], j = cur[at + 2]
    for (;;) {
      if (j >= end) {
        if (++k >= e) {
          cur[at] = e
          return -1
        }
        j = from
        continue
      }
      const t = rows ? rows.target.get(k) : toData[k]
      const a = direct ? this.sys.atoms(t, 0) : 0
      while (j < end) {
        const r = succ[j++]
        // labelHolds(aut, r, a), inlined in the direct case: this is the innermost loop of the whole check.
        if (direct ? ((a & mustTrue[r]) ^ mustTrue[r]) === 0 && (a & mustFalse[r]) === 0 : this.holds(r, t)) {
          cur[at] = k
          cur[at + 2] = j
          this.mark = ((rows ? rows.marks.get(k) : this.fair.data[k]) | (this.accept[q] << this.sys.fairnessSets)) | 0
          return this.pairs ? this.pairs.id(t, r) : t * this.Q + r
        }
      }
    }
  }

  close(): void {
    if (this.rows) return
    this.to.length = this.fair.length = this.rowFrom.pop()
  }
}

/** `ProductEdges` with q's successors looked up by the target's atoms (`LetterTable`). */
class LetterEdges extends ProductEdges {
  private readonly atomMask: number

  constructor(sys: System, aut: Automaton, Q: number, pairs: PairMap | null, holds: (r: number, t: number) => boolean,
              private readonly lt: LetterTable) {
    super(sys, aut, Q, pairs, true, holds)
    this.atomMask = (1 << aut.atoms) - 1
  }

  override next(_node: number, cur: Int32Array, at: number): number {
    let j = cur[at + 2]
    if (j < cur[at + 4]) {
      // More successors of q for the same system edge: its target and marks are kept in cur.
      cur[at + 2] = j + 1
      this.mark = cur[at + 6]
      return this.id(cur[at + 5], this.lt.succ[j])
    }
    const { rows, atomMask, lt } = this
    const q = cur[at + 3], e = cur[at + 1]
    let k = cur[at], jEnd: number, t: number
    do {
      if (++k >= e) {
        cur[at] = e
        return -1
      }
      t = rows ? rows.target.get(k) : this.to.data[k]
      const o = (q << lt.shift) | (this.sys.atoms(t, 0) & atomMask)
      j = lt.start[o]
      jEnd = lt.start[o + 1]
    } while (j >= jEnd)
    const m = ((rows ? rows.marks.get(k) : this.fair.data[k]) | (this.accept[q] << this.sys.fairnessSets)) | 0
    cur[at] = k
    cur[at + 2] = j + 1
    cur[at + 4] = jEnd
    cur[at + 5] = t
    cur[at + 6] = m
    this.mark = m
    return this.id(t, lt.succ[j])
  }

  private id(t: number, r: number): number {
    return this.pairs ? this.pairs.id(t, r) : t * this.Q + r
  }
}

/**
 * The product of `sys` with `aut`; see the file comment for the label and mark conventions.
 * `letterTable: false` reads edges without the letter table (`LetterEdges`), for the tests that
 * compare the two.
 */
export function productGraph(sys: System, aut: Automaton, letterTable = true): ProductGraph {
  const f = sys.fairnessSets
  if (f + aut.acceptanceSets > 31) {
    throw new Error(`${f} fairness sets and ${aut.acceptanceSets} acceptance sets exceed the 31 marks the product supports`)
  }
  const Q = aut.states
  const dense = sys.states !== undefined && sys.states * Q <= DENSE_NODES
  const pairs = dense ? null : new PairMap()
  const id = pairs ? (s: number, q: number) => pairs.id(s, q) : (s: number, q: number) => s * Q + q
  const { succStart, succ, accept, mustTrue, mustFalse } = aut
  const to = new Int32Buffer(), fair = new Int32Buffer()
  const { direct, holds } = labelTest(sys, aut)
  const letters = direct && letterTable ? lettersOf(aut) : null
  const allMarks = ((f === 0 ? 0 : 2 ** f - 1) | (allAcceptance(aut) << f)) | 0
  return {
    allMarks,
    dense,
    cursor: letters ? new LetterEdges(sys, aut, Q, pairs, holds, letters) : new ProductEdges(sys, aut, Q, pairs, direct, holds),
    get size() { return pairs ? pairs.size : sys.states! * Q },
    initial() {
      const ids: number[] = []
      for (const s of sys.initial()) {
        for (let i = 0; i < aut.initial.length; i++) {
          const q = aut.initial[i]
          if (holds(q, s)) ids.push(id(s, q))
        }
      }
      return ids
    },
    successors(node, out, marks) {
      const s = pairs ? pairs.first.data[node] : Math.floor(node / Q)
      const q = pairs ? pairs.second.data[node] : node - s * Q
      const acc = accept[q] << f
      to.length = 0
      fair.length = 0
      sys.successors(s, to, fair)
      const from = succStart[q], end = succStart[q + 1]
      const td = to.data, fd = fair.data
      for (let i = 0; i < to.length; i++) {
        const t = td[i]
        const m = (fd[i] | acc) | 0
        if (direct) {
          const a = sys.atoms(t, 0)
          for (let j = from; j < end; j++) {
            const r = succ[j]
            // labelHolds(aut, r, a), inlined: this is the innermost loop of the whole check.
            if (((a & mustTrue[r]) ^ mustTrue[r]) === 0 && (a & mustFalse[r]) === 0) {
              out.push(id(t, r))
              marks.push(m)
            }
          }
        } else {
          for (let j = from; j < end; j++) {
            const r = succ[j]
            if (holds(r, t)) { out.push(id(t, r)); marks.push(m) }
          }
        }
      }
    },
    decode(node) {
      if (pairs) return { state: pairs.first.data[node], automaton: pairs.second.data[node] }
      const state = Math.floor(node / Q)
      return { state, automaton: node - state * Q }
    },
  }
}

/** The verdict of `checkLtl`. `nodes` and `edges` count the product explored. */
export type LtlVerdict =
  | { holds: true; stopped: false; nodes: number; edges: number }
  | {
      holds: false
      stopped: false
      /** System states of the counterexample: prefix, then the cycle repeated forever (as in `Lasso`). */
      prefix: number[]
      cycle: number[]
      /** Fairness marks of each cycle edge, cycle[i] to cycle[(i+1) % k]; together they cover every fairness set. */
      cycleFairness: number[]
      nodes: number
      edges: number
    }
  | { holds: null; stopped: true; nodes: number; edges: number }
  /** No verdict: the automaton could not be built within its limits; `reason` says which, in one sentence. */
  | { holds: null; stopped: false; reason: string; nodes: number; edges: number }

/** Options of `checkLtl`: the search's, and the translation's budget and work counters (Stop reaches both). */
export type CheckLtlOptions = EmptinessOptions & {
  translation?: Pick<TranslationOptions, 'budget' | 'work' | 'onProgress'>
  /** The automaton of the negated formula, from `negationAutomaton`, when already built. */
  automaton?: Automaton
}

/**
 * The automaton of the negation of `formula` (what `checkLtl` searches with), or why there is
 * none: stopped, or a reason in one sentence (over budget, too many acceptance sets). A runner
 * that checks one formula on several systems translates once and hands it as `opts.automaton`.
 */
export function negationAutomaton(formula: Ltl, opts: CheckLtlOptions = {}): Automaton | { stopped: true } | { stopped: false; reason: string } {
  try {
    return ltlToAutomaton(not(formula), { ...opts.translation, shouldStop: opts.shouldStop })
  } catch (e) {
    if (!(e instanceof TranslationAborted)) throw e
    return e.reason === 'stopped' ? { stopped: true } : { stopped: false, reason: e.message }
  }
}

/**
 * Whether every fair run of `sys` satisfies `formula`: builds the automaton of its negation,
 * then searches the product for a fair accepting lasso (Couvreur, FM'99). A violation comes with
 * its lasso of system states, starting in an initial state.
 */
export function checkLtl(sys: System, formula: Ltl, opts: CheckLtlOptions = {}): LtlVerdict {
  const aut = opts.automaton ?? negationAutomaton(formula, opts)
  if (!('states' in aut)) return aut.stopped ? { holds: null, stopped: true, nodes: 0, edges: 0 } : { holds: null, stopped: false, reason: aut.reason, nodes: 0, edges: 0 }
  if (sys.fairnessSets + aut.acceptanceSets > 31) {
    return {
      holds: null, stopped: false, nodes: 0, edges: 0,
      reason: `the automaton of the property's negation needs ${aut.acceptanceSets} acceptance sets besides the ${sys.fairnessSets} fairness sets, more than the 31 marks the product supports`,
    }
  }
  const g = productGraph(sys, aut)
  const r = findAcceptingLasso(g, g.allMarks, opts)
  if (r.kind === 'empty') return { holds: true, stopped: false, nodes: r.nodes, edges: r.edges }
  if (r.kind === 'stopped') return { holds: null, stopped: true, nodes: r.nodes, edges: r.edges }
  const fairMask = sys.fairnessSets === 0 ? 0 : (2 ** sys.fairnessSets - 1) | 0
  return {
    holds: false,
    stopped: false,
    prefix: r.prefix.map((n) => g.decode(n).state),
    cycle: r.cycle.map((n) => g.decode(n).state),
    cycleFairness: r.cycleMarks.map((m) => m & fairMask),
    nodes: r.nodes,
    edges: r.edges,
  }
}
