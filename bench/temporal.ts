// Temporal rows against the invariant row on the same instance: a heartbeat detector of our own
// (orchard pumps) at N = 3. The invariant row is one exploration with the invariant checked on
// every state; a temporal row explores once while recording the fair graph, then searches the
// product with the automaton of the negated property. Both are measured in the same run, in turns,
// three rounds per temporal row, and the round with the median ratio is reported, so the ratios
// compare on a shared, noisy machine even when the seconds do not.
import { analyzeNotebook } from '../kernels/language/analyze'
import type { Formula, PropertyModel, Term } from '../kernels/language/model'
import { FairGraphRecorder, systemOf } from '../kernels/explore/fairgraph'
import { explore } from '../kernels/explore/reach'
import type { EmptinessWork } from '../kernels/logic/emptiness'
import { fromModel } from '../kernels/logic/ltl'
import { checkLtl } from '../kernels/logic/product'
import { compileInstance, type Instance } from '../kernels/model/instance'
import { compileTerm, termMayFault } from '../kernels/model/observe'

/** One temporal row measured beside the invariant row of the same instance. */
export interface TemporalCase {
  name: string
  processes: number
  states: number
  transitions: number
  /** Fair-graph edges recorded (0 in recompute mode). */
  fairEdges: number
  productNodes: number
  productEdges: number
  holds: boolean | null
  /** Exploration with the invariant, alone. */
  invariantSeconds: number
  /** Exploration with the fair graph recorded, then the product search. */
  exploreSeconds: number
  productSeconds: number
  temporalSeconds: number
  /** temporalSeconds / invariantSeconds (goal: at most 2). */
  overInvariant: number
  statesPerSecond: number
  productNodesPerSecond: number
  /** Store (arena and hash table) bytes per reachable state. */
  storeBytesPerState: number
  /** Peak bytes per reachable state of the temporal row: store, fair graph, search tables. */
  temporalBytesPerState: number
  mode: 'record' | 'recompute'
}

const pumps = `\`\`\`protocol
protocol pumps {
  const delay = 2
  const patience = 2
  const cap = 4
  timing synchronous(delay: delay, idle: 1)
  faults crash
  message beat
  state suspect[peer]: bool = false
  state wait[peer]: 1..cap = patience
  state quiet[peer]: 0..cap = 0
  on beat from q {
    quiet[q] := 0
    if suspect[q] {
      suspect[q] := false
      wait[q] := min(wait[q] + 1, cap)
    }
  }
  step {
    broadcast beat
    for q {
      quiet[q] := min(quiet[q] + 1, cap)
      if quiet[q] >= wait[q] { suspect[q] := true }
    }
  }
}
\`\`\`
\`\`\`property
property bounded = forall p, q: always p.wait[q] <= cap
property completeness = forall p, q: correct(p) and faulty(q) implies eventually always p.suspect[q]
property accuracy = forall p, q: correct(p) and correct(q) implies eventually always not p.suspect[q]
\`\`\`
\`\`\`check
check pumps: bounded, completeness, accuracy at N = 3
\`\`\`
`

function atomOf(f: Formula): Term {
  if (f.k === 'always' && f.arg.k === 'atom') return f.arg.term
  throw new Error('the invariant of the benchmark is `always` of one atom')
}

/** The rows measured, in this order: property and how the fair graph is kept. */
const ROWS = [['completeness', 'record'], ['accuracy', 'record'], ['completeness', 'recompute']] as const

/** One temporal row on `inst`: the exploration recording the fair graph, then the product search. */
function temporalRow(inst: Instance, prop: PropertyModel, mode: 'record' | 'recompute', assignment: number[]) {
  const t0 = performance.now()
  const recorder = new FairGraphRecorder(inst, mode === 'record' ? undefined : 0)
  const r = explore(inst, { edges: recorder })
  const graph = recorder.graph(r.states)
  const t1 = performance.now()
  const terms: Term[] = []
  const ltl = fromModel(prop.formula, (t) => terms.push(t) - 1)
  const sys = systemOf(inst, r, graph, terms.map((t) => compileTerm(inst, t, assignment)), terms.some((t) => termMayFault(inst, t)))
  const work: EmptinessWork = { iterations: 0 }
  const v = checkLtl(sys, ltl, { work })
  const t2 = performance.now()
  return { r, graph, v, work, terms, exploreSeconds: (t1 - t0) / 1000, productSeconds: (t2 - t1) / 1000 }
}

/** Rounds of (invariant row, temporal row) per temporal row; odd, so the median is one round. */
const ROUNDS = 3

/** The temporal rows of the pumps detector at N = 3, in record and recompute mode. */
export function temporalCases(): TemporalCase[] {
  const nb = analyzeNotebook(pumps)
  const errors = nb.diagnostics.filter((d) => d.severity === 'error')
  if (errors.length > 0) throw new Error(`${errors[0].line}:${errors[0].column} ${errors[0].message}`)
  const protocol = nb.protocols[0]
  const n = 3
  const inst = compileInstance(protocol, n, protocol.consts.map((c) => c.value))
  const byName = (name: string) => nb.checks[0].properties.find((p) => p.name === name)!
  const assignment = [0, 1]
  const bound = compileTerm(inst, atomOf(byName('bounded').formula), assignment)
  explore(inst, { edges: new FairGraphRecorder(inst) }) // warm-up: compiles the hot loops once
  // The same for the product: every row once at N = 2 (a few thousand states), so that no row's
  // product is timed while its search is still being compiled (the exploration warm-up's reason).
  const small = compileInstance(protocol, 2, protocol.consts.map((c) => c.value))
  for (const [name, mode] of ROWS) temporalRow(small, byName(name), mode, assignment)
  const invariantRow = () => {
    const inv = explore(inst, { invariant: (w, o) => bound(w, o) !== 0 })
    if (!inv.complete) throw new Error('the invariant row of the benchmark did not hold')
    return inv
  }
  const out: TemporalCase[] = []
  for (const [name, mode] of ROWS) {
    // The invariant row and this temporal row in turns, ROUNDS times (the machine is shared, so a
    // change of load falls on both alike); the round with the median ratio is reported.
    const rounds = Array.from({ length: ROUNDS }, () => {
      const inv = invariantRow()
      const row = temporalRow(inst, byName(name), mode, assignment)
      return { inv, row, ratio: (row.exploreSeconds + row.productSeconds) / inv.seconds }
    }).sort((x, y) => x.ratio - y.ratio)
    const { inv, row } = rounds[ROUNDS >> 1]
    const { r, graph, v, work, terms, exploreSeconds, productSeconds } = row
    const temporalSeconds = exploreSeconds + productSeconds
    // Per-state table of the product system: atom masks (fairgraph.ts FairSystem: a byte a state
    // for up to 7 atoms, else 4 bytes a state per 32 atoms).
    const systemBytes = (terms.length <= 7 ? 1 : 4 * Math.ceil(terms.length / 32)) * r.states
    out.push({
      name: `pumps heartbeat, synchronous, crash: ${name}`,
      processes: n,
      states: r.states,
      transitions: r.transitions,
      fairEdges: graph ? graph.target.length : 0,
      productNodes: v.nodes,
      productEdges: v.edges,
      holds: v.holds,
      invariantSeconds: inv.seconds,
      exploreSeconds,
      productSeconds,
      temporalSeconds,
      overInvariant: temporalSeconds / inv.seconds,
      statesPerSecond: r.states / r.seconds,
      productNodesPerSecond: v.nodes / productSeconds,
      storeBytesPerState: r.bytesPerState,
      temporalBytesPerState: r.bytesPerState + ((graph?.bytes ?? 0) + (work.bytes ?? 0) + systemBytes) / r.states,
      mode,
    })
  }
  return out
}
