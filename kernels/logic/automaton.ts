// Translation of an LTL formula to a generalized Büchi automaton by the on-the-fly tableau of
// R. Gerth, D. Peled, M. Y. Vardi and P. Wolper, "Simple on-the-fly automatic verification of
// linear temporal logic", PSTV 1995, followed by reductions that keep the language: removal of
// states that lie on no accepting run, removal of redundant acceptance sets, removal of states
// that another state can stand in for, and the quotient by the coarsest bisimulation that
// respects labels and acceptance.
//
// Conventions of the result:
// - Labels are on states. A state's label is a conjunction of atom literals, two masks: the atoms
//   that must hold and those that must not. A run q0 q1 q2 ... reads the word a0 a1 a2 ... when
//   every q_i's label holds of a_i: the first letter is checked against an initial state.
// - Acceptance is state-based, one set per `until` subformula (the tableau's rule: a state is in
//   the set of `f until g` when it does not promise `f until g` or it fulfils g), minus the sets
//   that the reductions prove redundant. A run is accepting when it visits every set infinitely
//   often. As transition marks (what the product and the emptiness check use) an edge carries the
//   sets of its source state: `transitionMarks`.
import { type Ltl, isNnf, key, simplify } from './ltl'
import { csrFromEdges, tarjanScc } from './scc'

/** A generalized Büchi automaton with state labels; plain data, see the file comment for the conventions. */
export interface Automaton {
  /** Number of states; states are 0..states-1. */
  states: number
  /** Initial states, ascending. */
  initial: Int32Array
  /** Per state: the atoms that must hold (bit i = atom i). */
  mustTrue: Uint32Array
  /** Per state: the atoms that must not hold. */
  mustFalse: Uint32Array
  /** Successors in CSR form: the successors of q are `succ[succStart[q] .. succStart[q+1])`, ascending. */
  succStart: Int32Array
  succ: Int32Array
  /** Per state: bit j set when the state belongs to acceptance set j. */
  accept: Uint32Array
  /** Number of acceptance sets (bits 0..acceptanceSets-1 of `accept`); at most 31. */
  acceptanceSets: number
}

/** Whether state q's label holds of a letter (the mask of atoms that hold). */
export function labelHolds(aut: Automaton, q: number, atoms: number): boolean {
  // xor rather than ===, so that bit 31 compares alike in signed and unsigned masks.
  return ((atoms & aut.mustTrue[q]) ^ aut.mustTrue[q]) === 0 && (atoms & aut.mustFalse[q]) === 0
}

/** Acceptance marks of the transition from state `from` (to any successor): the sets `from` belongs to. */
export function transitionMarks(aut: Automaton, from: number): number {
  return aut.accept[from]
}

/** Bitmask of every acceptance set of the automaton. */
export function allAcceptance(aut: Automaton): number {
  return aut.acceptanceSets === 0 ? 0 : (2 ** aut.acceptanceSets - 1) | 0
}

/** Translates `f` (simplified first, see `simplify`) to a reduced generalized Büchi automaton. */
export function ltlToAutomaton(f: Ltl): Automaton {
  return buildAutomaton(simplify(f))
}

/**
 * Translates a formula in negation normal form (see `nnf`) to a generalized Büchi automaton by
 * the tableau of Gerth, Peled, Vardi and Wolper (1995), then reduces it. Throws when the formula
 * is not in NNF or needs more than 31 acceptance sets after reduction.
 */
export function buildAutomaton(f: Ltl): Automaton {
  if (!isNnf(f)) throw new Error('buildAutomaton expects a formula in negation normal form')
  return reduce(tableau(f))
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

/** A node under expansion: GPVW's Incoming, New, Old and Next, with Old's literals also as masks. */
interface Pending {
  incoming: number[]
  todo: number[]
  old: Set<number>
  next: Set<number>
  pos: number
  neg: number
}

/** A finished tableau node: a state of the unreduced automaton. */
interface TableauState {
  incoming: Set<number>
  old: Set<number>
  pos: number
  neg: number
}

interface Raw {
  states: number
  initial: boolean[]
  pos: number[]
  neg: number[]
  succ: number[][]
  /** acceptance[j][q]: state q is in set j. */
  acceptance: boolean[][]
}

const INIT = -1

function tableau(f: Ltl): Raw {
  const cl = new Closure()
  const root = cl.id(f)
  const done: TableauState[] = []
  const byContents = new Map<string, number>()
  const setKey = (s: Set<number>) => [...s].sort((a, b) => a - b).join(',')
  const work: Pending[] = [{ incoming: [INIT], todo: [root], old: new Set(), next: new Set(), pos: 0, neg: 0 }]

  // GPVW's recursive `expand`, with the recursion replaced by a work list: a split pushes its
  // second node and continues with the first.
  nodes: while (work.length > 0) {
    const n = work.pop()!
    for (;;) {
      if (n.todo.length === 0) {
        const k = setKey(n.old) + '|' + setKey(n.next)
        const same = byContents.get(k)
        if (same !== undefined) {
          for (const i of n.incoming) done[same].incoming.add(i)
        } else {
          const id = done.length
          done.push({ incoming: new Set(n.incoming), old: n.old, pos: n.pos, neg: n.neg })
          byContents.set(k, id)
          work.push({ incoming: [id], todo: [...n.next], old: new Set(), next: new Set(), pos: 0, neg: 0 })
        }
        continue nodes
      }
      const eta = n.todo.pop()!
      if (n.old.has(eta)) continue
      const g = cl.formulas[eta]
      switch (g.op) {
        case 'false': continue nodes // contradiction: the node is dropped
        case 'true': n.old.add(eta); break
        case 'atom': {
          const bit = 1 << g.atom
          if (n.neg & bit) continue nodes
          n.pos |= bit
          n.old.add(eta)
          break
        }
        case 'not': {
          const bit = 1 << (g.arg as { atom: number }).atom
          if (n.pos & bit) continue nodes
          n.neg |= bit
          n.old.add(eta)
          break
        }
        case 'and':
          n.old.add(eta)
          n.todo.push(cl.id(g.left), cl.id(g.right))
          break
        case 'next':
          n.old.add(eta)
          n.next.add(cl.id(g.arg))
          break
        case 'or': case 'until': case 'release': {
          const l = cl.id(g.left), r = cl.id(g.right)
          n.old.add(eta)
          const other: Pending = { incoming: n.incoming, todo: [...n.todo], old: new Set(n.old), next: new Set(n.next), pos: n.pos, neg: n.neg }
          // or:          {left}           | {right}
          // f until g:   {f}, next f U g  | {g}
          // f release g: {g}, next f R g  | {f, g}
          if (g.op === 'or') { n.todo.push(l); other.todo.push(r) }
          else if (g.op === 'until') { n.todo.push(l); n.next.add(eta); other.todo.push(r) }
          else { n.todo.push(r); n.next.add(eta); other.todo.push(l, r) }
          work.push(other)
          break
        }
        default: throw new Error(`unexpected '${g.op}' in negation normal form`)
      }
    }
  }

  const m = done.length
  const initial = new Array<boolean>(m).fill(false)
  const succ: number[][] = Array.from({ length: m }, () => [])
  for (let q = 0; q < m; q++) {
    for (const i of done[q].incoming) {
      if (i === INIT) initial[q] = true
      else succ[i].push(q)
    }
  }
  const acceptance: boolean[][] = []
  cl.formulas.forEach((g, id) => {
    if (g.op !== 'until') return
    const r = cl.id(g.right)
    acceptance.push(done.map((s) => !s.old.has(id) || s.old.has(r)))
  })
  return { states: m, initial, pos: done.map((s) => s.pos), neg: done.map((s) => s.neg), succ, acceptance }
}

// ---- Reductions -----------------------------------------------------------------------------

function reduce(raw: Raw): Automaton {
  const { keep, transient } = usefulStates(raw)
  const ids = new Int32Array(raw.states).fill(-1)
  const kept: number[] = []
  for (let q = 0; q < raw.states; q++) if (keep[q]) { ids[q] = kept.length; kept.push(q) }

  // Acceptance sets over the states that remain: drop the sets every state is in, duplicates, and
  // the strict supersets of another set (visiting the subset infinitely often visits the superset).
  const sets0 = raw.acceptance.map((s) => kept.map((q) => s[q])).filter((s) => s.some((x) => !x))
  const distinct = [...new Map(sets0.map((s) => [s.map(Number).join(''), s])).values()]
  const sets = distinct.filter((s) => !distinct.some((t) => t !== s && t.every((x, i) => !x || s[i])))
  if (sets.length > 31) throw new Error(`the formula needs ${sets.length} acceptance sets; at most 31 are supported`)

  const n = kept.length
  const pos = kept.map((q) => raw.pos[q] >>> 0)
  const neg = kept.map((q) => raw.neg[q] >>> 0)
  const acc = kept.map((_, i) => sets.reduce((a, s, j) => (s[i] ? a | (1 << j) : a), 0))
  const succ = kept.map((q) => raw.succ[q].filter((r) => keep[r]).map((r) => ids[r]))
  const initial = kept.map((q) => raw.initial[q])
  removeLittleBrothers(initial, kept.map((q) => transient[q]), pos, neg, acc, succ)

  // Coarsest bisimulation respecting label and acceptance, by naive partition refinement: the
  // automata are small. Bisimilar states accept the same words from there, so merging them keeps
  // the language.
  let block = new Int32Array(n)
  let blocks = renumber(block, kept.map((_, i) => `${pos[i]}/${neg[i]}/${acc[i]}`))
  for (;;) {
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
  const edges: [number, number][] = []
  const out = {
    mustTrue: new Uint32Array(m), mustFalse: new Uint32Array(m), accept: new Uint32Array(m),
  }
  for (let s = 0; s < m; s++) {
    const i = rep[queue[s]]
    out.mustTrue[s] = pos[i]
    out.mustFalse[s] = neg[i]
    out.accept[s] = acc[i]
    for (const r of [...new Set(succ[i].map((x) => order[block[x]]))].sort((a, b) => a - b)) edges.push([s, r])
  }
  const csr = csrFromEdges(m, edges)
  return {
    states: m,
    initial: Int32Array.from([...initialBlocks].map((b) => order[b]).sort((a, b) => a - b)),
    mustTrue: out.mustTrue,
    mustFalse: out.mustFalse,
    succStart: csr.start,
    succ: csr.adj,
    accept: out.accept,
    acceptanceSets: sets.length,
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
function removeLittleBrothers(initial: boolean[], transient: boolean[], pos: number[], neg: number[], acc: number[], succ: number[][]): void {
  const n = initial.length
  const alive = new Array<boolean>(n).fill(true)
  const covers = (y: number, x: number) => {
    if ((pos[y] & ~pos[x]) !== 0 || (neg[y] & ~neg[x]) !== 0) return false
    if (!transient[x] && (acc[x] & ~acc[y]) !== 0) return false
    if (initial[x] && !initial[y]) return false
    for (const v of succ[x]) if (!succ[y].includes(v === x ? y : v)) return false
    for (let u = 0; u < n; u++) if (alive[u] && u !== x && succ[u].includes(x) && !succ[u].includes(y)) return false
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
      succ[x] = []
      for (let u = 0; u < n; u++) succ[u] = succ[u].filter((v) => v !== x)
      changed = true
    }
  }
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
    for (let a = 0; a < 32; a++) {
      if ((aut.mustTrue[q] >>> a) & 1) lits.push(name(a))
      if ((aut.mustFalse[q] >>> a) & 1) lits.push(`not ${name(a)}`)
    }
    const sets: number[] = []
    for (let j = 0; j < aut.acceptanceSets; j++) if ((aut.accept[q] >>> j) & 1) sets.push(j)
    const succ = Array.from(aut.succ.subarray(aut.succStart[q], aut.succStart[q + 1]))
    lines.push(`${init.has(q) ? '>' : ' '}${q} [${lits.join(' and ') || 'true'}] {${sets.join(',')}} -> ${succ.join(' ')}`)
  }
  return lines.join('\n')
}
