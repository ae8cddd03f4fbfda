// Proof by induction against exploration on a lanterns-like failure detector of our own: the
// largest N whose two-index invariant each engine settles within a time budget on this machine.
// The keepers' oil and wick levels are free choices that the invariant does not mention, so the
// explorer's state space grows like 16^N while one tick of the induction step grows like N^2.
import { explore } from '../kernels/explore/reach'
import { analyzeNotebook } from '../kernels/language/analyze'
import { conjunctsOf, explicitConjunct } from '../kernels/induction/invariant'
import { proveInduction } from '../kernels/induction/prove'
import { loadSolver } from '../kernels/induction/solver'
import { MAX_PROCESSES } from '../kernels/model/layout'
import { compileInstance } from '../kernels/model/instance'

const NOTEBOOK = `# Harbour lanterns

\`\`\`protocol
protocol lanterns {
  const patience = 2
  timing synchronous(delay: 1, idle: 1)
  faults crash
  message glow
  state oil: 0..3 = 3
  state wick: 0..3 = 0
  state quiet[peer]: 0..3 = 0
  state dark[peer]: bool = false
  on glow from q { quiet[q] := 0 }
  step {
    oil := one of 0..3
    wick := one of 0..3
    broadcast glow
    for q {
      quiet[q] := min(quiet[q] + 1, 3)
      if quiet[q] > patience { dark[q] := true }
    }
  }
}
\`\`\`

\`\`\`property
property calm = forall p, q: always (alive(q) implies not p.dark[q])
property fresh = forall p, q: always (alive(p) and alive(q) implies p.quiet[q] <= 1 and (p.quiet[q] = 1 implies pending(glow, q -> p)))
\`\`\`

\`\`\`check
check lanterns: calm, fresh at N = 2
\`\`\`
`

/** One size of the comparison. */
export interface InductionBenchRow { processes: number; engine: 'induction' | 'exploration'; outcome: string; seconds: number; states?: number }

/** What the comparison found: `largest*` are the largest N settled within `budget` seconds each. */
export interface InductionBench {
  rows: InductionBenchRow[]
  largestInduction: number
  largestExploration: number
  /** Seconds per size and engine. */
  budget: number
  /** Loading Z3 (once per process, before any size is timed). */
  solverLoadSeconds: number
  /** The first, untimed proof (N = 2), which includes the engine's warm-up. */
  warmupSeconds: number
  /** The largest size the kernel compiles (induction cannot go past it). */
  maxProcesses: number
}

/** The comparison: each engine from N = 2 upwards until it fails or exceeds `budget` seconds. */
export async function inductionCases(budget = 60): Promise<InductionBench> {
  const model = analyzeNotebook(NOTEBOOK)
  const protocol = model.protocols[0]
  const props = model.checks[0].properties
  const consts = protocol.consts.map((c) => c.value)
  const rows: InductionBenchRow[] = []
  // The solver is loaded, and warmed up by one untimed proof (the engine compiles much of Z3's
  // WebAssembly on first use: the first proof takes seconds longer), before the clock starts, so
  // N = 2 is timed like every other size. Both are reported.
  const l0 = performance.now()
  await loadSolver()
  const solverLoadSeconds = (performance.now() - l0) / 1000
  const w0 = performance.now()
  await proveInduction(protocol, props, 2, consts)
  const warmupSeconds = (performance.now() - w0) / 1000
  let largestInduction = 0
  let largestExploration = 0
  for (let n = 2; n <= MAX_PROCESSES; n++) {
    const t0 = performance.now()
    const proof = await proveInduction(protocol, props, n, consts, { timeoutMs: budget * 1000 })
    const seconds = (performance.now() - t0) / 1000
    rows.push({ processes: n, engine: 'induction', outcome: proof.outcome.kind, seconds })
    if (proof.outcome.kind !== 'holds' || seconds > budget) break
    largestInduction = n
  }
  for (let n = 2; n <= MAX_PROCESSES; n++) {
    const inst = compileInstance(protocol, n, consts)
    const tests = conjunctsOf(props, n).map((c) => explicitConjunct(inst, props[c.property], c.assignment))
    const t0 = performance.now()
    const r = explore(inst, { limit: 50_000_000, shouldStop: () => performance.now() - t0 > budget * 1000, invariant: (w, o) => tests.every((t) => t(w, o)) })
    const seconds = (performance.now() - t0) / 1000
    rows.push({ processes: n, engine: 'exploration', outcome: r.complete ? 'holds' : r.stopped ? 'out of time' : r.outcome, seconds, states: r.states })
    if (!r.complete) break
    largestExploration = n
  }
  await (await loadSolver()).close()
  return { rows, largestInduction, largestExploration, budget, solverLoadSeconds, warmupSeconds, maxProcesses: MAX_PROCESSES }
}
