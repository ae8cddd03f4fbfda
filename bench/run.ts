// `npm run bench [-- --json] [-- --quick]`: speed and memory of the kernel, each measured against an
// in-process baseline in the same run (so that the numbers compare on any machine). `--quick`
// gives induction and exploration 10 s per size instead of 60 s in their comparison.
import { exploreCases, hashBaseline } from './explore'
import { inductionCases } from './induction'
import { parallelCases } from './parallel'
import { parseCases } from './parse'
import { productCases } from './product'
import { reductionCases } from './reduction'
import { temporalReductionCases } from './symmetry-temporal'
import { temporalCases } from './temporal'
import { translationCases } from './translation'

const json = process.argv.includes('--json')
const quick = process.argv.includes('--quick')
const root = new URL('../', import.meta.url)

const parse = parseCases()
const baseline = hashBaseline()
const cases = exploreCases()
const product = productCases(root)
const temporal = temporalCases()
const translation = translationCases()
const reduction = reductionCases()
const temporalReduction = temporalReductionCases()
const induction = await inductionCases(quick ? 10 : 60)
const parallel = await parallelCases()

const transitionsPerSecond = (c: { transitions: number; seconds: number }) => c.transitions / c.seconds
const best = Math.max(...cases.map(transitionsPerSecond))
const report = {
  cases,
  baseline,
  ratio: { transitionsPerSecondOverInsertsPerSecond: best / baseline.insertsPerSecond },
  parse,
  product,
  temporal,
  translation,
  reduction,
  temporalReduction,
  induction,
  parallel,
}

if (json) {
  process.stdout.write(JSON.stringify(report, null, 2) + '\n')
} else {
  const f = (x: number) => (x >= 100 ? Math.round(x).toLocaleString('en-US') : x.toFixed(2))
  console.log('Exploration (distinct transitions per second, bytes per stored state)')
  for (const c of cases) {
    console.log(`  ${c.name.padEnd(48)} N=${c.processes}  ${f(c.states).padStart(10)} states  ${f(c.transitions).padStart(11)} transitions  ${c.seconds.toFixed(2)} s  ${f(transitionsPerSecond(c)).padStart(11)}/s  ${c.bytesPerState.toFixed(1)} B/state`)
  }
  console.log(`  baseline: ${baseline.name}: ${f(baseline.insertsPerSecond)} inserts/s (${baseline.keyWords} words per key)`)
  console.log(`  best ratio transitions/s : inserts/s = ${report.ratio.transitionsPerSecondOverInsertsPerSecond.toFixed(3)} (target >= 0.5)`)
  console.log('Temporal product (product states per second, against plain exploration)')
  for (const p of product) {
    console.log(`  ${p.name.padEnd(48)} N=${p.processes}  ${f(p.states).padStart(9)} states ${f(p.statesPerSecond).padStart(10)}/s   ${f(p.productStates).padStart(9)} product states ${f(p.productStatesPerSecond).padStart(10)}/s  holds=${p.holds}`)
  }
  console.log('Translation of the negated property (pipeline against the tableau alone, same budget; - = over budget)')
  for (const t of translation) {
    const n = (x: number | null) => (x === null ? '-' : f(x))
    console.log(`  ${t.name.padEnd(48)} ${n(t.states).padStart(7)} states ${n(t.transitions).padStart(9)} transitions ${f(t.work).padStart(10)} work ${t.seconds.toFixed(2)} s   tableau alone: ${n(t.baselineStates).padStart(7)} states ${f(t.baselineWork).padStart(10)} work ${t.baselineSeconds.toFixed(2)} s`)
  }
  console.log('Temporal rows against the invariant row of the same instance (goal: at most 2x; B = bytes per reachable state)')
  for (const t of temporal) {
    console.log(`  ${t.name.padEnd(48)} N=${t.processes} ${t.mode.padEnd(9)} ${f(t.states).padStart(9)} states ${f(t.productNodes).padStart(9)} product nodes  ${t.temporalSeconds.toFixed(2)} s = ${t.overInvariant.toFixed(2)}x invariant (${t.invariantSeconds.toFixed(2)} s)  product ${f(t.productNodesPerSecond)}/s vs explore ${f(t.statesPerSecond)}/s  ${t.temporalBytesPerState.toFixed(0)} B temporal, ${t.storeBytesPerState.toFixed(0)} B store`)
  }
  console.log('Symmetry reduction against unreduced search (goal: speedup above 1)')
  for (const c of reduction) {
    console.log(`  ${c.name.padEnd(48)} N=${c.processes}  ${f(c.representatives).padStart(9)} representatives for ${f(c.orbitTotal)} of ${f(c.states)} states  ${c.reducedSeconds.toFixed(2)} s against ${c.unreducedSeconds.toFixed(2)} s = ${c.speedup.toFixed(2)}x`)
  }
  console.log('Temporal rows under symmetry reduction (annotated quotient) against unreduced (goal: speedup above 1)')
  for (const c of temporalReduction) {
    console.log(`  ${c.name.padEnd(48)} N=${c.processes} ${c.fixed} fixed  ${f(c.representatives).padStart(9)} representatives for ${f(c.orbitTotal)} of ${f(c.states)} states  ${f(c.productNodes)} vs ${f(c.unreducedProductNodes)} product nodes  holds=${c.holds}  ${c.reducedSeconds.toFixed(2)} s against ${c.unreducedSeconds.toFixed(2)} s = ${c.speedup.toFixed(2)}x`)
  }
  console.log('Parallel exploration (states per second; median of rounds run in turns; goal: two workers at least 1.6x one)')
  for (const c of parallel) {
    console.log(`  ${c.name.padEnd(48)} N=${c.processes}  ${f(c.states).padStart(9)} states  sequential ${c.sequentialSeconds.toFixed(2)} s  ${c.rounds} rounds  (${c.cores} cores, load ${c.loadAverage.map((x) => x.toFixed(1)).join(' ')} at ${c.measuredAt})`)
    for (const r of c.runs) console.log(`    ${String(r.workers).padStart(3)} worker${r.workers === 1 ? ' ' : 's'}  ${r.seconds.toFixed(2)} s  ${f(r.statesPerSecond).padStart(10)} states/s  ${r.speedup.toFixed(2)}x one worker (rounds ${r.speedupRange[0].toFixed(2)}-${r.speedupRange[1].toFixed(2)})  ${r.overSequential.toFixed(2)}x sequential`)
  }
  console.log('Parse and check')
  for (const pc of parse.cases) console.log(`  ${pc.name}: ${pc.lines} lines in ${pc.seconds.toFixed(3)} s = ${f(pc.linesPerSecond)} lines/s (${pc.diagnostics} diagnostics)`)
  console.log(`  baseline: ${parse.baseline.name}: ${f(parse.baseline.linesPerSecond)} lines/s`)
  const b = induction.budget
  console.log(`Induction against exploration (lanterns, two-index invariant calm and fresh, ${b} s per size; Z3 loaded in ${induction.solverLoadSeconds.toFixed(2)} s and a first untimed proof at N=2 in ${induction.warmupSeconds.toFixed(2)} s before timing)`)
  for (const r of induction.rows) console.log(`  ${r.engine.padEnd(12)} N=${r.processes}  ${r.outcome.padEnd(12)} ${r.seconds.toFixed(2)} s${r.states !== undefined ? `  ${f(r.states)} states` : ''}`)
  const cap = induction.largestInduction === induction.maxProcesses ? ` (every size the kernel compiles, up to ${induction.maxProcesses})` : ''
  console.log(`  largest N within ${b} s: induction ${induction.largestInduction}${cap}, exploration ${induction.largestExploration} (goal: induction >= 6 where exploration stops at 3)`)
}
