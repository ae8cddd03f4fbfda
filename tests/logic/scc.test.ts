import Graph from 'graphology'
import { stronglyConnectedComponents } from 'graphology-components'
import { describe, expect, it } from 'vitest'
import { csrFromEdges, tarjanScc } from '../../kernels/logic/scc'
import { Random } from './lasso'

/** A partition as a canonical string: each part's sorted members, parts sorted. */
function canonical(parts: number[][]): string {
  return JSON.stringify(parts.map((c) => [...c].sort((a, b) => a - b)).sort((a, b) => a[0] - b[0]))
}

function partsOf(n: number, component: Int32Array, count: number): number[][] {
  const parts: number[][] = Array.from({ length: count }, () => [])
  for (let v = 0; v < n; v++) parts[component[v]].push(v)
  return parts
}

describe('tarjanScc', () => {
  // Oracle: graphology-components' stronglyConnectedComponents, an independent implementation.
  it('finds the same components as graphology on 500 generated graphs', () => {
    const r = new Random(5)
    for (let t = 0; t < 500; t++) {
      const n = 1 + r.int(40)
      const m = r.int(3 * n)
      const edges: [number, number][] = Array.from({ length: m }, () => [r.int(n), r.int(n)])
      const g = new Graph({ type: 'directed', multi: true, allowSelfLoops: true })
      for (let v = 0; v < n; v++) g.addNode(String(v))
      for (const [a, b] of edges) g.addEdge(String(a), String(b))
      const expected = stronglyConnectedComponents(g).map((c) => c.map(Number))
      const { component, count } = tarjanScc(csrFromEdges(n, edges))
      expect(canonical(partsOf(n, component, count))).toBe(canonical(expected))
    }
  })

  it('numbers components in reverse topological order', () => {
    const r = new Random(6)
    for (let t = 0; t < 200; t++) {
      const n = 1 + r.int(30)
      const edges: [number, number][] = Array.from({ length: r.int(3 * n) }, () => [r.int(n), r.int(n)])
      const { component } = tarjanScc(csrFromEdges(n, edges))
      for (const [a, b] of edges) expect(component[a]).toBeGreaterThanOrEqual(component[b])
    }
  })

  it('handles a cycle of a million nodes without recursion', () => {
    const n = 1_000_000
    const start = new Int32Array(n + 1).map((_, i) => i)
    const adj = new Int32Array(n).map((_, i) => (i + 1) % n)
    expect(tarjanScc({ start, adj }).count).toBe(1)
  })

  it('puts each node of a million-node chain in its own component', () => {
    const n = 1_000_000
    const start = new Int32Array(n + 1).map((_, i) => Math.min(i, n - 1))
    const adj = new Int32Array(n - 1).map((_, i) => i + 1)
    const { count, component } = tarjanScc({ start, adj })
    expect(count).toBe(n)
    expect(component[0]).toBe(n - 1)
  })
})
