// On-the-fly emptiness of a generalized Büchi graph with acceptance marks on edges, by the
// SCC-based algorithm of J.-M. Couvreur, "On-the-fly verification of linear temporal logic",
// FM'99, LNCS 1708: one depth-first search that keeps a stack of the roots of the partial
// strongly connected components, each with the union of the marks seen inside it; when a back
// edge merges components and the union covers every mark, the graph has an accepting run.
//
// Everything is packed: per-node tables and the DFS stack are Int32 buffers indexed by the node
// ids the graph assigns, and each open node's edges are read one at a time through a cursor
// (`EdgeCursor`) whose state is a few integers in its frame. Nothing recurses.
//
// A found component is turned into a short lasso afterwards: a breadth-first search from the
// initial nodes to the nearest node of the component, then, inside the component, repeated
// breadth-first searches to the nearest edge carrying a still-missing mark, and back.
import { Int32Buffer } from '../base/buffer'

/** Where a graph appends edges: plain arrays in tests, the search's packed buffers in the kernel. */
export interface EdgeSink {
  push(v: number): unknown
}

/** A graph explored on the fly, with acceptance marks (bits 0..30) on its edges. */
export interface MarkedGraph {
  /** Node ids of the initial nodes. Node ids are assigned by the graph (non-negative integers). */
  initial(): number[]
  /**
   * Appends the successors of `node` and the acceptance marks of each edge to `to` / `marks`.
   * The search hands its own packed buffers, so nothing is copied from a JavaScript array.
   */
  successors(node: number, to: EdgeSink, marks: EdgeSink): void
  /**
   * The same edges, in the same order, read one at a time (the depth-first search uses it when
   * present, the lasso's breadth-first searches use `successors`): a graph whose edges are
   * already packed somewhere (a recorded fair graph) hands them out from there, and the search
   * keeps no list of pending edges.
   */
  cursor?: EdgeCursor
}

/** Integers of cursor state the search keeps per open node for `EdgeCursor`. */
export const CURSOR_WORDS = 7

/**
 * A lazy enumeration of every node's edges. The search keeps `CURSOR_WORDS` integers per open
 * node, at `cur[at..]`, which only the cursor reads and writes; `open` and `close` come in
 * stack order (a node opened after another is closed before it).
 */
export interface EdgeCursor {
  /** Starts the edges of `node`, writing its cursor state at cur[at..]. */
  open(node: number, cur: Int32Array, at: number): void
  /** The next edge of `node`: its target (its marks are then in `mark`), or -1 when none is left. */
  next(node: number, cur: Int32Array, at: number): number
  /** The marks of the edge `next` returned last. */
  mark: number
  /** Ends `node`'s edges, once `next` has returned -1. */
  close(node: number, cur: Int32Array, at: number): void
  /** Bytes the cursor holds besides the search's tables. */
  readonly bytes: number
}

/**
 * The cursor of a graph that only has `successors`: each open node's edges are appended to one
 * packed stack (cur[at] the next edge, cur[at + 1] the end, cur[at + 2] where they start) and cut
 * off when it closes, so a parent never re-reads its descendants' edges.
 */
class StackedEdges implements EdgeCursor {
  private readonly to = new Int32Buffer()
  private readonly marks = new Int32Buffer()
  mark = 0
  constructor(private readonly g: MarkedGraph) {}

  get bytes(): number {
    return this.to.data.byteLength + this.marks.data.byteLength
  }

  open(node: number, cur: Int32Array, at: number): void {
    const from = this.to.length
    this.g.successors(node, this.to, this.marks)
    cur[at] = from
    cur[at + 1] = this.to.length
    cur[at + 2] = from
  }

  next(_node: number, cur: Int32Array, at: number): number {
    const p = cur[at]
    if (p === cur[at + 1]) return -1
    cur[at] = p + 1
    this.mark = this.marks.data[p]
    return this.to.data[p]
  }

  close(_node: number, cur: Int32Array, at: number): void {
    this.to.length = this.marks.length = cur[at + 2]
  }
}

/** Work counters of one search (filled in when passed as `EmptinessOptions.work`). */
export interface EmptinessWork {
  /** Iterations of the main loop: one per edge read plus one per frame popped. */
  iterations: number
  /** Bytes of the search's packed tables and stacks when it ended (their peak: they never shrink). */
  bytes?: number
}

/** Options of `findAcceptingLasso`. */
export interface EmptinessOptions {
  /** Polled every 1024 new nodes; returning true stops the search with `kind: 'stopped'`. */
  shouldStop?: () => boolean
  /** Called at most every 100 ms with the nodes and edges explored so far. */
  onProgress?: (nodes: number, edges: number) => void
  /** Receives the search's work counters (a test bounds work by the edges, not time). */
  work?: EmptinessWork
}

/**
 * An accepting run `prefix · cycle^ω`. The run is prefix[0], prefix[1], ..., prefix[last],
 * cycle[0], cycle[1], ..., cycle[k-1], cycle[0], ... : `prefix` starts at an initial node (it is
 * empty when cycle[0] is initial), every consecutive pair is an edge, and so is
 * (cycle[k-1], cycle[0]). `cycleMarks[i]` is the mark set of the edge used from cycle[i] to
 * cycle[(i+1) % k]; together they cover every mark asked for. k >= 1.
 */
export interface Lasso {
  kind: 'lasso'
  prefix: number[]
  cycle: number[]
  cycleMarks: number[]
  nodes: number
  edges: number
}

/**
 * The result of `findAcceptingLasso`. `nodes` and `edges` count what the search explored: the
 * edges it read (every edge of every node reached, when the result is 'empty').
 */
export type EmptinessResult =
  | { kind: 'empty'; nodes: number; edges: number }
  | Lasso
  | { kind: 'stopped'; nodes: number; edges: number }

const DEAD = -1

/**
 * The search's packed state. A class rather than closures over locals, so that the hot loop calls
 * the same functions on every search (a closure made per search would be a new call target each
 * time, and the optimized loop would be thrown away and compiled again).
 */
class DepthFirst {
  /** num[v]: 0 unvisited, DEAD once its component is finished, else its DFS number (>0) while open. */
  readonly num = new Int32Buffer(1 << 16)
  readonly active = new Int32Buffer() // open nodes in DFS order (Tarjan's stack)
  readonly rootNum = new Int32Buffer() // the roots stack: DFS number of each partial component's root,
  readonly rootAcc = new Int32Buffer() // the marks seen inside it,
  readonly rootIn = new Int32Buffer() // and the marks of the tree edge that entered its root
  readonly frameNode = new Int32Buffer() // the DFS stack: each open node, with its edge cursor's state
  readonly frameCur = new Int32Buffer(CURSOR_WORDS * 1024)
  nodes = 0
  edges = 0
  iterations = 0
  /** Every node id met so far is at most this (num is addressable up to it). */
  maxId = -1
  private lastReport = Date.now()

  constructor(private readonly g: MarkedGraph, private readonly cursor: EdgeCursor, private readonly all: number,
              private readonly opts: EmptinessOptions) {}

  /** Opens v, entered by an edge with marks `inMark`, as a new partial component. */
  private push(v: number, inMark: number): void {
    const n = ++this.nodes
    this.num.data[v] = n
    this.active.push(v)
    this.rootNum.push(n)
    this.rootAcc.push(0)
    this.rootIn.push(inMark)
    const at = CURSOR_WORDS * this.frameNode.length
    this.frameNode.push(v)
    this.frameCur.ensure(at + CURSOR_WORDS)
    this.cursor.open(v, this.frameCur.data, at)
  }

  /**
   * Searches from one initial node (the main loop, in a method of its own so that its optimized
   * code outlives a change in the caller's loop over initial nodes): a lasso, 'stopped', or null
   * when every component reached from it is closed and none accepts.
   */
  search(init: number): EmptinessResult | null {
    const { num, active, rootNum, rootAcc, rootIn, frameNode, frameCur, cursor, all, opts } = this
    if (init > this.maxId) { this.maxId = init; num.ensure(init + 1) }
    if (num.data[init] !== 0) return null
    this.push(init, 0)
    let edges = this.edges, iterations = this.iterations, maxId = this.maxId
    let result: EmptinessResult | null = null
    loop: while (frameNode.length > 0) {
      iterations++
      const f = frameNode.length - 1
      const v = frameNode.data[f]
      // Only the top frame is ever worked on: its cursor reads the next edge of v.
      const w = cursor.next(v, frameCur.data, CURSOR_WORDS * f)
      if (w >= 0) {
        edges++
        const m = cursor.mark
        if (w > maxId) { maxId = w; num.ensure(w + 1) }
        const nw = num.data[w]
        if (nw === 0) {
          if ((this.nodes & 1023) === 0) {
            if (opts.shouldStop?.()) { result = { kind: 'stopped', nodes: this.nodes, edges }; break loop }
            if (opts.onProgress) {
              const now = Date.now()
              if (now - this.lastReport >= 100) { this.lastReport = now; opts.onProgress(this.nodes, edges) }
            }
          }
          this.push(w, m)
        } else if (nw > 0) {
          // w is open: the edge closes a cycle; merge every partial component above w's.
          let acc = m
          while (rootNum.top() > nw) {
            acc |= rootAcc.pop() | rootIn.pop()
            rootNum.pop()
          }
          const r = rootAcc.length - 1
          rootAcc.data[r] |= acc
          if ((rootAcc.data[r] & all) === all) {
            const lasso = buildLasso(this.g, all, num, active, rootNum.top(), maxId)
            result = { kind: 'lasso', ...lasso, nodes: this.nodes, edges }
            break loop
          }
        }
        continue
      }
      // v's edges are done: drop its frame, and, when v is a root, close its component.
      cursor.close(v, frameCur.data, CURSOR_WORDS * f)
      frameNode.pop()
      if (rootNum.top() === num.data[v]) {
        rootNum.pop(); rootAcc.pop(); rootIn.pop()
        let x: number
        do {
          x = active.pop()
          num.data[x] = DEAD
        } while (x !== v)
      }
    }
    this.edges = edges
    this.iterations = iterations
    this.maxId = maxId
    return result
  }

  /** `r`, with the work counters filled in when asked for. */
  finish(r: EmptinessResult): EmptinessResult {
    const work = this.opts.work
    if (work) {
      work.iterations = this.iterations
      work.bytes = [this.num, this.active, this.rootNum, this.rootAcc, this.rootIn, this.frameNode, this.frameCur]
        .reduce((b, x) => b + x.data.byteLength, this.cursor.bytes)
    }
    return r
  }
}

/**
 * Searches the graph for a run that passes infinitely often through edges carrying each mark of
 * `allMarks` (so with `allMarks = 0`, for any reachable cycle), by Couvreur's algorithm (FM'99).
 */
export function findAcceptingLasso(g: MarkedGraph, allMarks: number, opts: EmptinessOptions = {}): EmptinessResult {
  const dfs = new DepthFirst(g, g.cursor ?? new StackedEdges(g), allMarks | 0, opts)
  for (const init of g.initial()) {
    const r = dfs.search(init)
    if (r) return dfs.finish(r)
  }
  return dfs.finish({ kind: 'empty', nodes: dfs.nodes, edges: dfs.edges })
}

/**
 * A short lasso through the component whose root has DFS number `root`: its nodes are the open
 * nodes numbered `root` or more, and its inner edges carry every mark of `all`.
 */
function buildLasso(g: MarkedGraph, all: number, num: Int32Buffer, active: Int32Buffer, root: number, maxId: number) {
  const size = maxId + 1
  const inC = new Uint8Array(size)
  for (let i = active.length - 1; i >= 0 && num.data[active.data[i]] >= root; i--) inC[active.data[i]] = 1
  const visited = (v: number) => v < size && num.data[v] !== 0
  const search = new Search(size)

  // Prefix: breadth-first over explored nodes, from the initial nodes to the component.
  const starts = g.initial().filter(visited)
  const found = search.run(g, starts, visited, (_u, w) => inC[w] === 1, true)
  if (!found) throw new Error('internal error: accepting component not reachable from an initial node')
  const entry = found.nodes[found.nodes.length - 1]
  const prefix = found.nodes.slice(0, -1)

  // Cycle: from the entry, collect the missing marks edge by edge, then return to the entry.
  const cycle = [entry]
  const cycleMarks: number[] = []
  let missing = all
  let at = entry
  const inside = (v: number) => v < size && inC[v] === 1
  for (;;) {
    if (missing === 0 && at === entry && cycle.length > 1) break
    const closing = missing === 0
    const step = closing
      ? search.run(g, [at], inside, (_u, w) => w === entry, false)
      : search.run(g, [at], inside, (_u, w, m) => inC[w] === 1 && (m & missing) !== 0, false)
    if (!step) throw new Error('internal error: accepting component lost its cycle')
    for (let i = 1; i < step.nodes.length; i++) {
      cycle.push(step.nodes[i])
      cycleMarks.push(step.marks[i - 1])
      missing &= ~step.marks[i - 1]
    }
    at = step.nodes[step.nodes.length - 1]
    if (closing) break
  }
  cycle.pop() // the last node is the entry again
  return { prefix, cycle, cycleMarks }
}

/** Breadth-first searches for the shortest path ending with an edge that satisfies a goal. */
class Search {
  private parent: Int32Array
  private parentMark: Int32Array
  private seen: Uint8Array
  private touched: number[] = []
  private to = new Int32Buffer()
  private marks = new Int32Buffer()

  constructor(size: number) {
    this.parent = new Int32Array(size)
    this.parentMark = new Int32Array(size)
    this.seen = new Uint8Array(size)
  }

  /**
   * Shortest path from one of `starts`, through nodes satisfying `allowed`, whose last edge
   * satisfies `goal` (with `atStart`, a start node satisfying `goal(-1, start, 0)` is a path of no
   * edges). Returns its nodes and the marks of its edges, or null.
   */
  run(g: MarkedGraph, starts: number[], allowed: (v: number) => boolean,
      goal: (u: number, w: number, m: number) => boolean, atStart: boolean): { nodes: number[]; marks: number[] } | null {
    const { parent, parentMark, seen, touched, to, marks } = this
    for (const v of touched) seen[v] = 0
    touched.length = 0
    const queue = new Int32Buffer()
    for (const s of starts) {
      if (seen[s]) continue
      if (atStart && goal(-1, s, 0)) return { nodes: [s], marks: [] }
      seen[s] = 1
      touched.push(s)
      parent[s] = -1
      queue.push(s)
    }
    const path = (u: number, w: number, m: number) => {
      const nodes = [w], ms = [m]
      for (let v = u; v >= 0; v = parent[v]) { nodes.push(v); if (parent[v] >= 0) ms.push(parentMark[v]) }
      return { nodes: nodes.reverse(), marks: ms.reverse() }
    }
    for (let h = 0; h < queue.length; h++) {
      const u = queue.data[h]
      to.length = 0
      marks.length = 0
      g.successors(u, to, marks)
      for (let i = 0; i < to.length; i++) {
        const w = to.data[i], m = marks.data[i]
        if (!allowed(w)) continue
        if (goal(u, w, m)) return path(u, w, m)
        if (!seen[w]) {
          seen[w] = 1
          touched.push(w)
          parent[w] = u
          parentMark[w] = m
          queue.push(w)
        }
      }
    }
    return null
  }
}
