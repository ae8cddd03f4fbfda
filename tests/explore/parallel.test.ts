// The parallel explorer (kernels/explore/parallel.ts) against the sequential one (reach.ts), its
// oracle here (itself compared with the reference interpreter in tests/differential): on generated
// protocols, for 1, 2 and 3 workers, the same states in the same numbering, the same transitions,
// outcome, model error and shortest trace; through the runner, the same rows (verdicts, counts,
// counterexamples). A worker that throws makes the row `error`, never a partial verdict.
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { parallelCounters, parallelTuning, exploreParallel, setPoolProvider, type ParallelJob } from '../../kernels/explore/parallel'
import { closeNodePools, nodePool, useNodePools } from '../../kernels/explore/pool-node'
import { explore, type ExploreResult } from '../../kernels/explore/reach'
import { FairGraphRecorder } from '../../kernels/explore/fairgraph'
import type { ChunkedInt32 } from '../../kernels/base/chunked'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { ProtocolModel } from '../../kernels/language/model'
import { compileInstance } from '../../kernels/model/instance'
import { planRows, runRow } from '../../kernels/run'
import type { CheckRow } from '../../kernels/result'
import { generateNotebook, generateProperties } from '../reference/generate'
import { PUMPS } from '../symmetry/fixtures'

const WORKERS = [1, 2, 3]
const SEEDS = 40

beforeAll(() => {
  useNodePools()
  for (const w of WORKERS) nodePool(w).start()
})
afterAll(async () => {
  parallelTuning.minFrontier = 2048
  parallelTuning.edgesPerSource = 16
  setPoolProvider(null)
  await closeNodePools()
})

/** What must be identical: counts, outcome, error, trace and the states in store order. */
function summary(r: ExploreResult, words: number) {
  return {
    states: r.states, transitions: r.transitions, complete: r.complete, limitHit: r.limitHit, outcome: r.outcome,
    error: r.error ? `${r.error.process} ${r.error.message}` : null, trace: r.trace,
    store: Array.from(r.store.data.subarray(0, r.states * words)),
  }
}

function protocolOf(text: string): ProtocolModel {
  const nb = analyzeNotebook(text)
  expect(nb.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
  return nb.protocols[0]
}

/**
 * Every unreduced row of `search` in generated notebooks (seeds 1..seeds) run on 2 and 3 workers
 * equals the row run on one (times aside); returns how many rows were compared and violated.
 */
function rowsAgree(search: 'invariant' | 'ltl', seeds: number): { rows: number; violated: number } {
  const strip = (r: CheckRow) => ({ ...r, seconds: 0 })
  let rows = 0
  let violated = 0
  for (let seed = 1; seed <= seeds; seed++) {
    const text = generateNotebook(seed)
    const nb = analyzeNotebook(text + '\n' + generateProperties(protocolOf(text), seed))
    for (const plan of planRows(nb)) {
      const one = runRow(nb, plan)
      if (one.search !== search || one.reducedStates !== undefined) continue
      rows++
      if (one.verdict === 'violated') violated++
      for (const w of [2, 3]) expect(strip(runRow(nb, plan, { workers: w })), `seed ${seed} row ${plan.row} workers ${w}`).toEqual(strip(one))
    }
  }
  return { rows, violated }
}

describe('parallel exploration equals sequential exploration', () => {
  for (const minFrontier of [0, 16]) {
    it(`generated protocols at N = 1, 2, 3 under a limit, for ${WORKERS.join(', ')} workers (levels of at least ${minFrontier} sources on the workers)`, () => {
      parallelTuning.minFrontier = minFrontier
      const seen = { complete: 0, limit: 0, modelError: 0 }
      for (let seed = 1; seed <= SEEDS; seed++) {
        const p = protocolOf(generateNotebook(seed))
        const constants = p.consts.map((c) => c.value)
        for (const n of [1, 2, 3]) {
          let inst
          try { inst = compileInstance(p, n, constants) } catch { continue }
          const limit = 1500
          const want = summary(explore(inst, { limit }), inst.words)
          if (want.complete) seen.complete++
          if (want.limitHit) seen.limit++
          if (want.outcome === 'model-error') seen.modelError++
          const job: ParallelJob = { protocol: p, n, constants, invariant: null }
          for (const w of WORKERS) {
            const got = summary(exploreParallel(inst, { limit }, job, nodePool(w)), inst.words)
            expect(got, `seed ${seed} N=${n} workers ${w}`).toEqual(want)
          }
        }
      }
      // Every way a search ends was met: complete, the state limit, a model error.
      expect(seen.complete).toBeGreaterThan(10)
      expect(seen.limit).toBeGreaterThan(0)
      expect(seen.modelError).toBeGreaterThan(0)
    })
  }

  it('rows of generated invariants: the same verdicts, counts and counterexamples for 1, 2 and 3 workers', () => {
    parallelTuning.minFrontier = 0
    const { rows: invariantRows, violated } = rowsAgree('invariant', 2 * SEEDS)
    expect(invariantRows).toBeGreaterThan(25)
    expect(violated).toBeGreaterThan(0)
    expect(violated).toBeLessThan(invariantRows)
  })
})

/** What a recorder holds so far (rows, targets, marks), whether or not the search completed. */
function recorded(rec: FairGraphRecorder) {
  const { start, target, marks } = rec as unknown as { start: ChunkedInt32 | null; target: ChunkedInt32; marks: ChunkedInt32 }
  const all = (c: ChunkedInt32) => Array.from({ length: c.length }, (_, k) => c.get(k))
  return { start: start ? all(start) : null, target: all(target), marks: all(marks) }
}

describe('a temporal row\'s fair graph recorded by the parallel search', () => {
  it('equals the sequential recording on generated protocols at N = 1, 2, 3 under a limit, for 1, 2 and 3 workers', () => {
    parallelTuning.minFrontier = 0
    let compared = 0
    let edges = 0
    for (let seed = 1; seed <= SEEDS; seed++) {
      const p = protocolOf(generateNotebook(seed))
      const constants = p.consts.map((c) => c.value)
      for (const n of [1, 2, 3]) {
        let inst
        try { inst = compileInstance(p, n, constants) } catch { continue }
        const limit = 1500
        const rec = new FairGraphRecorder(inst)
        const want = { ...summary(explore(inst, { limit, edges: rec }), inst.words), graph: recorded(rec) }
        edges += want.graph.target.length
        const job: ParallelJob = { protocol: p, n, constants, invariant: null, edges: true }
        for (const w of WORKERS) {
          const prec = new FairGraphRecorder(inst)
          const got = { ...summary(exploreParallel(inst, { limit, edges: prec }, job, nodePool(w)), inst.words), graph: recorded(prec) }
          expect(got, `seed ${seed} N=${n} workers ${w}`).toEqual(want)
        }
        compared++
      }
    }
    expect(compared).toBeGreaterThan(60)
    expect(edges).toBeGreaterThan(10_000)
  })

  for (const timing of ['synchronous(delay: delay, idle: 1)', 'eventually synchronous(delay: delay, idle: 1)', 'asynchronous']) {
    it(`equals the sequential recording on the pumps at N = 3 under ${timing.split('(')[0]} (wide levels, edge regions that grow)`, () => {
      parallelTuning.minFrontier = 2048
      // Room for one edge per source at first: the regions must grow, and levels be expanded again.
      parallelTuning.edgesPerSource = 1
      parallelCounters.edgeRedos = 0
      const p = protocolOf(`# Orchard pumps\n\n\`\`\`protocol\n${PUMPS.replace(/timing [^\n]*/, `timing ${timing}`)}\n\`\`\`\n`)
      const constants = p.consts.map((c) => c.value)
      const inst = compileInstance(p, 3, constants)
      const limit = 60_000
      const rec = new FairGraphRecorder(inst)
      const want = { ...summary(explore(inst, { limit, edges: rec }), inst.words), graph: recorded(rec) }
      for (const w of [2]) {
        const prec = new FairGraphRecorder(inst)
        const got = { ...summary(exploreParallel(inst, { limit, edges: prec }, { protocol: p, n: 3, constants, invariant: null, edges: true }, nodePool(w)), inst.words), graph: recorded(prec) }
        expect(got, `workers ${w}`).toEqual(want)
      }
      parallelTuning.edgesPerSource = 16
      expect(parallelCounters.edgeRedos).toBeGreaterThan(0)
    })
  }

  it('gives temporal rows the same verdicts, counts and lassos for 1, 2 and 3 workers', () => {
    parallelTuning.minFrontier = 0
    const { rows: temporalRows, violated } = rowsAgree('ltl', SEEDS)
    expect(temporalRows).toBeGreaterThan(15)
    expect(violated).toBeGreaterThan(0)
  })
})

const beacons = `# Lighthouse beacons

\`\`\`protocol
protocol beacons {
  timing asynchronous
  faults crash
  message flash(level: 0..2)
  state level: 0..2 = 0
  state heard[peer]: 0..2 = 0
  on flash(v) from q { heard[q] := v }
  step {
    level := one of {0, 1, 2}
    broadcast flash(level)
  }
}
\`\`\`

\`\`\`property
property bounded = forall p, q: always (p.heard[q] <= 2)
\`\`\`

\`\`\`check
check beacons: bounded at N = 2
\`\`\`
`

const pumps = `# Orchard pumps\n\n\`\`\`protocol\n${PUMPS}\n\`\`\`\n`

describe('buffers that grow during a search', () => {
  it('give the same search for 1, 2 and 3 workers (pumps at N = 3 within 40,000 states)', () => {
    parallelTuning.minFrontier = 0
    const p = protocolOf(pumps)
    const constants = p.consts.map((c) => c.value)
    const inst = compileInstance(p, 3, constants)
    const limit = 40_000
    const want = summary(explore(inst, { limit }), inst.words)
    expect(want.limitHit).toBe(true)
    // Far beyond the 64 KiB the buffers start with, so the table, arena and staging were replaced.
    expect(want.states * inst.words * 4).toBeGreaterThan(4 * 65536)
    for (const w of WORKERS) expect(summary(exploreParallel(inst, { limit }, { protocol: p, n: 3, constants, invariant: null }, nodePool(w)), inst.words), `workers ${w}`).toEqual(want)
  })
})

describe('a worker that fails', () => {
  it('makes the row error with its message, and the pool works afterwards', () => {
    parallelTuning.minFrontier = 0
    const nb = analyzeNotebook(beacons)
    expect(nb.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
    const [plan] = planRows(nb)
    const ok = runRow(nb, plan)
    expect(ok.verdict).toBe('holds')
    expect(ok.states).toBeGreaterThan(100)
    const bad = runRow(nb, plan, { workers: 2, workerFault: { worker: 1, after: 3 } })
    expect(bad.verdict).toBe('error')
    expect(bad.complete).toBe(false)
    expect(bad.note).toContain('parallel exploration worker 2 failed: test fault')
    const again = runRow(nb, plan, { workers: 2 })
    expect({ ...again, seconds: 0 }).toEqual({ ...ok, seconds: 0 })
  })

  it('that dies without a word (its thread ends) makes the row error, never a partial holds, and a new pool takes its place', () => {
    parallelTuning.minFrontier = 0
    const nb = analyzeNotebook(beacons)
    const [plan] = planRows(nb)
    const ok = runRow(nb, plan)
    const before = nodePool(2)
    const bad = runRow(nb, plan, { workers: 2, workerFault: { worker: 1, after: 3, exit: true } })
    expect(bad.verdict).toBe('error')
    expect(bad.complete).toBe(false)
    expect(bad.note).toContain('parallel exploration worker 2 stopped: its thread ended (exit code 70)')
    expect(before.dead).toBe(true)
    const again = runRow(nb, plan, { workers: 2 })
    expect(nodePool(2)).not.toBe(before)
    expect({ ...again, seconds: 0 }).toEqual({ ...ok, seconds: 0 })
  })
})
