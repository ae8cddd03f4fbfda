// The row plan: which rows a notebook's checks ask for (property x size x constant setting), in one
// deterministic order, and the options of a run. The plan is never built as an array: it is a list
// of segments (one per check and property), each a mixed-radix product of sizes and sweep values,
// so row i is computed from i and a shard walks only its own rows. A sweep of a billion settings
// therefore costs no memory until its rows are run.
import type { CheckModel, NotebookModel, ProtocolModel } from './language/model'
import { canonicalJson } from './base/canonical'
import { sha256Hex } from './base/hash'
import type { Progress } from './result'

/** One planned row: a property of a check at one size and one constant setting. */
export interface RowPlan {
  /** Position of the row in the whole (unsharded) plan, 0-based. */
  row: number
  /** Index of the check in the notebook. */
  check: number
  /** Index into the check's properties. */
  property: number
  /** Size to check; null when the cutoff decides it (the runner picks k, or reports why not). */
  processes: number | null
  /** One value per protocol constant, in declaration order. */
  constants: number[]
}

/** A deterministic share of the plan: the rows whose index is congruent to `index - 1` modulo `count`. */
export interface ShardSpec { index: number; count: number }

/** The options of a run. Only `only` and `shard` change which rows are run; none changes a verdict. */
export interface RunOptions {
  /** Run only the checks that name this property or protocol (the plan is numbered after this filter). */
  only?: string
  /** Run a deterministic share of the rows: rows whose index is congruent to index-1 modulo count. */
  shard?: ShardSpec
  /** Called at most every 100 ms during long checks, with the row's check, property and size. */
  onProgress?: (p: Progress) => void
  /** Polled regularly; returning true stops the current check (its row becomes inconclusive). */
  shouldStop?: () => boolean
  /**
   * Called with true when the run starts waiting on work outside this thread (the SMT solver of a
   * proof by induction) and with false when it computes here again. Only while it waits is the
   * thread's event loop free, so that is when a command line can take Ctrl-C as a gentle stop.
   */
  onWait?: (waiting: boolean) => void
  /**
   * Temporal rows: recompute the fair graph's rows when the product asks for them instead of
   * recording the graph during exploration (less memory, more time). Also automatic above
   * `RECORD_EDGE_BUDGET` edges.
   */
  recomputeEdges?: boolean
  /** Temporal rows: the work budget of translating the negated property (`TRANSLATION_BUDGET` by default). */
  translationBudget?: number
  /**
   * Bytes an exploration's states (and recorded edges) may take; past it the row is
   * `inconclusive`, saying that memory ran out and how many states were reached. Without it only
   * the runtime's own allocation failures stop a search that way.
   */
  memoryBudget?: number
  /**
   * Workers for the exploration of invariant and temporal rows (explore/parallel.ts; temporal rows
   * record their fair graph there too); 1 or absent: this thread only. Results are the same for any number. Used where a pool provider is registered.
   */
  workers?: number
  /**
   * Told, for each row that explored, how many threads took part in its exploration: 1 for the
   * routes the parallel explorer does not take (symmetry-reduced rows, temporal rows that
   * recompute their edges) and for
   * searches whose levels never grew wide enough to share, else the pool's size.
   */
  onExplored?: (row: number, workers: number) => void
  /** Test hook: parallel worker `worker` (0-based) throws (with `exit`, ends its thread) after expanding `after` sources. */
  workerFault?: { worker: number; after: number; exit?: boolean }
}

/** The rows of one property of one check: sizes (outer) times constant settings (inner, last sweep item fastest). */
interface Segment {
  first: number
  check: number
  property: number
  sizes: (number | null)[]
  base: number[]
  sweep: { constIndex: number; values: number[] }[]
  settings: number
  rows: number
}

/** A lazily evaluated row plan. `rows` is the row count of the whole plan (before sharding). */
export interface Plan {
  rows: number
  /** The row with plan index `i` (0 <= i < rows), computed without enumerating the others. */
  at(i: number): RowPlan
  /** The rows in plan order, or only those of `shard`; one at a time. */
  select(shard?: ShardSpec): Generator<RowPlan>
  /** Number of rows `shard` selects. */
  count(shard?: ShardSpec): number
  /** What determines the plan (checks, properties, sizes, sweeps), as canonical JSON: hashed by `planDigest`. */
  describe(): string
}

function keep(protocol: ProtocolModel, check: CheckModel, p: number, only: string | undefined): boolean {
  return only === undefined || only === check.properties[p].name || only === protocol.name
}

/**
 * The deterministic plan of a notebook's rows: checks in notebook order, then properties in the
 * order listed, then sizes, then constant settings (the cartesian product of the sweep, its first
 * item varying slowest). `only` keeps the rows whose property or protocol has that name.
 */
export function planOf(model: NotebookModel, only?: string): Plan {
  const segments: Segment[] = []
  let rows = 0
  model.checks.forEach((check, c) => {
    const protocol = model.protocols[check.protocol]
    check.properties.forEach((_, p) => {
      if (!keep(protocol, check, p, only)) return
      const sweep = check.sweep.map((s) => ({ constIndex: s.constIndex, values: s.values }))
      const settings = sweep.reduce((n, s) => n * s.values.length, 1)
      const sizes = check.sizes ?? [null]
      const seg: Segment = { first: rows, check: c, property: p, sizes, base: protocol.consts.map((k) => k.value), sweep, settings, rows: sizes.length * settings }
      rows += seg.rows
      if (seg.rows > 0) segments.push(seg)
    })
  })
  const at = (i: number): RowPlan => {
    if (!Number.isInteger(i) || i < 0 || i >= rows) throw new RangeError(`row ${i} is outside the plan (0..${rows - 1})`)
    let lo = 0, hi = segments.length - 1
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1
      if (segments[mid].first <= i) lo = mid
      else hi = mid - 1
    }
    const seg = segments[lo]
    const local = i - seg.first
    let rest = local % seg.settings
    const constants = seg.base.slice()
    for (let k = seg.sweep.length - 1; k >= 0; k--) {
      const values = seg.sweep[k].values
      const digit = rest % values.length
      rest = (rest - digit) / values.length
      // A constant swept twice takes the later item's value, as the sweep order says.
      if (!seg.sweep.slice(k + 1).some((s) => s.constIndex === seg.sweep[k].constIndex)) constants[seg.sweep[k].constIndex] = values[digit]
    }
    return { row: i, check: seg.check, property: seg.property, processes: seg.sizes[Math.floor(local / seg.settings)], constants }
  }
  return {
    rows,
    at,
    *select(shard) {
      const step = shard ? shard.count : 1
      for (let i = shard ? shard.index - 1 : 0; i < rows; i += step) yield at(i)
    },
    count(shard) {
      if (!shard) return rows
      return shard.index > rows ? 0 : Math.floor((rows - shard.index) / shard.count) + 1
    },
    describe: () => canonicalJson({
      rows,
      segments: segments.map((s) => ({ check: s.check, property: model.checks[s.check].properties[s.property].name, sizes: s.sizes, base: s.base, sweep: s.sweep })),
    }),
  }
}

/** The row count and SHA-256 of a plan's description: what a shard record carries so merge and replay can tell plans apart. */
export async function planDigest(plan: Plan): Promise<{ rows: number; sha256: string }> {
  return { rows: plan.rows, sha256: await sha256Hex(plan.describe()) }
}

/** The plan indices `shard` selects in a plan of `rows` rows, in order. */
export function shardIndices(rows: number, shard: ShardSpec): number[] {
  const out: number[] = []
  for (let i = shard.index - 1; i < rows; i += shard.count) out.push(i)
  return out
}

/**
 * The planned rows as an array (the plan filtered by `only`, then by `shard`). Materialises the
 * selection: for the workbench and tests; runs stream through `planOf(...).select` instead.
 */
export function planRows(model: NotebookModel, opts: RunOptions = {}): RowPlan[] {
  return [...planOf(model, opts.only).select(opts.shard)]
}
