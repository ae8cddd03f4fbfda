// Exploration throughput and memory on heartbeat failure detectors of our own, against a baseline
// of raw inserts into the same state store (so the ratio compares on any machine).
import { explore } from '../kernels/explore/reach'
import { StateStore } from '../kernels/base/stateset'
import { analyzeNotebook } from '../kernels/language/analyze'
import { compileInstance } from '../kernels/model/instance'

/** One measured exploration. */
export interface BenchCase {
  name: string
  processes: number
  states: number
  transitions: number
  seconds: number
  bytesPerState: number
}

/** The orchard pumps heartbeat detector under `timing` (shared by the explore and parallel cases). */
export const pumps = (timing: string) => `# Orchard pumps

\`\`\`protocol
protocol pumps {
  const delay = 2
  const patience = 2
  const cap = 4
  timing ${timing}
  faults crash
  message beat
  state suspect[peer]: bool = false
  state wait[peer]: 1..cap = patience
  state quiet[peer]: 0..cap = 0
  on beat from q {
    quiet[q] := 0
    if suspect[q] {
      suspect[q] := false
      wait[q] := min(wait[q] + 1, cap)
    }
  }
  step {
    broadcast beat
    for q {
      quiet[q] := min(quiet[q] + 1, cap)
      if quiet[q] >= wait[q] { suspect[q] := true }
    }
  }
}
\`\`\`
`

const ferries = `# Harbour ferries report their berth

\`\`\`protocol
protocol ferries {
  timing asynchronous
  faults crash
  message at(berth: 0..1)
  state berth: 0..1 = any
  state known[peer]: 0..2 = 2
  on at(b) from q { known[q] := b }
  step {
    berth := one of {0, 1}
    broadcast at(berth)
  }
}
\`\`\`
`

function measure(name: string, text: string, n: number): BenchCase {
  const nb = analyzeNotebook(text)
  const errors = nb.diagnostics.filter((d) => d.severity === 'error')
  if (errors.length > 0) throw new Error(`${name}: ${errors[0].line}:${errors[0].column} ${errors[0].message}`)
  const p = nb.protocols[0]
  const inst = compileInstance(p, n, p.consts.map((c) => c.value))
  const r = explore(inst)
  return { name, processes: n, states: r.states, transitions: r.transitions, seconds: r.seconds, bytesPerState: r.bytesPerState }
}

/** The exploration cases: a heartbeat failure detector at N = 2 and 3 in each timing model, and an asynchronous gossip. */
export function exploreCases(): BenchCase[] {
  return [
    measure('pumps heartbeat, synchronous, crash', pumps('synchronous(delay: delay, idle: 1)'), 2),
    measure('pumps heartbeat, synchronous, crash', pumps('synchronous(delay: delay, idle: 1)'), 3),
    measure('pumps heartbeat, synchronous idle 2, crash', pumps('synchronous(delay: delay, idle: 2)'), 2),
    measure('pumps heartbeat, eventually synchronous, crash', pumps('eventually synchronous(delay: delay, idle: 1)'), 2),
    measure('pumps heartbeat, asynchronous, crash', pumps('asynchronous'), 2),
    measure('ferries berth gossip, asynchronous, crash', ferries, 2),
  ]
}

/** Inserts per second of random keys as wide as the widest case's states into the same store. */
export function hashBaseline(): { name: string; insertsPerSecond: number; keyWords: number } {
  const nb = analyzeNotebook(pumps('synchronous(delay: delay, idle: 1)'))
  const p = nb.protocols[0]
  const keyWords = compileInstance(p, 3, p.consts.map((c) => c.value)).words
  const count = 1_000_000
  const keys = new Uint32Array(count * keyWords)
  let x = 0x2545f491
  for (let k = 0; k < keys.length; k++) {
    // xorshift32: reproducible keys without a dependency.
    x ^= x << 13
    x ^= x >>> 17
    x ^= x << 5
    keys[k] = x >>> 0
  }
  const store = new StateStore(keyWords, 1024)
  const t0 = performance.now()
  for (let off = 0; off < keys.length; off += keyWords) store.insert(keys, off)
  const seconds = (performance.now() - t0) / 1000
  return { name: `StateStore.insert of ${count.toLocaleString('en-US')} random keys`, insertsPerSecond: count / seconds, keyWords }
}
