// `twofold merge A.json B.json ...`: join the records of shards 1/N..N/N into the record of the
// whole run, printed on stdout. Exit 2, with the reason, when they are not the shards of one run.
import { canonicalJsonPretty } from '../../kernels/base/canonical'
import { ShardError, mergeRecords } from '../../kernels/record/shard'
import { HOLDS, REFUSED } from './exit'
import { CliFailure, readRecordFile, type CliIo } from './io'

/** Runs `twofold merge` and returns its exit code. */
export async function runMerge(io: CliIo, paths: string[]): Promise<number> {
  const records = []
  for (const path of paths) records.push(await readRecordFile(io, path))
  let merged
  try {
    merged = mergeRecords(records, paths)
  } catch (e) {
    if (e instanceof ShardError) throw new CliFailure(`cannot merge: ${e.message}`, REFUSED)
    throw e
  }
  io.stdout(canonicalJsonPretty(merged) + '\n')
  return HOLDS
}
