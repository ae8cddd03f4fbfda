// Temporal checks under symmetry reduction (the annotated quotient: kernels/logic/quotient.ts,
// kernels/symmetry/temporal.ts). Oracle: the unreduced temporal search on the same instance
// (explore + FairGraphRecorder + checkLtl, kernels/logic/product.ts), which shares with the
// quotient only the automaton translation and the fairness marks. First a hand-made quotient in
// which a cycle swaps two processes (the case a plain quotient gets wrong), then generated
// protocols at N = 3 and 4, then the runner's rows.
import { describe, expect, it } from 'vitest'
import { FairGraphRecorder, systemOf } from '../../kernels/explore/fairgraph'
import { explore } from '../../kernels/explore/reach'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { Formula, ProtocolModel, PropertyModel, Term } from '../../kernels/language/model'
import { FALSE, fromModel, type Ltl, show } from '../../kernels/logic/ltl'
import { checkLtl, type System } from '../../kernels/logic/product'
import { checkLtlQuotient, type QuotientSystem } from '../../kernels/logic/quotient'
import { ModelSetupError, PropertyFault } from '../../kernels/model/errors'
import { compileInstance, type Instance } from '../../kernels/model/instance'
import { compileTerm } from '../../kernels/model/observe'
import { planRows, runRow } from '../../kernels/run'
import { canonicalizer, freePermutations, permuteState } from '../../kernels/symmetry/canon'
import { decideCutoff } from '../../kernels/symmetry/cutoff'
import { symmetries } from '../../kernels/symmetry/group'
import { reducedTemporal } from '../../kernels/symmetry/temporal'
import { generateNotebook, generateProperties } from '../reference/generate'
import { generateInClass } from './inclass'
import { holdsOn, Random, randomLtl } from '../logic/lasso'

describe('the quotient fair-cycle test on a hand-made system', () => {
  // Two processes, no channels considered (2 fairness sets: process 0 steps, process 1 steps).
  // Full system: states "turn 0" (A) and "turn 1" (B); in A process 0 steps and the turn passes
  // (A -> B, marks {0}), in B process 1 steps (B -> A, marks {1}). Its one cycle is fair. Swapping
  // the processes maps A to B, so the quotient has one representative A with one edge A -> A,
  // marks {0}, annotated with the swap. Read without the permutation, that cycle only ever lets
  // process 0 step and looks unfair; with it, the swap's orbit {0, 1} meets the marks.
  const group = symmetries(2, [], 2)
  const swap = group.perm(1)[0] === 1 ? 1 : 0
  const quotient = (perm: number): QuotientSystem => ({
    initial: () => [0], atoms: () => 0, fairnessSets: 2, states: 1, group,
    successors(_s, to, p, fair) { to.push(0); p.push(perm); fair.push(1) },
  })
  const full: System = {
    initial: () => [0], atoms: () => 0, fairnessSets: 2, states: 2,
    successors(s, to, fair) { to.push(1 - s); fair.push(s === 0 ? 1 : 2) },
  }
  // `false` fails on every run: it holds iff there is no fair run at all.
  it('finds the fair cycle that swaps the processes, as the full system has', () => {
    expect(checkLtl(full, FALSE).holds).toBe(false)
    expect(checkLtlQuotient(quotient(swap), FALSE).holds).toBe(false)
  })
  it('finds no fair cycle when the edge keeps the names (only process 0 ever steps)', () => {
    // The full system of this quotient: A -> A with marks {0} (and B -> B with {1}, unreachable).
    const stuck: System = { ...full, successors(s, to, fair) { to.push(s); fair.push(s === 0 ? 1 : 2) } }
    expect(checkLtl(stuck, FALSE).holds).toBe(true)
    expect(checkLtlQuotient(quotient(0), FALSE).holds).toBe(true)
  })
})

/**
 * A random symmetric system: n processes, each with a local state in 0..L-1 moved by one relation;
 * in each tick one process steps, or (when allowed) two in local state 0 step together, or nobody
 * does. Marks: bit i when process i steps, or always while it is in the `parked` local state (as a
 * crashed process is always marked). Initial states: every process in an allowed initial local
 * state. Atoms read the local state of process 0 when it is fixed, otherwise counts only, so they
 * are symmetric. Its full graph and its annotated quotient (brute-force canonical forms, the least
 * code over the group, and the permutation that gives it) are built here from the definition.
 */
function symmetricSystem(r: Random, n: number, fixed: number[]) {
  // Teams variant: local states 0/1 (team A with/without its token) and 2/3 (team B); each token
  // passes only within its team (or, when `keep`, may stay), so a component's group keeps the
  // teams apart and has more than one orbit on the free processes.
  const teams = r.next() < 0.35, keep = r.next() < 0.5
  const L = teams ? 4 : 2 + r.int(2)
  const moves = Array.from({ length: L }, () => [...new Set([r.int(L), ...(r.next() < 0.5 ? [r.int(L)] : [])])])
  const pairs = r.next() < 0.5, idle = r.next() < 0.5
  const parked = r.next() < 0.4 ? L - 1 : -1
  // Token variant: local state 0 holds the token; only its holder steps (others too when `others`),
  // and it hands the token to any other process. A fair cycle then needs the token to visit every
  // process, which the quotient sees only through the permutations: in a representative's names
  // the same position may hold the token every time.
  const token = r.next() < 0.5, others = r.next() < 0.3
  const inits = [...new Set([0, ...(r.next() < 0.4 ? [1] : [])])]
  const size = L ** n
  const decode = (c: number) => Array.from({ length: n }, (_, i) => Math.floor(c / L ** i) % L)
  const encode = (xs: number[]) => xs.reduce((c, x, i) => c + x * L ** i, 0)
  const group = symmetries(n, fixed, n)
  // Any choice of one member per orbit makes a quotient; a scrambled one (least hash, not least
  // code) gives representatives whose layouts differ, so that marks must be read through the
  // accumulated permutation rather than in each representative's own names.
  const salt = r.int(1 << 30), scrambled = r.next() < 0.5
  const rank = (code: number) => (scrambled ? Math.imul(code ^ salt, 0x9e3779b1) >>> 0 : code)
  const canon = (c: number): { rep: number; perm: number } => {
    const xs = decode(c)
    let best = { rep: -1, perm: 0, rank: Infinity }
    for (let g = 0; g < group.size; g++) {
      const img = new Array<number>(n)
      group.perm(g).forEach((to, i) => { img[to] = xs[i] })
      const code = encode(img)
      if (rank(code) < best.rank) best = { rep: code, perm: g, rank: rank(code) }
    }
    return best
  }
  const edges = (c: number): { to: number; fair: number }[] => {
    const xs = decode(c)
    const base = xs.reduce((m, x, i) => (x === parked ? m | (1 << i) : m), 0)
    const out: { to: number; fair: number }[] = []
    if (idle) out.push({ to: c, fair: base })
    if (teams) {
      for (let i = 0; i < n; i++) {
        if (xs[i] !== 0 && xs[i] !== 2) continue
        if (keep) out.push({ to: c, fair: base | (1 << i) })
        for (let j = 0; j < n; j++) {
          if (xs[j] !== xs[i] + 1) continue
          const ys = [...xs]; ys[j] = xs[i]; ys[i] = xs[i] + 1
          out.push({ to: encode(ys), fair: base | (1 << i) })
        }
      }
      return out
    }
    if (token) {
      for (let i = 0; i < n; i++) {
        if (xs[i] === 0) {
          for (let j = 0; j < n; j++) {
            if (j === i) continue
            const ys = [...xs]; ys[j] = 0; ys[i] = 1 + (moves[xs[j]][0] % (L - 1))
            out.push({ to: encode(ys), fair: base | (1 << i) })
          }
        } else if (others) {
          for (const b of moves[xs[i]]) if (b !== 0) { const ys = [...xs]; ys[i] = b; out.push({ to: encode(ys), fair: base | (1 << i) }) }
        }
      }
      return out
    }
    for (let i = 0; i < n; i++) for (const b of moves[xs[i]]) { const ys = [...xs]; ys[i] = b; out.push({ to: encode(ys), fair: base | (1 << i) }) }
    if (pairs) {
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) {
        if (xs[i] !== 0 || xs[j] !== 0) continue
        const ys = [...xs]; ys[i] = moves[0][0]; ys[j] = moves[0][0]
        out.push({ to: encode(ys), fair: base | (1 << i) | (1 << j) })
      }
    }
    return out
  }
  const count = (xs: number[], v: number) => xs.filter((x) => x === v).length
  const atoms = (c: number) => {
    const xs = decode(c)
    const a0 = fixed.includes(0) ? xs[0] === 1 : count(xs, 1) >= 2
    const a1 = count(xs, 0) >= 1
    const a2 = fixed.includes(0) ? xs[0] === 0 && count(xs, 0) === 1 : count(xs, L - 1) === n
    return (a0 ? 1 : 0) | (a1 ? 2 : 0) | (a2 ? 4 : 0)
  }
  const initial: number[] = []
  for (let c = 0; c < size; c++) {
    const xs = decode(c)
    if (teams ? count(xs, 0) === 1 && count(xs, 2) === 1 : token ? count(xs, 0) === 1 && xs.every((x) => x <= 1) : xs.every((x) => inits.includes(x))) initial.push(c)
  }
  const full: System = {
    initial: () => initial, atoms, fairnessSets: n, states: size,
    successors(c, to, fair) { for (const e of edges(c)) { to.push(e.to); fair.push(e.fair) } },
  }
  const quotient: QuotientSystem = {
    initial: () => [...new Set(initial.map((c) => canon(c).rep))], atoms, fairnessSets: n, states: size, group,
    successors(c, to, perm, fair) {
      for (const e of edges(c)) { const k = canon(e.to); to.push(k.rep); perm.push(k.perm); fair.push(e.fair) }
    },
  }
  return { full, quotient }
}

describe('the quotient fair-cycle test on random symmetric systems', () => {
  it('agrees with the full product on random formulas (and on whether any fair run exists)', () => {
    const r = new Random(20261202)
    let holds = 0, violated = 0
    for (let k = 0; k < 400; k++) {
      const n = 3 + r.int(2)
      const fixed = r.next() < 0.5 ? [0] : []
      const { full, quotient } = symmetricSystem(r, n, fixed)
      for (const f of [FALSE, randomLtl(r, 3, 3), randomLtl(r, 3, 3)]) {
        const want = checkLtl(full, f).holds
        expect(`system ${k} formula ${show(f)}: ${checkLtlQuotient(quotient, f).holds}`).toBe(`system ${k} formula ${show(f)}: ${want}`)
        if (want) holds++
        else violated++
      }
    }
    expect(holds).toBeGreaterThan(100)
    expect(violated).toBeGreaterThan(100)
  })
})

/** Does the formula contain a temporal operator? */
function temporal(f: Formula): boolean {
  switch (f.k) {
    case 'true': case 'false': case 'atom': return false
    case 'always': case 'eventually': case 'next': case 'until': case 'unless': return true
    case 'not': return temporal(f.arg)
    default: return temporal(f.left) || temporal(f.right)
  }
}

function atomsOf(f: Formula, out: Term[] = []): Term[] {
  if (f.k === 'atom') { if (!out.includes(f.term)) out.push(f.term) }
  else if ('arg' in f) atomsOf(f.arg, out)
  else if ('left' in f) atomsOf(f.left, out), atomsOf(f.right, out)
  return out
}

/**
 * The unreduced verdict (the oracle), or null when the instance is too big or faults. `polls`
 * bounds the work deterministically: the explorer polls `shouldStop` after at most 64 states or
 * 4096 transitions, so the search gives up after about polls x 4096 transitions.
 */
function unreduced(inst: Instance, atoms: ReturnType<typeof compileTerm>[], ltl: Ltl, limit: number, polls: number): boolean | null {
  const rec = new FairGraphRecorder(inst)
  let left = polls
  const r = explore(inst, { limit, edges: rec, shouldStop: () => --left < 0 })
  if (!r.complete || r.outcome !== 'ok') return null
  try {
    return checkLtl(systemOf(inst, r, rec.graph(r.states), atoms), ltl).holds
  } catch (e) {
    if (e instanceof PropertyFault) return null
    throw e
  }
}

interface Tally { compared: number; holds: number; violated: number; recomputed: number }

/** Compares reduced and unreduced verdicts of `prop` on `protocol` at size n (first assignment). */
function compare(protocol: ProtocolModel, prop: PropertyModel, n: number, label: string, tally: Tally, limit = 6000, polls = 60): void {
  if (!temporal(prop.formula) || prop.formula.k === 'always' && !temporal(prop.formula.arg)) return
  if (n - prop.vars.length < 2) return
  let inst: Instance
  try {
    inst = compileInstance(protocol, n, protocol.consts.map((c) => c.value))
    if (inst.initialStates().length / inst.words > 64) return
  } catch (e) {
    if (e instanceof ModelSetupError) return
    throw e
  }
  const a = prop.vars.map((_, i) => i)
  const terms = atomsOf(prop.formula)
  const atoms = terms.map((t) => compileTerm(inst, t, a))
  const ltl = fromModel(prop.formula, (t) => terms.indexOf(t))
  const want = unreduced(inst, atoms, ltl, limit, polls)
  if (want === null) return
  const recompute = tally.compared % 5 === 4
  const got = reducedTemporal(inst, a, atoms, ltl, { limit, recomputeEdges: recompute })
  if (got.kind === 'fallback') return
  expect(got.kind, label).toBe('decided')
  if (got.kind !== 'decided') return
  expect(`${label}: ${got.holds ? 'holds' : 'violated'}`).toBe(`${label}: ${want ? 'holds' : 'violated'}`)
  tally.compared++
  if (recompute) tally.recomputed++
  if (want) tally.holds++
  else tally.violated++
}

// Properties whose verdict depends on every unnamed process being treated fairly: p counts the
// distinct peers it has heard from, so `p.heard = N - 1` needs every other process to step.
const COUNTING = `protocol tally {
  timing synchronous(delay: 1, idle: 2)
  faults FAULTS
  message ping
  state seen[peer]: bool = false
  state heard: 0..3 = 0
  on ping from q { if not seen[q] { seen[q] := true
      heard := min(heard + 1, 3) } }
  step { if heard < 3 { broadcast ping } }
}`

const COUNTING_PROPERTIES = [
  'property all = forall p: eventually p.heard = NN',
  'property first = forall p: eventually p.heard >= 1',
  'property stays = forall p: eventually always p.heard = NN',
  'property pairwise = forall p, q: correct(q) implies eventually p.seen[q]',
  'property late = forall p, q: always (p.seen[q] implies eventually p.heard = NN)',
  'property never = forall p: always eventually p.heard < NN',
]

describe('reduced temporal verdicts against unreduced search', () => {
  it('agrees on the counting protocol at N = 3 and 4, with and without crashes', () => {
    const tally: Tally = { compared: 0, holds: 0, violated: 0, recomputed: 0 }
    for (const faults of ['none', 'crash']) {
      for (const n of [3, 4]) {
        const props = COUNTING_PROPERTIES.map((p) => p.replaceAll('NN', String(n - 1))).join('\n')
        const names = COUNTING_PROPERTIES.map((p) => p.split(' ')[1]).join(', ')
        const nb = analyzeNotebook('```protocol\n' + COUNTING.replace('FAULTS', faults) + '\n```\n\n```property\n' + props +
          '\n```\n\n```check\ncheck tally: ' + names + ' at N = ' + n + '\n```\n')
        expect(nb.diagnostics.filter((d) => d.severity === 'error').map((d) => d.message)).toEqual([])
        for (const prop of nb.checks[0].properties) compare(nb.protocols[0], prop, n, `tally ${faults} ${prop.name} N=${n}`, tally, 200_000, Infinity)
      }
    }
    console.log(`counting protocol: ${JSON.stringify(tally)}`)
    expect(tally.holds).toBeGreaterThanOrEqual(4)
    expect(tally.violated).toBeGreaterThanOrEqual(4)
  })

  it('agrees on generated protocols at N = 3 and 4', () => {
    const tally: Tally = { compared: 0, holds: 0, violated: 0, recomputed: 0 }
    for (let seed = 1; seed <= 50; seed++) {
      for (const text of [generateInClass(seed), generateNotebook(seed)]) {
        const base = analyzeNotebook(text)
        const protocol = base.protocols[0]
        if (!protocol) continue
        const nb = analyzeNotebook(text + '\n' + generateProperties(protocol, seed))
        if (nb.diagnostics.some((d) => d.severity === 'error')) continue
        const props = new Map(nb.checks.flatMap((c) => c.properties).map((p) => [p.name, p]))
        for (const prop of props.values()) {
          // Reduction needs the protocol to be symmetric: the runner reduces only where the class
          // check grants the cutoff, so the test does the same.
          if (!decideCutoff(nb.protocols[0], prop).applies) continue
          const t0 = performance.now()
          for (const n of [3, 4]) compare(nb.protocols[0], prop, n, `seed ${seed} ${protocol.name} ${prop.name} (${prop.source}) N=${n}`, tally)
          if (process.env.SYM_DEBUG) console.log(seed, protocol.name, prop.name, ((performance.now() - t0) / 1000).toFixed(2), JSON.stringify(tally))
        }
      }
    }
    console.log(`generated protocols: ${JSON.stringify(tally)}`)
    expect(tally.compared).toBeGreaterThanOrEqual(40)
    expect(tally.holds).toBeGreaterThan(5)
    expect(tally.violated).toBeGreaterThan(5)
    expect(tally.recomputed).toBeGreaterThan(0)
  })
})

const BELLS = `\`\`\`protocol
protocol bells {
  timing synchronous(delay: 1, idle: 1)
  faults crash
  message ding
  state rung: bool = false
  state heard[peer]: 0..1 = 0
  on ding from q { heard[q] := 1 }
  step {
    rung := one of {true, false}
    if rung { broadcast ding }
  }
}
\`\`\`

\`\`\`property
property kept = forall p, q: always (p.heard[q] = 1 implies always p.heard[q] = 1)
property lively = forall p: correct(p) implies always eventually alive(p)
property told = forall p, q: correct(p) and correct(q) implies eventually p.heard[q] = 1
\`\`\`

\`\`\`check
check bells: kept, lively, told at N = 4
\`\`\`
`

describe('the runner on temporal rows two or more above the cutoff size', () => {
  const nb = analyzeNotebook(BELLS)
  const rows = planRows(nb).map((plan) => runRow(nb, plan))
  const inst = compileInstance(nb.protocols[0], 4, [])
  const full = explore(inst)

  it('decides holding rows on the quotient, with the unreduced verdict and state count', () => {
    for (const name of ['kept', 'lively']) {
      const row = rows.find((r) => r.property === name)!
      const prop = nb.checks[0].properties.find((p) => p.name === name)!
      const terms = atomsOf(prop.formula)
      const a = prop.vars.map((_, i) => i)
      const want = unreduced(inst, terms.map((t) => compileTerm(inst, t, a)), fromModel(prop.formula, (t) => terms.indexOf(t)), Infinity, Infinity)
      expect(want).toBe(true)
      expect(row.verdict).toBe('holds')
      expect(row.search).toBe('ltl')
      expect(row.states).toBe(full.states)
      expect(row.reducedStates).toBeLessThan(full.states)
      expect(row.note).toMatch(/annotated quotient/)
    }
  })

  it('explores a violation again without reduction: the lasso shown is a real fair run that breaks the property', () => {
    const row = rows.find((r) => r.property === 'told')!
    const prop = nb.checks[0].properties.find((p) => p.name === 'told')!
    expect(row.verdict).toBe('violated')
    expect(row.note).toMatch(/symmetry-reduced search found a fair run/)
    expect(row.reducedStates).toBeUndefined()
    expect(row.states).toBe(full.states)
    const cx = row.counterexample!
    expect(cx.kind).toBe('lasso')
    // Oracle: the direct LTL evaluator (tests/logic/lasso.ts) on the atoms the row reports.
    const terms = atomsOf(prop.formula)
    const ltl = fromModel(prop.formula, (t) => terms.indexOf(t))
    const masks = cx.ticks.map((_, i) => cx.atoms!.reduce((m, band, k) => m | (band.values[i] ? 1 << k : 0), 0))
    expect(cx.atoms!.map((b) => b.values.length)).toEqual(terms.map(() => cx.ticks.length + 1))
    expect(holdsOn(ltl, { prefix: masks.slice(0, cx.loopStart), loop: masks.slice(cx.loopStart) })).toBe(false)
    // The loop is fair to processes: every process alive through it steps in it.
    const loop = cx.ticks.slice(cx.loopStart!)
    const crashed = new Set(cx.ticks.flatMap((t) => t.crashed))
    for (let p = 1; p <= 4; p++) if (!crashed.has(p)) expect(loop.some((t) => t.stepped.includes(p)), `process ${p} steps in the loop`).toBe(true)
  })
})

describe('canonicalizer', () => {
  it('returns the index of the permutation that maps each state to its representative', () => {
    const nb = analyzeNotebook(BELLS)
    const inst = compileInstance(nb.protocols[0], 4, [])
    const r = explore(inst, { limit: 3000 })
    for (const fixed of [[], [0], [0, 1]]) {
      const canon = canonicalizer(inst, fixed)
      const perms = freePermutations(4, fixed)
      const rep = new Uint32Array(inst.words), img = new Uint32Array(inst.words)
      let moved = 0
      for (let s = 0; s < r.states; s++) {
        const k = canon(r.store.data, s * inst.words, rep)
        permuteState(inst, r.store.data, s * inst.words, perms[k], img)
        expect([...img]).toEqual([...rep])
        if (k !== 0) moved++
      }
      if (fixed.length < 2) expect(moved).toBeGreaterThan(0)
    }
  })
})
