// Shards: a deterministic share of a notebook's row plan, so CI can spread one notebook's checks
// over several machines, and the merge that joins the shards' records back into the record an
// unsharded run would have written.
import { canonicalJson } from '../base/canonical'
import type { Shard, VerificationRecord } from './record'

export type { Shard } from './record'

/** A shard specification or a set of shard records that cannot be used, with a one-line reason. */
export class ShardError extends Error {
  override name = 'ShardError'
}

/** Parses `I/N` (1 <= I <= N, both integers) as given to `--shard`. */
export function parseShard(text: string): Shard {
  const m = /^\s*(\d+)\s*\/\s*(\d+)\s*$/.exec(text)
  if (!m) throw new ShardError(`--shard takes I/N (for example 2/3), not "${text}"`)
  const index = Number(m[1])
  const count = Number(m[2])
  // Beyond 2^53 the digits are rounded, so 99999999999999999999/99999999999999999999 would name some other shard.
  if (!Number.isSafeInteger(index) || !Number.isSafeInteger(count)) throw new ShardError(`--shard ${text}: I and N must be at most ${Number.MAX_SAFE_INTEGER}`)
  if (count < 1 || index < 1 || index > count) throw new ShardError(`--shard ${text}: I must be between 1 and N`)
  return { index, count }
}

/** Whether the row with plan index `row` (0-based) belongs to `shard`: row ≡ index - 1 (mod count). */
export function inShard(row: number, shard: Shard): boolean {
  return row % shard.count === shard.index - 1
}

function listRows(indices: number[]): string {
  if (indices.length === 0) return 'no rows'
  return indices.length <= 6 ? `rows ${indices.join(', ')}` : `rows ${indices.slice(0, 5).join(', ')}, ... (${indices.length} in all)`
}

/**
 * Joins the records of shards 1/N .. N/N of one run into the record of the whole run: rows sorted
 * by plan index, `options.shard` null, `created` the latest of the shards' times. Refuses, with a
 * message naming the culprit, records of different notebooks, kernels, options or plans, a shard
 * given twice or missing, a record that is not a shard, and a shard whose rows are not exactly the
 * rows its plan lists (a gap, a stray or a repeated row).
 * `names` labels the records in messages (file names); positions are used when omitted.
 */
export function mergeRecords(records: VerificationRecord[], names?: string[]): VerificationRecord {
  const label = (i: number) => names?.[i] ?? `record ${i + 1}`
  if (records.length === 0) throw new ShardError('nothing to merge: give the records of every shard')
  const first = records[0]
  const sameAsFirst = (pick: (r: VerificationRecord) => unknown, what: string) => {
    const expected = canonicalJson(pick(first))
    records.forEach((r, i) => {
      if (canonicalJson(pick(r)) !== expected)
        throw new ShardError(`${label(i)} differs from ${label(0)} in ${what}: they are not shards of one run`)
    })
  }
  records.forEach((r, i) => {
    if (!r.options.shard) throw new ShardError(`${label(i)} is not a shard (it was made without --shard)`)
  })
  sameAsFirst((r) => r.format, 'format')
  sameAsFirst((r) => r.notebook.sha256, 'notebook hash (the notebook changed between shards)')
  sameAsFirst((r) => r.notebook.path, 'notebook path')
  sameAsFirst((r) => r.kernel, 'kernel version')
  sameAsFirst((r) => r.options.only, '--only')
  sameAsFirst((r) => r.options.limits, 'state limits')
  sameAsFirst((r) => r.options.shard!.count, 'shard count')
  sameAsFirst((r) => r.blocks, 'block hashes')
  sameAsFirst((r) => r.errors, 'notebook errors')

  const count = first.options.shard!.count
  const byIndex = new Map<number, number>()
  records.forEach((r, i) => {
    const index = r.options.shard!.index
    const earlier = byIndex.get(index)
    if (earlier !== undefined) throw new ShardError(`shard ${index}/${count} is given twice (${label(earlier)} and ${label(i)}): shards overlap`)
    byIndex.set(index, i)
  })
  const missing: string[] = []
  for (let index = 1; index <= count; index++) if (!byIndex.has(index)) missing.push(`${index}/${count}`)
  if (missing.length > 0) throw new ShardError(`shard${missing.length > 1 ? 's' : ''} ${missing.join(', ')} missing: the merge would have a gap`)

  sameAsFirst((r) => r.plan, 'row plan (row count and digest)')
  // Each shard must hold exactly the rows its plan lists: a gap, a stray or a repeat is named.
  const checks = records.flatMap((r, i) => {
    const shard = r.options.shard!
    const planned = new Set(shard.indices)
    const held = new Set<number>()
    for (const row of r.checks) {
      if (held.has(row.row)) throw new ShardError(`${label(i)} holds row ${row.row} twice`)
      if (!planned.has(row.row)) throw new ShardError(`${label(i)} holds row ${row.row}, which shard ${shard.index}/${count} does not plan (it plans ${listRows(shard.indices)}): a stray row`)
      held.add(row.row)
    }
    const gap = shard.indices.find((index) => !held.has(index))
    if (gap !== undefined) throw new ShardError(`${label(i)} lacks row ${gap}, which shard ${shard.index}/${count} plans: the merge would have a gap`)
    return r.checks
  })
  checks.sort((a, b) => a.row - b.row)
  if (checks.length !== first.plan.rows) throw new ShardError(`the shards hold ${checks.length} rows, but the plan has ${first.plan.rows}`)
  const created = records.map((r) => r.created).sort().at(-1)!
  const merged: VerificationRecord = {
    ...first,
    options: { ...first.options, shard: null },
    checks,
    created,
  }
  return JSON.parse(JSON.stringify(merged))
}
