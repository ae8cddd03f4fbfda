// Temporal product throughput: product nodes per second for liveness properties, against plain
// exploration of the same instance in the same run.
import { readFileSync } from 'node:fs'
import { analyzeNotebook } from '../kernels/language/analyze'
import type { Term } from '../kernels/language/model'
import { FairGraphRecorder, systemOf } from '../kernels/explore/fairgraph'
import { explore } from '../kernels/explore/reach'
import { fromModel } from '../kernels/logic/ltl'
import { checkLtl } from '../kernels/logic/product'
import { compileInstance } from '../kernels/model/instance'
import { compileTerm, termMayFault } from '../kernels/model/observe'

export interface ProductCase {
  name: string
  processes: number
  states: number
  productStates: number
  exploreSeconds: number
  productSeconds: number
  statesPerSecond: number
  productStatesPerSecond: number
  holds: boolean | null
}

const CASES: { file: string; check: number; property: string; processes: number }[] = [
  { file: 'notebooks/depot-radios.md', check: 0, property: 'accuracy', processes: 2 },
  { file: 'notebooks/depot-radios.md', check: 0, property: 'completeness', processes: 2 },
  { file: 'notebooks/depot-radios.md', check: 1, property: 'accuracy', processes: 2 },
  { file: 'notebooks/guide.md', check: 0, property: 'settles', processes: 3 },
]

export function productCases(root: URL): ProductCase[] {
  const out: ProductCase[] = []
  for (const c of CASES) {
    const model = analyzeNotebook(readFileSync(new URL(c.file, root), 'utf8'))
    const check = model.checks[c.check]
    const protocol = model.protocols[check.protocol]
    const prop = check.properties.find((p) => p.name === c.property)!
    const inst = compileInstance(protocol, c.processes, protocol.consts.map((k) => k.value))
    // The fair graph is recorded during exploration, as the runner does (its cost is in exploreSeconds).
    const recorder = new FairGraphRecorder(inst)
    const r = explore(inst, { edges: recorder })
    const terms: Term[] = []
    const ltl = fromModel(prop.formula, (t) => terms.push(t) - 1)
    const assignment = prop.vars.map((_, i) => i)
    const t0 = performance.now()
    const sys = systemOf(inst, r, recorder.graph(r.states), terms.map((t) => compileTerm(inst, t, assignment)), terms.some((t) => termMayFault(inst, t)))
    const v = checkLtl(sys, ltl)
    const productSeconds = (performance.now() - t0) / 1000
    out.push({
      name: `${c.file.replace('notebooks/', '')} ${protocol.name}: ${prop.name}`,
      processes: c.processes,
      states: r.states,
      productStates: v.nodes,
      exploreSeconds: r.seconds,
      productSeconds,
      statesPerSecond: r.states / r.seconds,
      productStatesPerSecond: v.nodes / productSeconds,
      holds: v.holds,
    })
  }
  return out
}
