// Strongly connected components of an explicit graph, by Tarjan's algorithm (R. E. Tarjan,
// "Depth-first search and linear graph algorithms", SIAM J. Computing 1(2), 1972), run with an
// explicit stack: graphs here have millions of nodes, far beyond the JavaScript call stack.

/** A directed graph in compressed sparse row form: the successors of v are `adj[start[v] .. start[v+1])`. */
export interface CsrGraph {
  /** Length n+1 for n nodes; `start[n]` is the number of edges. */
  start: Int32Array
  adj: Int32Array
}

/** The components: `component[v]` numbers v's component, 0..count-1. */
export interface Components {
  count: number
  /**
   * Component of each node. Components are numbered in the order Tarjan's algorithm completes
   * them, which is a reverse topological order: every edge between two components goes from a
   * higher number to a lower one (or stays inside one).
   */
  component: Int32Array
}

/** Builds a CSR graph from an edge list (pairs `[from, to]`) on nodes 0..n-1. */
export function csrFromEdges(n: number, edges: ArrayLike<readonly [number, number]>): CsrGraph {
  const start = new Int32Array(n + 1)
  for (let i = 0; i < edges.length; i++) start[edges[i][0] + 1]++
  for (let v = 0; v < n; v++) start[v + 1] += start[v]
  const fill = start.slice(0, n)
  const adj = new Int32Array(edges.length)
  for (let i = 0; i < edges.length; i++) adj[fill[edges[i][0]]++] = edges[i][1]
  return { start, adj }
}

/** Tarjan's strongly connected components, iterative, O(nodes + edges) time, typed arrays only. */
export function tarjanScc(g: CsrGraph): Components {
  const { start, adj } = g
  const n = start.length - 1
  const index = new Int32Array(n) // 0: unvisited; else 1 + DFS discovery number
  const low = new Int32Array(n)
  const component = new Int32Array(n).fill(-1)
  const stack = new Int32Array(n) // Tarjan's stack of nodes whose component is open
  const callNode = new Int32Array(n) // the explicit DFS call stack: node and next edge to try
  const callEdge = new Int32Array(n)
  let sp = 0, csp = 0, counter = 0, count = 0

  for (let root = 0; root < n; root++) {
    if (index[root] !== 0) continue
    index[root] = low[root] = ++counter
    stack[sp++] = root
    callNode[csp] = root
    callEdge[csp++] = start[root]
    while (csp > 0) {
      const v = callNode[csp - 1]
      const e = callEdge[csp - 1]
      if (e < start[v + 1]) {
        callEdge[csp - 1] = e + 1
        const w = adj[e]
        if (index[w] === 0) {
          index[w] = low[w] = ++counter
          stack[sp++] = w
          callNode[csp] = w
          callEdge[csp++] = start[w]
        } else if (component[w] < 0 && index[w] < low[v]) {
          // w is still on Tarjan's stack (its component is open): a back or cross edge inside it.
          low[v] = index[w]
        }
        continue
      }
      csp--
      if (low[v] === index[v]) {
        let w: number
        do {
          w = stack[--sp]
          component[w] = count
        } while (w !== v)
        count++
      }
      if (csp > 0) {
        const u = callNode[csp - 1]
        if (low[v] < low[u]) low[u] = low[v]
      }
    }
  }
  return { count, component }
}
