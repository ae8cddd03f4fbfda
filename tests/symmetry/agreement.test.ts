// Verdict agreement (cutoff.md "Empirical witnesses"): for in-class protocols an invariant over two
// processes has the same verdict on G_2, G_3 and G_4; and on G_3, G_4 a search reduced by the
// canonicalizer (processes 1 and 2 fixed, the others permuted) gives the verdict of the full search.
// Oracle: the full, unreduced packed search over every assignment of distinct processes.
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { Term } from '../../kernels/language/model'
import { StateStore } from '../../kernels/base/stateset'
import { explore } from '../../kernels/explore/reach'
import { compileInstance, type Instance } from '../../kernels/model/instance'
import { compileTerm } from '../../kernels/model/observe'
import { canonicalizer } from '../../kernels/symmetry/canon'
import { classCheck } from '../../kernels/symmetry/classcheck'
import { generateInClass } from './inclass'

const LIMIT = 20000

/** Full search: the invariant `not atom` for every assignment of distinct p, q. null: too large. */
function fullVerdict(inst: Instance, atom: Term): boolean | null {
  const terms: ((w: Uint32Array, off: number) => number)[] = []
  for (let p = 0; p < inst.n; p++) for (let q = 0; q < inst.n; q++) if (p !== q) terms.push(compileTerm(inst, atom, [p, q]))
  const r = explore(inst, { limit: LIMIT, invariant: (w, off) => terms.every((t) => t(w, off) === 0) })
  if (r.limitHit) return null
  return r.outcome === 'ok'
}

/** Reduced search: one representative per orbit of processes 3..n, assignment p = 1, q = 2 only. */
function reducedVerdict(inst: Instance, atom: Term): { holds: boolean; states: number } {
  const canon = canonicalizer(inst, [0, 1])
  const term = compileTerm(inst, atom, [0, 1])
  const W = inst.words
  const store = new StateStore(W)
  const rep = new Uint32Array(W)
  const init = inst.initialStates()
  for (let off = 0; off < init.length; off += W) {
    canon(init, off, rep)
    if (term(rep, 0) !== 0) return { holds: false, states: store.size }
    store.insert(rep, 0)
  }
  const src = new Uint32Array(W)
  let violated = false
  for (let k = 0; k < store.size && !violated; k++) {
    store.get(k, src)
    inst.successors(src, 0, (dst) => {
      canon(dst, 0, rep)
      if (term(rep, 0) !== 0) violated = true
      store.insert(rep, 0)
      return violated
    })
  }
  return { holds: !violated, states: store.size }
}

describe('verdicts of in-class protocols', () => {
  it('agree across N = 2, 3, 4 and between full and reduced searches', () => {
    let compared = 0
    let reducedSmaller = 0
    const verdicts = new Set<boolean>()
    for (let seed = 0; seed < 40; seed++) {
      const text = generateInClass(seed).replace('always (correct(q) implies not p.e0[q])', 'always not p.e0[q]')
      const m = analyzeNotebook(text)
      const prop = m.checks[0].properties[0]
      expect(classCheck(m.protocols[0], prop).reasons).toEqual([])
      const f = prop.formula
      const atom = f.k === 'always' && f.arg.k === 'not' && f.arg.arg.k === 'atom' ? f.arg.arg.term : null
      expect(atom).not.toBeNull()
      const g2 = fullVerdict(compileInstance(m.protocols[0], 2, []), atom!)
      for (const n of [3, 4]) {
        const inst = compileInstance(m.protocols[0], n, [])
        const full = fullVerdict(inst, atom!)
        if (full === null || g2 === null) continue
        const reduced = reducedVerdict(inst, atom!)
        expect({ seed, n, verdict: full }).toEqual({ seed, n, verdict: g2 })
        expect({ seed, n, verdict: reduced.holds }).toEqual({ seed, n, verdict: full })
        compared++
        verdicts.add(full)
        if (reduced.holds && reduced.states < explore(inst).states) reducedSmaller++
      }
    }
    expect(compared).toBeGreaterThanOrEqual(40)
    // Both verdicts occur, so agreement is not trivially "everything holds".
    expect(verdicts).toEqual(new Set([true, false]))
    expect(reducedSmaller).toBeGreaterThan(0)
  })
})
