// Parallel exploration (kernels/explore/parallel.ts) on a heartbeat detector of our own (orchard
// pumps, synchronous, crash faults) at N = 3, with its invariant: the sequential explorer as the
// in-process baseline, then 1..cores workers. Each setting is warmed up once; then the settings are
// run in turns, ROUNDS times (1, 2, ..., cores, 1, 2, ...), so that a change in the machine's load
// (it is shared) falls on all of them alike; each round also runs the sequential explorer. A
// setting's time is its median; its speedup is the median over the rounds of (one worker's time /
// its time) in the same round, with the smallest and largest beside it, and likewise against the
// sequential explorer. Every run must give the baseline's states and transitions.
import { loadavg } from 'node:os'
import { analyzeNotebook } from '../kernels/language/analyze'
import { exploreParallel, type ParallelJob } from '../kernels/explore/parallel'
import { closeNodePools, cores, nodePool } from '../kernels/explore/pool-node'
import { explore } from '../kernels/explore/reach'
import { pumps } from './explore'
import { compileInstance } from '../kernels/model/instance'
import { rowInvariant } from '../kernels/explore/invariant'
import { atomsOf } from '../kernels/language/formula'
import { FairGraphRecorder } from '../kernels/explore/fairgraph'
import type { ExploreOptions } from '../kernels/explore/reach'

/** One worker count. */
export interface ParallelRun {
  workers: number
  seconds: number
  statesPerSecond: number
  /** Against one worker of the parallel explorer, the median over the rounds (goal for two workers: at least 1.6). */
  speedup: number
  /** The smallest and largest of the rounds' speedups. */
  speedupRange: [number, number]
  /** Against the sequential explorer run in the same round (median over the rounds). */
  overSequential: number
}

export interface ParallelCase {
  name: string
  processes: number
  states: number
  transitions: number
  cores: number
  sequentialSeconds: number
  /** Rounds of runs in turns. */
  rounds: number
  runs: ParallelRun[]
  /** When it was measured (UTC) and the load average then: the machine is shared. */
  measuredAt: string
  loadAverage: number[]
}

/** The pumps detector with its bound as an invariant row at N = 3. */
const pumpsRow = (timing: string) => `${pumps(timing)}
\`\`\`property
property bounded = forall p, q: always p.wait[q] <= cap
\`\`\`
\`\`\`check
check pumps: bounded at N = 3
\`\`\`
`

/**
 * `edges`: the search of a temporal row, recording the fair graph (a fresh recorder per run), not
 * the invariant row's.
 */
function measure(name: string, timing: string, n: number, maxWorkers: number, edges = false): ParallelCase {
  const nb = analyzeNotebook(pumpsRow(timing))
  const errors = nb.diagnostics.filter((d) => d.severity === 'error')
  if (errors.length > 0) throw new Error(`${errors[0].line}:${errors[0].column} ${errors[0].message}`)
  const protocol = nb.protocols[0]
  const constants = protocol.consts.map((c) => c.value)
  const inst = compileInstance(protocol, n, constants)
  const prop = nb.checks[0].properties[0]
  if (prop.formula.k !== 'always') throw new Error('the benchmark property is an invariant')
  const formula = prop.formula.arg
  const terms = atomsOf(prop.formula)
  const chosen = [[0, 1]]
  const job: ParallelJob = edges ? { protocol, n, constants, invariant: null, edges: true } : { protocol, n, constants, invariant: { formula, terms, chosen } }
  const invariant = rowInvariant(inst, formula, terms, chosen).invariant
  const options = (): ExploreOptions => (edges ? { edges: new FairGraphRecorder(inst) } : { invariant })
  explore(inst, options()) // warm-up: compiles the hot loops once
  let seq = explore(inst, options())
  const again = explore(inst, options())
  if (again.seconds < seq.seconds) seq = again
  if (!seq.complete) throw new Error(`${name}: the invariant did not hold`)
  const settings = Array.from({ length: maxWorkers }, (_, i) => i + 1)
  const pools = settings.map((w) => {
    const pool = nodePool(w)
    pool.start()
    exploreParallel(inst, options(), job, pool) // warm-up: each worker compiles its hot loops once
    return pool
  })
  // times[round][setting]; seqTimes[round]: the sequential explorer in the same round.
  const times: number[][] = []
  const seqTimes: number[] = []
  for (let k = 0; k < ROUNDS; k++) {
    seqTimes.push(explore(inst, options()).seconds)
    times.push(settings.map((w, i) => {
      const r = exploreParallel(inst, options(), job, pools[i])
      if (r.states !== seq.states || r.transitions !== seq.transitions || !r.complete) {
        throw new Error(`${name}: ${w} workers found ${r.states} states and ${r.transitions} transitions, not ${seq.states} and ${seq.transitions}`)
      }
      return r.seconds
    }))
  }
  const runs: ParallelRun[] = settings.map((w, i) => {
    const seconds = median(times.map((t) => t[i]))
    const ratios = times.map((t) => t[0] / t[i])
    return {
      workers: w, seconds, statesPerSecond: seq.states / seconds, speedup: median(ratios),
      speedupRange: [Math.min(...ratios), Math.max(...ratios)], overSequential: median(times.map((t, k) => seqTimes[k] / t[i])),
    }
  })
  return {
    name, processes: n, states: seq.states, transitions: seq.transitions, cores: cores(), sequentialSeconds: median(seqTimes), rounds: ROUNDS, runs,
    measuredAt: new Date().toISOString(), loadAverage: loadavg(),
  }
}

const ROUNDS = 7

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  const m = s.length >> 1
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2
}

/** Scaling for 1..cores workers (at least 2, so the two-worker goal is always measured). */
export async function parallelCases(): Promise<ParallelCase[]> {
  const max = Math.max(2, cores())
  try {
    const timing = 'synchronous(delay: delay, idle: 1)'
    return [
      measure('pumps heartbeat, synchronous, crash: bounded (invariant)', timing, 3, max),
      measure('pumps heartbeat, synchronous, crash: recording the fair graph (temporal rows)', timing, 3, max, true),
    ]
  } finally {
    await closeNodePools()
  }
}
