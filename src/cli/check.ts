// `twofold check NOTEBOOK.md`: run every check of a notebook, print the report (table, JSON, JUnit or SARIF),
// optionally write a verification record, and answer with the exit code CI acts on.
import { cores, useNodePools } from '../../kernels/explore/pool-node'
import { canonicalJsonPretty } from '../../kernels/base/canonical'
import type { RecordKernel } from '../../kernels/record/kernel'
import { buildRecord } from '../../kernels/record/record'
import type { RunOptions } from '../../kernels/api'
import { planOf } from '../../kernels/plan'
import { OutputError, refuseInputAsOutput } from './atomic'
import { resolveCheckOptions, type OutputFlags } from './check-options'
import { INTERRUPTED, REFUSED, checkExitCode } from './exit'
import { interruptOnCtrlC } from './interrupt'
import { CliFailure, STDIN_NAME, readInput, readStdin, writeOutput, type CliIo } from './io'
import { progressLine } from './progress'
import { emitReport } from './report-output'

/** The options of `twofold check`, as commander parses them. */
export interface CheckFlags extends OutputFlags {
  record?: string
  only?: string
}

/** Runs `twofold check` and returns its exit code. The kernel is loaded only once the inputs are known to be usable. */
export async function runCheck(io: CliIo, loadKernel: () => Promise<RecordKernel>, given: string, flags: CheckFlags): Promise<number> {
  // `-` reads the notebook from standard input; reports and records then name it STDIN_NAME.
  const fromStdin = given === '-'
  const options = resolveCheckOptions(io, fromStdin ? undefined : given, flags)
  const { shard } = options
  const path = fromStdin ? STDIN_NAME : given
  if (flags.record !== undefined && !fromStdin) {
    try {
      refuseInputAsOutput(io.cwd, flags.record, [path], 'record')
    } catch (e) {
      if (e instanceof OutputError) throw new CliFailure(e.message, REFUSED)
      throw e
    }
  }
  const text = fromStdin ? await readStdin(io, REFUSED) : await readInput(io, path, 'notebook', REFUSED)
  const kernel = await loadKernel()
  const model = await kernel.analyzeNotebook(text)
  const hasErrors = model.diagnostics.some((d) => d.severity === 'error')
  if (shard && !hasErrors) {
    const rows = planOf(model, flags.only).rows
    if (rows > 0 && shard.index > rows) throw new CliFailure(`--shard ${shard.index}/${shard.count} selects no row: the plan of ${path} has ${rows} row${rows === 1 ? '' : 's'}`, REFUSED)
  }
  if (flags.only !== undefined && !hasErrors) {
    const named = model.checks.some(
      (check) => model.protocols[check.protocol]?.name === flags.only || check.properties.some((p) => p.name === flags.only),
    )
    if (!named) throw new CliFailure(`--only ${flags.only}: no check in ${path} names that protocol or property`, REFUSED)
  }

  const progress = progressLine(options.quiet ? { ...io, stderrIsTTY: false } : io)
  // Invariant and temporal rows explore on `--workers` worker threads (default: every core), the same results
  // as one; the pool starts only when a search has a level wide enough to share.
  useNodePools()
  const ctrlC = interruptOnCtrlC(io)
  const threads = { workers: options.workers ?? cores(), rows: new Map<number, number>() }
  const run: RunOptions = {
    only: flags.only, shard, workers: threads.workers, onProgress: (p) => progress.report(p),
    onExplored: (row, workers) => { threads.rows.set(row, workers) },
    recomputeEdges: options.recomputeEdges || undefined,
    shouldStop: ctrlC.requested, onWait: ctrlC.onWait,
  }
  let report
  try {
    report = await kernel.runNotebook(text, path, run)
  } finally {
    ctrlC.release()
    progress.clear()
  }
  if (ctrlC.requested()) {
    // A stopped run is no evidence of what holds, so it leaves no record.
    await emitReport(io, options, report, model, INTERRUPTED, undefined)
    io.stderr(`twofold: interrupted by Ctrl-C: the report shows what finished${flags.record !== undefined ? `; no record was written to ${flags.record}` : ''}\n`)
    return INTERRUPTED
  }

  if (flags.record !== undefined) {
    const record = await buildRecord(report, text, model, { only: flags.only ?? null, shard: shard ?? null })
    await writeOutput(io, flags.record, canonicalJsonPretty(record) + '\n', 'record', REFUSED)
  }

  const code = checkExitCode(report)
  await emitReport(io, options, report, model, code, flags.record, threads)
  return code
}
