// Temporal rows under symmetry reduction (the annotated quotient, kernels/symmetry/temporal.ts)
// against the unreduced temporal route on the same instance: bells of our own at N = 5, with two
// processes fixed (a two-variable property: the free group has 6 permutations) and one fixed (24).
// Both routes run in the same process, so the speedup compares on a shared machine; the verdicts
// must agree (a disagreement is printed and fails the bench).
import { analyzeNotebook } from '../kernels/language/analyze'
import type { Term } from '../kernels/language/model'
import { FairGraphRecorder, systemOf } from '../kernels/explore/fairgraph'
import { explore } from '../kernels/explore/reach'
import { fromModel } from '../kernels/logic/ltl'
import { checkLtl } from '../kernels/logic/product'
import { compileInstance } from '../kernels/model/instance'
import { compileTerm } from '../kernels/model/observe'
import { reducedTemporal } from '../kernels/symmetry/temporal'
import { bells } from './reduction'

/** One temporal row, reduced and unreduced. */
export interface TemporalReductionCase {
  name: string
  processes: number
  fixed: number
  states: number
  representatives: number
  /** Orbit-weighted total of the representatives (equals `states`). */
  orbitTotal: number
  holds: boolean | null
  /** The unreduced verdict (the oracle). */
  unreducedHolds: boolean | null
  productNodes: number
  unreducedProductNodes: number
  /** Explore with the fair graph recorded, then the product search. */
  unreducedSeconds: number
  /** Reduced exploration recording the quotient, the quotient search and orbit counting. */
  reducedSeconds: number
  /** unreducedSeconds / reducedSeconds (goal: above 1). */
  speedup: number
}

const bellsChecked = `${bells}\`\`\`property
property kept = forall p, q: always (p.heard[q] = 1 implies always p.heard[q] = 1)
property lively = forall p: correct(p) implies always eventually alive(p)
property told = forall p, q: correct(p) and correct(q) implies eventually p.heard[q] = 1
\`\`\`
\`\`\`check
check bells: kept, lively, told at N = 5
\`\`\`
`

/** Bells at N = 5: two temporal rows that hold (two and one process fixed) and one violated. */
export function temporalReductionCases(n = 5): TemporalReductionCase[] {
  const nb = analyzeNotebook(bellsChecked)
  const errors = nb.diagnostics.filter((d) => d.severity === 'error')
  if (errors.length > 0) throw new Error(`${errors[0].line}:${errors[0].column} ${errors[0].message}`)
  const protocol = nb.protocols[0]
  const inst = compileInstance(protocol, n, protocol.consts.map((c) => c.value))
  const out: TemporalReductionCase[] = []
  for (const prop of nb.checks[0].properties) {
    const fixed = prop.vars.map((_, i) => i)
    const terms: Term[] = []
    const ltl = fromModel(prop.formula, (t) => { const k = terms.indexOf(t); return k >= 0 ? k : terms.push(t) - 1 })
    const atoms = terms.map((t) => compileTerm(inst, t, fixed))

    const t0 = performance.now()
    const recorder = new FairGraphRecorder(inst)
    const r = explore(inst, { edges: recorder })
    const v = checkLtl(systemOf(inst, r, recorder.graph(r.states), atoms), ltl)
    const unreducedSeconds = (performance.now() - t0) / 1000

    const t1 = performance.now()
    const q = reducedTemporal(inst, fixed, atoms, ltl, { limit: Infinity })
    const reducedSeconds = (performance.now() - t1) / 1000
    if (q.kind !== 'decided') throw new Error(`the reduced ${prop.name} row was not decided (${q.kind})`)
    if (q.holds !== v.holds) throw new Error(`reduced and unreduced verdicts of ${prop.name} disagree`)
    out.push({
      name: `bells, synchronous, crash: ${prop.name}`,
      processes: n,
      fixed: fixed.length,
      states: r.states,
      representatives: q.representatives,
      orbitTotal: q.states,
      holds: q.holds,
      unreducedHolds: v.holds,
      productNodes: q.productNodes,
      unreducedProductNodes: v.nodes,
      unreducedSeconds,
      reducedSeconds,
      speedup: unreducedSeconds / reducedSeconds,
    })
  }
  return out
}
