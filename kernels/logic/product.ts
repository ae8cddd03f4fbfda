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
import { type Automaton, allAcceptance, labelHolds, ltlToAutomaton } from './automaton'
import { Int32Buffer } from '../base/buffer'
import { type EdgeSink, type EmptinessOptions, type MarkedGraph, findAcceptingLasso } from './emptiness'
import { type Ltl, not } from './ltl'
import { PairMap } from '../base/pairmap'

/** A system explored on the fly: states are integer ids the system assigns. */
export interface System {
  /** The initial state ids. */
  initial(): number[]
  /** Appends the successors of `s` to `to` and the fairness marks of each edge (bits 0..f-1) to `fair`. */
  successors(s: number, to: EdgeSink, fair: EdgeSink): void
  /** The mask of the atoms that hold in state s (bit i = atom i). */
  atoms(s: number): number
  /** f: the number of fairness sets; a fair run passes infinitely often through edges marked with each. */
  fairnessSets: number
  /**
   * When known, every state id is below this: the product then numbers (s, q) as s * Q + q with
   * no hash table (while that fits `DENSE_NODES`).
   */
  states?: number
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

/** The product of `sys` with `aut`; see the file comment for the label and mark conventions. */
export function productGraph(sys: System, aut: Automaton): ProductGraph {
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
  const allMarks = ((f === 0 ? 0 : 2 ** f - 1) | (allAcceptance(aut) << f)) | 0
  return {
    allMarks,
    dense,
    get size() { return pairs ? pairs.size : sys.states! * Q },
    initial() {
      const ids: number[] = []
      for (const s of sys.initial()) {
        const a = sys.atoms(s)
        for (let i = 0; i < aut.initial.length; i++) {
          const q = aut.initial[i]
          if (labelHolds(aut, q, a)) ids.push(id(s, q))
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
        const a = sys.atoms(t)
        const m = (fd[i] | acc) | 0
        for (let j = from; j < end; j++) {
          const r = succ[j]
          // labelHolds(aut, r, a), inlined: this is the innermost loop of the whole check.
          if (((a & mustTrue[r]) ^ mustTrue[r]) === 0 && (a & mustFalse[r]) === 0) {
            out.push(id(t, r))
            marks.push(m)
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

/**
 * Whether every fair run of `sys` satisfies `formula`: builds the automaton of its negation,
 * then searches the product for a fair accepting lasso (Couvreur, FM'99). A violation comes with
 * its lasso of system states, starting in an initial state.
 */
export function checkLtl(sys: System, formula: Ltl, opts: EmptinessOptions = {}): LtlVerdict {
  const aut = ltlToAutomaton(not(formula))
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
