// `twofold replay RECORD.json [NOTEBOOK.md]`: a reviewer's re-run of a record. Exit 0 when every
// compared field matches, 1 with the differences field by field, 2 when the notebook is not the one
// the record was made from or the record cannot be trusted, 130 when Ctrl-C stopped it while the
// solver worked (nothing is compared then; see interrupt.ts). Without a notebook argument the record's
// embedded notebook is replayed: no path written inside a record is ever opened.
import type { RecordKernel } from '../../kernels/record/kernel'
import { formatDifference, replayRecord } from '../../kernels/record/replay'
import { HOLDS, INTERRUPTED, REFUSED, VIOLATED } from './exit'
import { interruptOnCtrlC } from './interrupt'
import { readInput, readRecordFile, type CliIo } from './io'
import { progressLine } from './progress'

/** Runs `twofold replay` and returns its exit code. The kernel is loaded only once the record and notebook are read. */
export async function runReplay(io: CliIo, loadKernel: () => Promise<RecordKernel>, recordPath: string, notebookPath?: string): Promise<number> {
  const record = await readRecordFile(io, recordPath)
  const text = notebookPath === undefined ? undefined : await readInput(io, notebookPath, 'notebook', REFUSED)
  const kernel = await loadKernel()

  const progress = progressLine(io)
  const ctrlC = interruptOnCtrlC(io, 'nothing will be compared')
  let outcome
  try {
    outcome = await replayRecord(record, text, kernel, { onProgress: (p) => progress.report(p), shouldStop: ctrlC.requested, onWait: ctrlC.onWait })
  } finally {
    ctrlC.release()
    progress.clear()
  }
  if (outcome.kind === 'stopped') {
    io.stderr(`twofold: replay interrupted by Ctrl-C: nothing was compared (a replay that did not finish says nothing about ${recordPath})\n`)
    return INTERRUPTED
  }
  if (outcome.kind === 'notebook-changed') {
    const which = outcome.blocks.length ? outcome.blocks.join('; ') : 'no formal block changed, only the text around them'
    io.stderr(`${notebookPath}: the notebook changed since the record was made (notebook.sha256: record says ${outcome.recorded}, the notebook hashes to ${outcome.actual}; ${which}); nothing was replayed\n`)
    return REFUSED
  }
  const rows = outcome.fresh.checks.length
  const source = notebookPath ?? `the notebook embedded in ${recordPath}`
  if (outcome.differences.length === 0) {
    io.stdout(`replayed ${rows} row${rows === 1 ? '' : 's'} of ${source}: every compared field matches the record\n`)
    return HOLDS
  }
  io.stdout(`replayed ${rows} row${rows === 1 ? '' : 's'} of ${source}: ${outcome.differences.length} field${outcome.differences.length === 1 ? '' : 's'} differ from the record\n`)
  for (const d of outcome.differences) io.stdout(formatDifference(d, record) + '\n')
  return VIOLATED
}
