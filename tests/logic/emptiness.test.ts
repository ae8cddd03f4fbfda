import Graph from 'graphology'
import { stronglyConnectedComponents } from 'graphology-components'
import { describe, expect, it } from 'vitest'
import { type EmptinessResult, type EmptinessWork, findAcceptingLasso, type MarkedGraph } from '../../kernels/logic/emptiness'
import { Random } from './lasso'

interface Edge { from: number; to: number; mark: number }

function graphOf(initial: number[], edges: Edge[]): MarkedGraph {
  const out = new Map<number, Edge[]>()
  for (const e of edges) out.set(e.from, [...(out.get(e.from) ?? []), e])
  return {
    initial: () => initial,
    successors: (v, to, marks) => { for (const e of out.get(v) ?? []) { to.push(e.to); marks.push(e.mark) } },
  }
}

/** Throws unless the lasso is a real path from an initial node whose cycle edges carry every mark of `all`. */
function expectRealLasso(initial: number[], edges: Edge[], all: number, r: EmptinessResult): void {
  if (r.kind !== 'lasso') throw new Error(`expected a lasso, got ${r.kind}`)
  const has = (a: number, b: number, m?: number) => edges.some((e) => e.from === a && e.to === b && (m === undefined || e.mark === m))
  const path = [...r.prefix, r.cycle[0]]
  expect(initial).toContain(path[0])
  for (let i = 0; i + 1 < path.length; i++) expect(has(path[i], path[i + 1]), `edge ${path[i]}->${path[i + 1]}`).toBe(true)
  expect(r.cycle.length).toBeGreaterThan(0)
  expect(r.cycleMarks.length).toBe(r.cycle.length)
  let covered = 0
  r.cycle.forEach((v, i) => {
    const w = r.cycle[(i + 1) % r.cycle.length]
    expect(has(v, w, r.cycleMarks[i]), `cycle edge ${v}->${w} marked ${r.cycleMarks[i]}`).toBe(true)
    covered |= r.cycleMarks[i]
  })
  expect(covered & all).toBe(all)
}

/**
 * Brute-force oracle: some component reachable from an initial node (components by graphology)
 * has an inner edge, and its inner edges together carry every mark.
 */
function oracleNonEmpty(n: number, initial: number[], edges: Edge[], all: number): boolean {
  const reach = new Set(initial)
  const todo = [...initial]
  while (todo.length) { const v = todo.pop()!; for (const e of edges) if (e.from === v && !reach.has(e.to)) { reach.add(e.to); todo.push(e.to) } }
  const g = new Graph({ type: 'directed', multi: true, allowSelfLoops: true })
  for (let v = 0; v < n; v++) g.addNode(String(v))
  for (const e of edges) g.addEdge(String(e.from), String(e.to))
  return stronglyConnectedComponents(g).some((c) => {
    const inC = new Set(c.map(Number))
    if (!reach.has(Number(c[0]))) return false
    const inner = edges.filter((e) => inC.has(e.from) && inC.has(e.to))
    return inner.length > 0 && (inner.reduce((m, e) => m | e.mark, 0) & all) === all
  })
}

describe('findAcceptingLasso', () => {
  it('agrees with the brute-force component oracle on 2,000 generated graphs, and its lassos are real', () => {
    const r = new Random(21)
    let lassos = 0
    for (let t = 0; t < 2000; t++) {
      const n = 1 + r.int(12)
      const k = r.int(4)
      const all = (1 << k) - 1
      const edges: Edge[] = Array.from({ length: r.int(2 * n + 1) }, () => ({ from: r.int(n), to: r.int(n), mark: r.int(1 << k) }))
      const initial = [...new Set([r.int(n), r.int(n)])]
      const res = findAcceptingLasso(graphOf(initial, edges), all)
      const expected = oracleNonEmpty(n, initial, edges, all)
      expect(res.kind, JSON.stringify({ initial, edges, all })).toBe(expected ? 'lasso' : 'empty')
      if (expected) { lassos++; expectRealLasso(initial, edges, all, res) }
    }
    // Both outcomes occur often.
    expect(lassos).toBeGreaterThan(400)
    expect(lassos).toBeLessThan(1600)
  })

  it('with no marks asked, finds any reachable cycle, a self-loop included', () => {
    const edges = [{ from: 0, to: 1, mark: 0 }, { from: 1, to: 1, mark: 0 }]
    const res = findAcceptingLasso(graphOf([0], edges), 0)
    expectRealLasso([0], edges, 0, res)
    expect(res.kind === 'lasso' && res.cycle).toEqual([1])
  })

  it('reports empty for an acyclic graph', () => {
    const edges = [{ from: 0, to: 1, mark: 1 }, { from: 1, to: 2, mark: 1 }]
    expect(findAcceptingLasso(graphOf([0], edges), 1)).toEqual({ kind: 'empty', nodes: 3, edges: 2 })
  })

  it('needs every mark on the cycle: a cycle missing one is not accepting', () => {
    const edges = [{ from: 0, to: 1, mark: 1 }, { from: 1, to: 0, mark: 1 }, { from: 1, to: 2, mark: 2 }]
    expect(findAcceptingLasso(graphOf([0], edges), 3).kind).toBe('empty')
  })

  it('builds a cycle through as many edges as it takes to collect every mark', () => {
    const edges = [{ from: 0, to: 1, mark: 1 }, { from: 1, to: 2, mark: 2 }, { from: 2, to: 0, mark: 4 }, { from: 1, to: 0, mark: 0 }]
    const res = findAcceptingLasso(graphOf([0], edges), 7)
    expectRealLasso([0], edges, 7, res)
    expect(res.kind === 'lasso' && res.cycle.length).toBe(3)
  })

  it('takes the shortest prefix to the accepting component, not the depth-first path', () => {
    // Depth-first search reaches 5 through 1..4 first; breadth-first finds the edge 0 -> 5.
    const edges = [1, 2, 3, 4].map((v) => ({ from: v, to: v + 1, mark: 0 }))
    edges.unshift({ from: 0, to: 1, mark: 0 })
    edges.push({ from: 0, to: 5, mark: 0 }, { from: 5, to: 5, mark: 1 })
    const res = findAcceptingLasso(graphOf([0], edges), 1)
    expectRealLasso([0], edges, 1, res)
    expect(res.kind === 'lasso' && [res.prefix, res.cycle]).toEqual([[0], [5]])
  })

  it('has an empty prefix when the cycle starts at an initial node', () => {
    const edges = [{ from: 0, to: 0, mark: 1 }]
    const res = findAcceptingLasso(graphOf([0], edges), 1)
    expect(res.kind === 'lasso' && [res.prefix, res.cycle]).toEqual([[], [0]])
  })

  it('walks a million-node chain to its accepting loop without recursion', () => {
    const n = 1_000_000
    const g: MarkedGraph = {
      initial: () => [0],
      successors: (v, to, marks) => { to.push(v + 1 < n ? v + 1 : v); marks.push(v + 1 < n ? 0 : 1) },
    }
    const res = findAcceptingLasso(g, 1)
    expect(res.kind).toBe('lasso')
    if (res.kind !== 'lasso') return
    expect(res.prefix.length).toBe(n - 1)
    expect(res.cycle).toEqual([n - 1])
    expect(res.nodes).toBe(n)
  })

  // Work, not time: each pending edge is read once and each frame popped once, so the main loop
  // runs at most edges + nodes times (a search that re-read its descendants' edges on returning
  // to a parent would run about depth x edges times on the chain below).
  it('reads each edge once: loop iterations are at most edges + nodes, on a deep chain and on random graphs', () => {
    const n = 20_000
    const chain: MarkedGraph = {
      initial: () => [0],
      // v -> v+1 and v -> 0: one component, no marks, so the search explores all of it.
      successors: (v, to, marks) => { if (v + 1 < n) { to.push(v + 1); marks.push(0) } to.push(0); marks.push(0) },
    }
    const work: EmptinessWork = { iterations: 0 }
    const res = findAcceptingLasso(chain, 1, { work })
    expect(res).toEqual({ kind: 'empty', nodes: n, edges: 2 * n - 1 })
    expect(work.iterations).toBeLessThanOrEqual(res.edges + res.nodes)
    const r = new Random(5)
    for (let t = 0; t < 300; t++) {
      const size = 1 + r.int(40)
      const edges: Edge[] = Array.from({ length: r.int(4 * size + 1) }, () => ({ from: r.int(size), to: r.int(size), mark: r.int(4) }))
      const w: EmptinessWork = { iterations: 0 }
      const out = findAcceptingLasso(graphOf([0], edges), 3, { work: w })
      expect(w.iterations).toBeLessThanOrEqual(out.edges + out.nodes)
    }
  })

  it('stops when shouldStop says so, reporting what it explored', () => {
    const g: MarkedGraph = { initial: () => [0], successors: (v, to, marks) => { to.push(v + 1); marks.push(0) } }
    let polls = 0
    const res = findAcceptingLasso(g, 1, { shouldStop: () => ++polls > 2 })
    expect(res.kind).toBe('stopped')
    expect(res.nodes).toBeGreaterThan(2048)
  })
})
