// Symmetry reduction against unreduced search on the same instance: bells of our own at N = 5,
// one process fixed (a one-variable property) and two fixed (a two-variable one). Reduced search
// stores fewer states, so it must also be faster; the ratio is measured in the same run.
import { analyzeNotebook } from '../kernels/language/analyze'
import { explore } from '../kernels/explore/reach'
import { compileInstance } from '../kernels/model/instance'
import { canonicalizer, orbitTotal } from '../kernels/symmetry/canon'

/** One reduced exploration beside the unreduced one. */
export interface ReductionCase {
  name: string
  processes: number
  fixed: number
  states: number
  representatives: number
  /** Orbit-weighted total of the representatives (equals `states`). */
  orbitTotal: number
  unreducedSeconds: number
  /** Reduced exploration plus orbit counting. */
  reducedSeconds: number
  /** unreducedSeconds / reducedSeconds (goal: above 1). */
  speedup: number
}

/** Bells of our own (shared by the invariant and temporal reduction cases). */
export const bells = `\`\`\`protocol
protocol bells {
  const cap = 1
  timing synchronous(delay: 1, idle: 1)
  faults crash
  message ding
  state rung: bool = false
  state heard[peer]: 0..cap = 0
  on ding from q { heard[q] := min(heard[q] + 1, cap) }
  step {
    rung := one of {true, false}
    if rung { broadcast ding }
  }
}
\`\`\`
`

/** Bells at N = 5, reduced with one and with two processes fixed, against unreduced search. */
export function reductionCases(): ReductionCase[] {
  const protocol = analyzeNotebook(bells).protocols[0]
  const n = 5
  const inst = compileInstance(protocol, n, protocol.consts.map((c) => c.value))
  const full = explore(inst)
  const out: ReductionCase[] = []
  for (const fixed of [[0], [0, 1]]) {
    const t0 = performance.now()
    const r = explore(inst, { canonicalize: canonicalizer(inst, fixed) })
    const total = orbitTotal(inst, r.store.data, r.states, fixed)
    const reducedSeconds = (performance.now() - t0) / 1000
    out.push({
      name: `bells, synchronous, crash, ${fixed.length} fixed`,
      processes: n,
      fixed: fixed.length,
      states: full.states,
      representatives: r.states,
      orbitTotal: total,
      unreducedSeconds: full.seconds,
      reducedSeconds,
      speedup: full.seconds / reducedSeconds,
    })
  }
  return out
}
