// The reference temporal check: the product of the reference state graph (interpreter.ts) with a
// generalized Büchi automaton for the negated property, and a plain SCC pass that looks for a
// reachable cycle meeting every acceptance set of the automaton and every fairness condition of
// semantics.md. It uses the kernel's LTL-to-automaton translation (kernels/logic/automaton.ts) and
// nothing of the kernel's product, emptiness check or explorer, so that the kernel's temporal
// verdicts have an independent oracle for everything after the translation.
import type { PropertyModel, ProtocolModel, Term } from '../../kernels/language/model'
import { allAcceptance, labelHolds, ltlToAutomaton, transitionMarks } from '../../kernels/logic/automaton'
import { fromModel, not } from '../../kernels/logic/ltl'
import { allFairMarks, exactArith, ModelError, type ReferenceState, referenceGraph } from './interpreter'

/** The reference verdict of a temporal property on G_n under one assignment of its process variables. */
export interface TemporalResult {
  verdict: 'holds' | 'violated' | 'inconclusive'
  /** Reachable states of the instance. */
  states: number
  /** A model error is a violation (records.md); its message, or null. */
  modelError: string | null
}

/** Evaluates a property term on a reference state; `procs` maps variable index to a 0-based process. */
function term(t: Term, s: ReferenceState, n: number, procs: number[], consts: number[]): number {
  const who = (r: { k: 'var'; index: number } | { k: 'fixed'; n: number }) => (r.k === 'var' ? procs[r.index] : r.n - 1)
  const ev = (x: Term) => term(x, s, n, procs, consts)
  switch (t.k) {
    case 'lit':
      return t.value
    case 'const':
      return consts[t.index]
    case 'member': {
      const v = s.procs[who(t.proc)].vals[t.index]
      return t.peer === null ? (v as number) : (v as number[])[who(t.peer)]
    }
    case 'alive':
      return s.procs[who(t.proc)].alive
    case 'crashed':
      return 1 - s.procs[who(t.proc)].alive
    case 'pending':
      return s.chans[who(t.from) * n + who(t.to)].some((m) => m.kind === t.message) ? 1 : 0
    case 'neg':
      return -ev(t.arg)
    case 'min':
      return Math.min(ev(t.left), ev(t.right))
    case 'max':
      return Math.max(ev(t.left), ev(t.right))
    case 'bin': {
      const a = ev(t.left)
      const b = ev(t.right)
      switch (t.op) {
        case '+': case '-': case '*': return exactArith(t.op, a, b)
        case '/': case '%':
          // A zero divisor is a model error at the operator, as in protocols (semantics.md).
          if (b === 0) throw new ModelError(`division by zero in a property at line ${t.span.line}, column ${t.span.column}`)
          return exactArith(t.op, a, b)
        case '=': return a === b ? 1 : 0
        case '!=': return a !== b ? 1 : 0
        case '<': return a < b ? 1 : 0
        case '<=': return a <= b ? 1 : 0
        case '>': return a > b ? 1 : 0
        case '>=': return a >= b ? 1 : 0
      }
    }
  }
  throw new Error(`unknown term ${(t as Term).k}`)
}

/**
 * Checks `property` on G_n of `protocol` with its variables bound to `assignment` (1-based process
 * numbers, one per quantified variable, e.g. [1, 2] for p = 1, q = 2). A fair run is one whose cycle
 * meets every fairness bit of the reference graph (every process steps or is down, every channel is
 * empty, received from or has a down receiver, and under eventually synchronous the run is stable).
 */
export function referenceTemporal(
  protocol: ProtocolModel,
  n: number,
  constants: number[] | Record<string, number> | undefined,
  property: PropertyModel,
  assignment: number[],
  limit = 200_000,
  budget = Infinity,
): TemporalResult {
  const g = referenceGraph(protocol, n, constants, limit, budget)
  if (g.modelError !== null) return { verdict: 'violated', states: g.keys.length, modelError: g.modelError }
  if (!g.complete) return { verdict: 'inconclusive', states: g.keys.length, modelError: null }
  const procs = assignment.map((a) => a - 1)
  // Atoms numbered as the translation meets them; each state gets the mask of those that hold.
  const terms: Term[] = []
  const ltl = fromModel(property.formula, (t) => terms.push(t) - 1)
  const aut = ltlToAutomaton(not(ltl))
  // A row of 32-bit words per state: atom a is bit a % 32 of word a / 32 (any number of atoms).
  let letters: number[][]
  try {
    letters = g.states.map((s) => {
      const m = new Array<number>(Math.max(1, Math.ceil(terms.length / 32))).fill(0)
      terms.forEach((t, a) => {
        if (term(t, s, n, procs, g.constants) !== 0) m[a >>> 5] |= 1 << (a & 31)
      })
      return m
    })
  } catch (err) {
    if (err instanceof ModelError) return { verdict: 'violated', states: g.keys.length, modelError: err.message }
    throw err
  }
  // Product nodes (state, automaton state) numbered as found; edges with both kinds of marks.
  const id = new Map<number, number>()
  const nodeState: number[] = []
  const nodeAut: number[] = []
  const succ: number[][] = []
  const fair: number[][] = []
  const Q = aut.states
  const node = (s: number, q: number): number => {
    const k = s * Q + q
    let x = id.get(k)
    if (x === undefined) {
      x = nodeState.length
      id.set(k, x)
      nodeState.push(s)
      nodeAut.push(q)
      succ.push([])
      fair.push([])
    }
    return x
  }
  for (const s of g.initial) for (const q of aut.initial) if (labelHolds(aut, q, letters[s])) node(s, q)
  for (let x = 0; x < nodeState.length; x++) {
    const s = nodeState[x]
    const q = nodeAut[x]
    for (const [t, marks] of g.edges[s]) {
      for (let k = aut.succStart[q]; k < aut.succStart[q + 1]; k++) {
        const q2 = aut.succ[k]
        if (!labelHolds(aut, q2, letters[t])) continue
        succ[x].push(node(t, q2))
        fair[x].push(marks)
      }
    }
  }
  const wantAut = allAcceptance(aut)
  const wantFair = allFairMarks(n)
  for (const comp of components(succ)) {
    const inComp = new Set(comp)
    let autMarks = 0
    let fairMarks = 0
    let hasEdge = false
    for (const x of comp) {
      succ[x].forEach((y, k) => {
        if (!inComp.has(y)) return
        hasEdge = true
        autMarks |= transitionMarks(aut, nodeAut[x])
        fairMarks |= fair[x][k]
      })
    }
    if (hasEdge && (autMarks & wantAut) === wantAut && (fairMarks & wantFair) === wantFair) {
      return { verdict: 'violated', states: g.keys.length, modelError: null }
    }
  }
  return { verdict: 'holds', states: g.keys.length, modelError: null }
}

/** Strongly connected components (Tarjan 1972, "Depth-first search and linear graph algorithms"), iteratively. */
function components(succ: number[][]): number[][] {
  const n = succ.length
  const index = new Array<number>(n).fill(-1)
  const low = new Array<number>(n).fill(0)
  const onStack = new Array<boolean>(n).fill(false)
  const stack: number[] = []
  const out: number[][] = []
  let counter = 0
  for (let root = 0; root < n; root++) {
    if (index[root] >= 0) continue
    const work: [number, number][] = [[root, 0]]
    index[root] = low[root] = counter++
    stack.push(root)
    onStack[root] = true
    while (work.length > 0) {
      const top = work[work.length - 1]
      const [v, k] = top
      if (k < succ[v].length) {
        top[1]++
        const w = succ[v][k]
        if (index[w] < 0) {
          index[w] = low[w] = counter++
          stack.push(w)
          onStack[w] = true
          work.push([w, 0])
        } else if (onStack[w]) low[v] = Math.min(low[v], index[w])
        continue
      }
      work.pop()
      if (work.length > 0) {
        const u = work[work.length - 1][0]
        low[u] = Math.min(low[u], low[v])
      }
      if (low[v] === index[v]) {
        const comp: number[] = []
        let w: number
        do {
          w = stack.pop()!
          onStack[w] = false
          comp.push(w)
        } while (w !== v)
        out.push(comp)
      }
    }
  }
  return out
}
