// Empirical witnesses of the cutoff (cutoff.md): for protocols the class check grants, G_3 projects
// onto G_2 exactly and is closed under renaming processes; for a refused one, a property separates
// G_2 from G_3. The oracle for states is the canonical JSON text (oracle.ts), renamed and projected
// as plain objects; the necessity case is confirmed by the reference interpreter too.
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { ProtocolModel } from '../../kernels/language/model'
import { explore } from '../../kernels/explore/reach'
import { compileInstance } from '../../kernels/model/instance'
import { compileTerm } from '../../kernels/model/observe'
import { classCheck } from '../../kernels/symmetry/classcheck'
import { referenceReachable } from '../reference/interpreter'
import { notebook, PUMPS } from './fixtures'
import { generateInClass } from './inclass'
import { permutations, projectText, reachable, renameText } from './oracle'

/** Projection and symmetry for one protocol; false when G_3 is too large to witness here. */
function witness(protocol: ProtocolModel, constants: number[], limit = 3000): boolean {
  const g3 = reachable(compileInstance(protocol, 3, constants), limit)
  if (!g3) return false
  const g2 = reachable(compileInstance(protocol, 2, constants), limit)!
  const projected = new Set([...g3.texts].map((t) => projectText(t, 2)))
  // Every state of G_3 projects onto a state of G_2, and every state of G_2 is such a projection.
  // (Failures are collected and asserted once: an expect per state would dominate the run time.)
  const missing = [...projected].filter((t) => !g2.texts.has(t))
  expect(missing, 'projections not reachable in G_2').toEqual([])
  expect(projected.size).toBe(g2.texts.size)
  // The reachable set of G_3 is closed under every permutation of process names.
  const open: string[] = []
  for (const perm of permutations(3).slice(1)) {
    for (const t of g3.texts) if (!g3.texts.has(renameText(t, perm))) open.push(`[${perm}] ${t}`)
  }
  expect(open, 'states whose renaming is not reachable').toEqual([])
  return true
}

describe('projection and symmetry witnesses', () => {
  it('hold for the orchard pumps (small constants)', () => {
    const c = notebook(PUMPS, ['property calm = forall p, q: always (correct(q) implies not p.suspect[q])'])
    expect(classCheck(c.protocol, c.properties[0]).reasons).toEqual([])
    expect(witness(c.protocol, [1, 1, 2], 50000)).toBe(true)
  })

  it('hold for at least 100 generated in-class protocols', () => {
    let witnessed = 0
    for (let seed = 0; seed < 140; seed++) {
      const m = analyzeNotebook(generateInClass(seed))
      expect(m.diagnostics.filter((d) => d.severity === 'error'), `seed ${seed}`).toEqual([])
      // The generator is in the class by construction: the class check must agree.
      expect(classCheck(m.protocols[0], m.checks[0].properties[0]).reasons, `seed ${seed}`).toEqual([])
      if (witness(m.protocols[0], [])) witnessed++
    }
    expect(witnessed).toBeGreaterThanOrEqual(100)
  })
})

describe('necessity: a refused protocol whose verdict changes between G_2 and G_3', () => {
  // Lighthouse keepers sound the horn once they have seen two other lamps: a scalar fed by an
  // aggregate feeds a broadcast. With one peer the horn never sounds; with two it does.
  const c = notebook(`protocol keepers {
  timing synchronous(delay: 1, idle: 1)
  faults none
  message lamp
  message horn
  state seen[peer]: bool = false
  state busy: bool = false
  on lamp from q { seen[q] := true }
  step {
    busy := (count q: seen[q]) >= 2
    if busy { broadcast horn } else { broadcast lamp }
  }
}`, ['property hush = forall p, q: always not pending(horn, q -> p)'])
  const prop = c.properties[0]
  const atom = prop.formula.k === 'always' && prop.formula.arg.k === 'not' && prop.formula.arg.arg.k === 'atom' ? prop.formula.arg.arg.term : null

  const holds = (n: number): boolean => {
    const inst = compileInstance(c.protocol, n, [])
    const terms = permutations(n).filter((a) => a.length >= 2).map((a) => compileTerm(inst, atom!, [a[0], a[1]]))
    return explore(inst, { invariant: (w, off) => terms.every((t) => t(w, off) === 0) }).outcome === 'ok'
  }

  it('is refused by the class check, under rules 2 and 5', () => {
    expect(new Set(classCheck(c.protocol, prop).reasons.map((r) => r.rule))).toEqual(new Set([2, 5]))
  })
  it('satisfies the invariant on G_2 and violates it on G_3 (packed explorer)', () => {
    expect(atom).not.toBeNull()
    expect(holds(2)).toBe(true)
    expect(holds(3)).toBe(false)
  })
  it('fails the projection witness, so the witness can tell', () => {
    expect(() => witness(c.protocol, [])).toThrow(/projections not reachable in G_2/)
  })
  it('agrees with the reference interpreter (independent oracle)', () => {
    const horn = (n: number) => [...referenceReachable(c.protocol, n).states].some((s) => s.includes('"horn'))
    expect(horn(2)).toBe(false)
    expect(horn(3)).toBe(true)
  })
})
