// Where `twofold check` puts its report: the chosen format on stdout, or in `--output FILE`
// (written atomically) with the readable table on stdout; nothing at all with `--quiet`.
import type { NotebookModel } from '../../kernels/language/model'
import { KERNEL_VERSION } from '../../kernels/record/record'
import type { Report } from '../../kernels/result'
import type { CheckOptions, ReportFormat } from './check-options'
import { paintVerdict } from './color'
import { REFUSED } from './exit'
import { writeOutput, type CliIo } from './io'
import { junitReport } from './junit'
import { sarifReport } from './sarif'
import { diagnosticLine, renderReport } from './table'

/** The report in `format`, uncoloured, ending with a newline. */
export function formatReport(format: ReportFormat, report: Report, model: NotebookModel, exitCode: number): string {
  switch (format) {
    case 'table':
      return renderReport(report)
    case 'json':
      return JSON.stringify(report, null, 2) + '\n'
    case 'junit':
      return junitReport(report, KERNEL_VERSION)
    case 'sarif':
      return JSON.stringify(sarifReport(report, model, KERNEL_VERSION, exitCode), null, 2) + '\n'
  }
}

/** The readable form on stdout and stderr: notebook errors and warnings as `file:line:column`, then the table. */
function printTable(io: CliIo, report: Report, model: NotebookModel, path: string, color: boolean): void {
  for (const e of report.errors) io.stderr(diagnosticLine(path, e.line, e.column, e.message) + '\n')
  for (const d of model.diagnostics) if (d.severity === 'warning') io.stderr(diagnosticLine(path, d.line, d.column, `warning: ${d.message}`) + '\n')
  io.stdout(renderReport(report, color ? { paint: paintVerdict } : {}))
}

/** How many threads explored each row (`RunOptions.onExplored`), and how many were asked for. */
export interface ThreadUse { workers: number; rows: Map<number, number> }

/** One line saying which rows used more than one thread, when more were asked for; else null. */
export function threadLine(t: ThreadUse): string | null {
  if (t.workers <= 1 || t.rows.size === 0) return null
  const shared = [...t.rows.values()].filter((w) => w > 1).length
  const alone = t.rows.size - shared
  const rows = (k: number) => `${k} row${k === 1 ? '' : 's'}`
  if (alone === 0) return `explored on ${t.workers} workers: ${rows(shared)}`
  return `explored on ${t.workers} workers: ${rows(shared)}; on one: ${rows(alone)} (symmetry-reduced rows, temporal rows under --recompute-edges, and searches too small to share, explore on one)`
}

/** Prints or writes the report of a finished `twofold check` as `options` say. */
export async function emitReport(io: CliIo, options: CheckOptions, report: Report, model: NotebookModel, exitCode: number, record: string | undefined, threads?: ThreadUse): Promise<void> {
  const path = report.notebook.path
  if (options.output !== undefined) await writeOutput(io, options.output, formatReport(options.format, report, model, exitCode), 'report', REFUSED)
  if (options.quiet) return
  if (options.output === undefined && options.format !== 'table') {
    io.stdout(formatReport(options.format, report, model, exitCode))
    return
  }
  printTable(io, report, model, path, options.color)
  if (threads) { const line = threadLine(threads); if (line) io.stdout(line + '\n') }
  if (record !== undefined) io.stdout(`record written to ${record}\n`)
  if (options.output !== undefined) io.stdout(`report (${options.format}) written to ${options.output}\n`)
}
