// `twofold check NOTEBOOK.md`: run every check of a notebook, print the table (or the JSON report),
// optionally write a verification record, and answer with the exit code CI acts on.
import { canonicalJsonPretty } from '../../kernels/record/canonical'
import type { RecordKernel } from '../../kernels/record/kernel'
import { buildRecord } from '../../kernels/record/record'
import { ShardError, parseShard, type Shard } from '../../kernels/record/shard'
import { planOf } from '../../kernels/plan'
import { OutputError, refuseInputAsOutput } from './atomic'
import { REFUSED, checkExitCode } from './exit'
import { CliFailure, readInput, writeOutput, type CliIo } from './io'
import { progressLine } from './progress'
import { diagnosticLine, renderReport } from './table'

/** The options of `twofold check`, as commander parses them. */
export interface CheckFlags {
  json?: boolean
  record?: string
  only?: string
  shard?: string
}

/** Runs `twofold check` and returns its exit code. The kernel is loaded only once the inputs are known to be usable. */
export async function runCheck(io: CliIo, loadKernel: () => Promise<RecordKernel>, path: string, flags: CheckFlags): Promise<number> {
  let shard: Shard | undefined
  try {
    shard = flags.shard === undefined ? undefined : parseShard(flags.shard)
  } catch (e) {
    if (e instanceof ShardError) throw new CliFailure(e.message, REFUSED)
    throw e
  }
  if (flags.record !== undefined) {
    try {
      refuseInputAsOutput(io.cwd, flags.record, [path], 'record')
    } catch (e) {
      if (e instanceof OutputError) throw new CliFailure(e.message, REFUSED)
      throw e
    }
  }
  const text = await readInput(io, path, 'notebook', REFUSED)
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

  const progress = progressLine(io)
  let report
  try {
    report = await kernel.runNotebook(text, path, { only: flags.only, shard, onProgress: (p) => progress.report(p) })
  } finally {
    progress.clear()
  }

  if (flags.record !== undefined) {
    const record = await buildRecord(report, text, model, { only: flags.only ?? null, shard: shard ?? null })
    await writeOutput(io, flags.record, canonicalJsonPretty(record) + '\n', 'record', REFUSED)
  }

  if (flags.json) {
    io.stdout(JSON.stringify(report, null, 2) + '\n')
  } else {
    for (const e of report.errors) io.stderr(diagnosticLine(path, e.line, e.column, e.message) + '\n')
    for (const d of model.diagnostics)
      if (d.severity === 'warning') io.stderr(diagnosticLine(path, d.line, d.column, `warning: ${d.message}`) + '\n')
    io.stdout(renderReport(report))
    if (flags.record !== undefined) io.stdout(`record written to ${flags.record}\n`)
  }
  return checkExitCode(report)
}
