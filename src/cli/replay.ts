// `twofold replay RECORD.json [NOTEBOOK.md]`: a reviewer's re-run of a record. Exit 0 when every
// compared field matches, 1 with the differences field by field, 2 when the notebook is not the one
// the record was made from or the record cannot be read.
import { existsSync } from 'node:fs'
import { dirname, resolve } from 'node:path'
import type { RecordKernel } from '../../kernels/record/kernel'
import { formatDifference, replayRecord } from '../../kernels/record/replay'
import { HOLDS, REFUSED, VIOLATED } from './exit'
import { readInput, readRecordFile, type CliIo } from './io'
import { progressLine } from './progress'

/** Runs `twofold replay` and returns its exit code. The kernel is loaded only once the record and notebook are read. */
export async function runReplay(io: CliIo, loadKernel: () => Promise<RecordKernel>, recordPath: string, notebookPath?: string): Promise<number> {
  const record = await readRecordFile(io, recordPath)
  // The record names its notebook relative to where it was checked; a reviewer usually replays from
  // the same directory, else the notebook may sit beside the record.
  let path = notebookPath
  if (path === undefined) {
    const fromCwd = resolve(io.cwd, record.notebook.path)
    const besideRecord = resolve(io.cwd, dirname(recordPath), record.notebook.path)
    path = existsSync(fromCwd) || !existsSync(besideRecord) ? record.notebook.path : besideRecord
  }
  const text = await readInput(io, path, 'notebook', REFUSED)
  const kernel = await loadKernel()

  const progress = progressLine(io)
  let outcome
  try {
    outcome = await replayRecord(record, text, kernel, (p) => progress.report(p))
  } finally {
    progress.clear()
  }
  if (outcome.kind === 'notebook-changed') {
    io.stderr(`${path}: the notebook changed since the record was made (notebook.sha256: record says ${outcome.recorded}, the notebook hashes to ${outcome.actual}); nothing was replayed\n`)
    return REFUSED
  }
  const rows = outcome.fresh.checks.length
  if (outcome.differences.length === 0) {
    io.stdout(`replayed ${rows} row${rows === 1 ? '' : 's'} of ${record.notebook.path}: every compared field matches the record\n`)
    return HOLDS
  }
  io.stdout(`replayed ${rows} row${rows === 1 ? '' : 's'} of ${record.notebook.path}: ${outcome.differences.length} field${outcome.differences.length === 1 ? '' : 's'} differ from the record\n`)
  for (const d of outcome.differences) io.stdout(formatDifference(d) + '\n')
  return VIOLATED
}
