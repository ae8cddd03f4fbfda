// Independent oracles for proofs by induction on generated protocols (tests/reference/generate.ts):
// explicit enumeration of the whole type space of tiny instances (every s with I(s), every explicit
// successor), and the explorer: an induction `holds` must never meet an explorer `violated`.
import { afterAll, describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { PropertyModel } from '../../kernels/language/model'
import { explore } from '../../kernels/explore/reach'
import { compileInstance, type Instance } from '../../kernels/model/instance'
import { writeField, type Field } from '../../kernels/model/layout'
import { conjunctsOf, explicitConjunct } from '../../kernels/induction/invariant'
import { proveInduction } from '../../kernels/induction/prove'
import { loadSolver } from '../../kernels/induction/solver'
import { generateNotebook, Random } from '../reference/generate'

afterAll(async () => { await (await loadSolver()).close() })

/** Every state of the type space, or null when there are more than `max`. */
function typeSpace(inst: Instance, max: number): Uint32Array[] | null {
  const { layout } = inst
  const slots: { f: Field; size: number }[] = []
  for (let p = 0; p < inst.n; p++) {
    slots.push({ f: layout.alive[p], size: 2 })
    if (layout.idle) slots.push({ f: layout.idle[p], size: layout.idleBound })
    layout.vars.forEach((info, v) => {
      const f = layout.scalar[p][v]
      if (f) slots.push({ f, size: info.hi - info.lo + 1 })
      for (const e of layout.entry[p][v]) if (e) slots.push({ f: e, size: info.hi - info.lo + 1 })
    })
  }
  const ages = layout.tracksAges ? layout.delay : 1
  for (const row of layout.channel) for (const f of row) slots.push({ f, size: 1 << ages })
  if (layout.stable) slots.push({ f: layout.stable, size: 2 })
  let total = 1
  for (const s of slots) { total *= s.size; if (total > max) return null }
  const out: Uint32Array[] = []
  const pick = new Array(slots.length).fill(0)
  for (let k = 0; k < total; k++) {
    const w = new Uint32Array(inst.words)
    slots.forEach((s, i) => writeField(w, 0, s.f, pick[i]))
    out.push(w)
    for (let i = slots.length - 1; i >= 0; i--) { if (++pick[i] < slots[i].size) break; pick[i] = 0 }
  }
  return out
}

/** The explicit answer: 'base', 'step' or 'holds'. */
function explicitInduction(inst: Instance, props: PropertyModel[], space: Uint32Array[]): 'base' | 'step' | 'holds' {
  const tests = conjunctsOf(props, inst.n).map((c) => explicitConjunct(inst, props[c.property], c.assignment))
  const inv = (w: Uint32Array, o: number) => tests.every((t) => t(w, o))
  const init = inst.initialStates()
  for (let o = 0; o < init.length; o += inst.words) if (!inv(init, o)) return 'base'
  for (const s of space) {
    if (!inv(s, 0)) continue
    let bad = false
    const err = inst.successors(s, 0, (dst) => { if (!inv(dst, 0)) { bad = true; return true } return false })
    if (err || bad) return 'step'
  }
  return 'holds'
}

function candidates(p: { vars: { name: string; perPeer: boolean; type: { k: string; labels?: string[] } }[]; messages: { name: string }[] }, r: Random): string[] {
  const out: string[] = []
  for (const v of p.vars) {
    const ref = v.perPeer ? `p.${v.name}[q]` : `p.${v.name}`
    const head = v.perPeer ? 'forall p, q: always' : 'forall p: always'
    if (v.type.k === 'bool') out.push(`${head} (${r.chance(0.5) ? 'not ' : ''}${ref})`)
    else if (v.type.k === 'enum') out.push(`${head} (${ref} = ${v.type.labels![0]} or crashed(p))`)
    else out.push(`${head} (${ref} <= ${r.int(0, 1)})`)
  }
  if (p.messages.length) out.push(`forall p, q: always (pending(${p.messages[0].name}, q -> p) implies alive(q))`)
  return out
}

describe('induction against its oracles', () => {
  test('generated protocols: the solver agrees with the enumerated type space, and never holds where the explorer finds a violation', async () => {
    let compared = 0
    const outcomes = new Set<string>()
    for (let seed = 1; seed <= 40 && compared < 40; seed++) {
      const base = generateNotebook(seed)
      const first = analyzeNotebook(base)
      if (first.diagnostics.some((d) => d.severity === 'error')) continue
      const r = new Random(seed * 101)
      for (const text of candidates(first.protocols[0], r)) {
        const nb = analyzeNotebook(`${base}\n\`\`\`property\nproperty cand = ${text}\n\`\`\`\n\n\`\`\`check\ncheck ${first.protocols[0].name}: cand at N = 2\n\`\`\`\n`)
        if (nb.diagnostics.some((d) => d.severity === 'error')) continue
        const protocol = nb.protocols[0]
        const props = nb.checks[0].properties
        for (const n of [1, 2]) {
          if (props[0].vars.length > n) continue
          const consts = protocol.consts.map((c) => c.value)
          const inst = compileInstance(protocol, n, consts)
          const space = typeSpace(inst, 4000)
          if (!space) continue
          const proof = await proveInduction(protocol, props, n, consts)
          const want = explicitInduction(inst, props, space)
          expect(proof.outcome.kind, `seed ${seed}, ${text}, N = ${n}`).toBe(want)
          outcomes.add(want)
          const ex = explore(inst, { limit: 20000, invariant: (w, o) => conjunctsOf(props, n).every((c) => explicitConjunct(inst, props[c.property], c.assignment)(w, o)) })
          if (proof.outcome.kind === 'holds') expect(ex.outcome, `explorer on seed ${seed}, ${text}`).toBe('ok')
          compared++
        }
      }
    }
    expect(compared).toBeGreaterThanOrEqual(20)
    expect([...outcomes].sort()).toEqual(['base', 'holds', 'step'])
  }, 600_000)
})
