// The fair graph the temporal product reads (kernels/explore/fairgraph.ts). Oracle: the reference
// interpreter's state graph (tests/reference/interpreter.ts), whose edges carry the union of the
// fairness bits of the ticks between two states, computed from the contract with none of the
// kernel's code. The graph recorded during exploration and the rows recomputed on demand must be
// the same edges in the same order.
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { ChunkedInt32 } from '../../kernels/base/chunked'
import { FairGraphRecorder, systemOf } from '../../kernels/explore/fairgraph'
import { explore } from '../../kernels/explore/reach'
import { canonicalState } from '../../kernels/model/decode'
import { compileInstance, type Instance } from '../../kernels/model/instance'
import { PropertyFault } from '../../kernels/model/errors'
import { compileTerm, type StateTerm, termMayFault } from '../../kernels/model/observe'
import type { Term } from '../../kernels/language/model'
import { fromModel } from '../../kernels/logic/ltl'
import { planRows, runRow } from '../../kernels/run'
import { generateNotebook, generateProperties } from '../reference/generate'
import { referenceGraph } from '../reference/interpreter'

/** Kernel marks (process bits, then channels j->i in j-major order, then stable) as reference bits. */
function referenceBits(inst: Instance, m: number): number {
  const n = inst.n
  let out = 0
  for (let i = 0; i < n; i++) if ((m >> i) & 1) out |= 1 << i
  let k = 0
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      if (i === j) continue
      if ((m >> (n + k)) & 1) out |= 1 << (n + j * n + i)
      k++
    }
  }
  const eventuallySynchronous = inst.protocol.timing.kind === 'eventually synchronous'
  if (!eventuallySynchronous || (m >> (n + k)) & 1) out |= 1 << (n + n * n)
  return out
}

/*
 * Fairness marks are compared for equality. They once differed on one kind of edge, the tick in
 * which a receiver i crashes while a channel j->i is not empty: the reference (a process that is
 * down at the end of the tick meets its own condition and those of its incoming channels) set the
 * channel bit and the kernel only the process bit. Both judged emptiness at the source. Either
 * marking gives the same verdicts, because a crash edge lies on no cycle and Buchi acceptance
 * counts only edges taken infinitely often; the kernel now marks as the reference does, and the
 * first test below counts such edges among the generated ones (so the equality covers them).
 */

/** Does a process alive in `src` crash on the way to `dst` while a channel into it holds messages? */
function receiverCrashesWithMail(src: string, dst: string): boolean {
  type Canonical = { procs: { alive: number }[]; channels: Record<string, string[]> }
  const a = JSON.parse(src) as Canonical, b = JSON.parse(dst) as Canonical
  return a.procs.some((p, i) => p.alive === 1 && b.procs[i].alive === 0 &&
    Object.entries(a.channels).some(([ch, msgs]) => ch.endsWith(`->${i + 1}`) && msgs.length > 0))
}

/** Rows of a system as [target, marks] lists. */
function rowsOf(sys: ReturnType<typeof systemOf>, states: number): number[][][] {
  const rows: number[][][] = []
  for (let s = 0; s < states; s++) {
    const to: number[] = [], fair: number[] = []
    sys.successors(s, to, fair)
    rows.push(to.map((t, k) => [t, fair[k]]))
  }
  return rows
}

describe('fair graph', () => {
  it('has the reference graph\'s edges and fairness bits on generated protocols, recorded or recomputed alike', () => {
    let compared = 0, edges = 0, marked = 0, crashEdges = 0
    for (let seed = 1; seed <= 60; seed++) {
      const protocol = analyzeNotebook(generateNotebook(seed)).protocols[0]
      for (const n of [1, 2]) {
        const inst = compileInstance(protocol, n, protocol.consts.map((c) => c.value))
        const rec = new FairGraphRecorder(inst)
        const r = explore(inst, { edges: rec, limit: 3000 })
        if (!r.complete) continue
        const ref = referenceGraph(protocol, n, undefined, 3000)
        if (!ref.complete || ref.modelError) continue
        const recorded = rowsOf(systemOf(inst, r, rec.graph(r.states), []), r.states)
        expect(rowsOf(systemOf(inst, r, null, []), r.states)).toEqual(recorded)
        const refIndex = new Map(ref.keys.map((k, i) => [k, i]))
        const key = (s: number) => canonicalState(inst, r.store.data, s * inst.words)
        expect(r.states).toBe(ref.keys.length)
        for (let s = 0; s < r.states; s++) {
          const union = new Map<number, number>()
          for (const [t, m] of recorded[s]) {
            if (receiverCrashesWithMail(key(s), key(t))) crashEdges++
            const rt = refIndex.get(key(t))!
            union.set(rt, (union.get(rt) ?? 0) | referenceBits(inst, m))
            edges++
          }
          const want = ref.edges[refIndex.get(key(s))!]
          const sorted = (m: Map<number, number>) => [...m.entries()].sort((a, b) => a[0] - b[0])
          const what = `seed ${seed} N=${n} ${protocol.timing.kind} ${key(s)}`
          expect(sorted(union).map((e) => e[0]), what).toEqual(sorted(want).map((e) => e[0]))
          // The same fairness bits on every edge (both ways: the kernel neither invents nor drops one).
          sorted(union).forEach(([t, m], k) => { expect(m, what).toBe(sorted(want)[k][1]); marked++ })
        }
        compared++
      }
    }
    expect(compared).toBeGreaterThan(60)
    expect(edges).toBeGreaterThan(1000)
    expect(marked).toBeGreaterThan(100)
    // The edges on which the two encodings once differed are among those compared.
    expect(crashEdges).toBeGreaterThan(100)
  })

  it('gives the runner the same rows with the graph recorded and with rows recomputed on demand', () => {
    let temporal = 0
    for (let seed = 1; seed <= 40; seed++) {
      const text = generateNotebook(seed)
      const nb = analyzeNotebook(text + '\n' + generateProperties(analyzeNotebook(text).protocols[0], seed))
      for (const plan of planRows(nb)) {
        const a = { ...runRow(nb, plan), seconds: 0 }
        const b = { ...runRow(nb, plan, { recomputeEdges: true }), seconds: 0 }
        expect(b).toEqual(a)
        if (a.search === 'ltl' && a.verdict !== 'error') temporal++
      }
    }
    expect(temporal).toBeGreaterThan(20)
  })
})

describe('ChunkedInt32', () => {
  it('keeps every value across chunk boundaries', () => {
    const c = new ChunkedInt32()
    const n = (1 << 20) * 2 + 12345
    for (let k = 0; k < n; k++) c.push(Math.imul(k, 0x9e3779b1))
    expect(c.length).toBe(n)
    for (const k of [0, 4095, 4096, 16383, 16384, (1 << 20) - 1, 1 << 20, (1 << 21) + 1, n - 1]) expect(c.get(k)).toBe(Math.imul(k, 0x9e3779b1))
    expect(c.bytes).toBe(3 * (1 << 20) * 4)
  })
})

describe('system atoms', () => {
  // The 92 states of a generated protocol, and atoms that hash their words to a bit.
  const text = generateNotebook(1)
  const nb = analyzeNotebook(text)
  const protocol = nb.protocols[0]
  const inst = compileInstance(protocol, 2, protocol.consts.map((c) => c.value))
  const rec = new FairGraphRecorder(inst)
  const r = explore(inst, { edges: rec, limit: 3000 })
  const graph = rec.graph(r.states)
  const W = inst.words
  const bitAtoms = (count: number, calls: number[]): StateTerm[] => Array.from({ length: count }, (_, k) => (w: Uint32Array, o: number) => {
    calls[o / W] = (calls[o / W] ?? 0) + 1
    return (Math.imul(w[o + (k % W)] + k, 0x9e3779b1) >>> 29) & 1
  })

  it('reads the atoms of every state as evaluating them there gives, computed on first read or all at once, with 3, 12 and 40 atoms', () => {
    expect(r.states).toBeGreaterThan(50)
    for (const count of [3, 12, 40]) {
      const atoms = bitAtoms(count, [])
      for (const mayFault of [false, true]) {
        const sys = systemOf(inst, r, graph, atoms, mayFault)
        expect(sys.atomWords).toBe(Math.ceil(count / 32))
        // Backwards, so that rows are filled out of order when computed lazily; then again, from the table.
        for (const pass of [0, 1]) {
          for (let s = r.states - 1; s >= 0; s--) {
            for (let w = 0; w < sys.atomWords!; w++) {
              let want = 0
              for (let k = 32 * w; k < Math.min(count, 32 * w + 32); k++) if (atoms[k](r.store.data, s * W)) want |= 1 << (k & 31)
              expect(sys.atoms(s, w), `${count} atoms, state ${s}, word ${w}, pass ${pass}`).toBe(want)
            }
          }
        }
      }
    }
  })

  it('evaluates atoms that cannot fault only on the states read, each once, and every state up front otherwise', () => {
    const lazy: number[] = [], eager: number[] = []
    const a = systemOf(inst, r, graph, bitAtoms(3, lazy), false)
    const b = systemOf(inst, r, graph, bitAtoms(3, eager), true)
    expect(lazy.length).toBe(0)
    expect(eager.filter((c) => c === 3).length).toBe(r.states)
    for (const s of [5, 7, 5, 5]) { a.atoms(s); b.atoms(s) }
    expect(lazy.filter((c) => c > 0)).toEqual([3, 3])
    expect(eager.every((c) => c === 3)).toBe(true)
  })

  it('throws the fault of an atom that divides by zero on any reachable state before the search, when it may fault', () => {
    const last = r.states - 1
    const faulty: StateTerm = (w, o) => { if (o === last * W) throw new PropertyFault({ line: 1, column: 1, from: 0, to: 0 } as never, 'division'); return 0 }
    expect(() => systemOf(inst, r, graph, [faulty], true)).toThrow(PropertyFault)
    expect(() => systemOf(inst, r, null, [faulty], true)).toThrow(PropertyFault)
  })

  it('tells which terms may fault: division or remainder by anything but a nonzero literal or constant', () => {
    const ferry = analyzeNotebook('# ferry\n\n```protocol\nprotocol ferry {\n  const two = 2\n  const nought = 0\n  timing synchronous(delay: 1, idle: 1)\n' +
      '  state b: 0..2 = 0\n  step { b := min(b + 1, 2) }\n}\n```\n\n```property\n' +
      'property a = forall p: always (p.b / 2 >= 0)\nproperty b = forall p: always (p.b % two >= 0)\nproperty c = forall p: always (6 / (p.b - 1) > 0)\n' +
      'property d = forall p: always (p.b % nought >= 0)\nproperty e = forall p: eventually always (min(p.b, 6 % p.b) >= 0)\nproperty f = forall p: always (p.b + 1 > 0 and alive(p))\n' +
      '```\n\n```check\ncheck ferry: a, b, c, d, e, f at N = 1\n```\n')
    expect(ferry.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
    const fi = compileInstance(ferry.protocols[0], 1, ferry.protocols[0].consts.map((c) => c.value))
    const verdicts = ferry.checks[0].properties.map((prop) => {
      const terms: Term[] = []
      fromModel(prop.formula, (t) => terms.push(t) - 1)
      for (const t of terms) compileTerm(fi, t, [0])
      return [prop.name, terms.some((t) => termMayFault(fi, t))]
    })
    expect(verdicts).toEqual([['a', false], ['b', false], ['c', true], ['d', true], ['e', true], ['f', false]])
  })
})
