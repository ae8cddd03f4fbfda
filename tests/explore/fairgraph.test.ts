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
