// Replay: read a record back, run its checks again and say, field by field, what is different.
// Every field is compared except the times (each row's `seconds` and the record's `created`): a
// check that explores the same states must find the same counts, verdicts and counterexamples.
import type { CheckRow, Progress } from '../result'
import { canonicalJson } from './canonical'
import { isSha256Hex, sha256Hex } from './hash'
import type { RecordKernel } from './kernel'
import { RECORD_FORMAT, buildRecord, type VerificationRecord } from './record'

/** A record that cannot be read: malformed, truncated, or of a format this kernel does not know. */
export class RecordError extends Error {
  override name = 'RecordError'
}

/**
 * Parses and validates the text of a record file. Throws a `RecordError` with a one-line message
 * (where the text breaks off, which field is missing or of the wrong type) when it is not a record.
 */
export function parseRecord(text: string): VerificationRecord {
  let value: unknown
  try {
    value = JSON.parse(text)
  } catch (e) {
    const detail = (e as Error).message.split('\n')[0]
    throw new RecordError(text.trim() === '' ? 'the file is empty' : `not valid JSON (truncated or damaged): ${detail}`)
  }
  validateRecord(value)
  return value
}

function validateRecord(value: unknown): asserts value is VerificationRecord {
  const fail = (path: string, expected: string): never => {
    throw new RecordError(`not a twofold record: ${path} should be ${expected}`)
  }
  const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v)
  if (!isObject(value)) fail('the document', 'a JSON object')
  const r = value as Record<string, unknown>
  if (!isObject(r.format)) fail('format', `{"name": "${RECORD_FORMAT.name}", "version": ${RECORD_FORMAT.version}}`)
  const format = r.format as Record<string, unknown>
  if (format.name !== RECORD_FORMAT.name) fail('format.name', `"${RECORD_FORMAT.name}"`)
  if (format.version !== RECORD_FORMAT.version)
    throw new RecordError(`record format version ${JSON.stringify(format.version)} is not one this kernel reads (it reads ${RECORD_FORMAT.version})`)
  if (!isObject(r.kernel) || typeof r.kernel.version !== 'string') fail('kernel.version', 'a string')
  if (!isObject(r.notebook) || typeof r.notebook.path !== 'string') fail('notebook.path', 'a string')
  if (!isSha256Hex((r.notebook as Record<string, unknown>).sha256)) fail('notebook.sha256', '64 lowercase hex digits')
  if (!isObject(r.options)) fail('options', 'an object')
  const options = r.options as Record<string, unknown>
  if (options.only !== null && typeof options.only !== 'string') fail('options.only', 'a string or null')
  if (options.shard !== null) {
    const s = options.shard as Record<string, unknown> | undefined
    if (!isObject(s) || !Number.isInteger(s.index) || !Number.isInteger(s.count) || (s.index as number) < 1 || (s.index as number) > (s.count as number))
      fail('options.shard', 'null or {"index": I, "count": N} with 1 <= I <= N')
  }
  if (!Array.isArray(options.limits)) fail('options.limits', 'an array')
  if (!Array.isArray(r.blocks)) fail('blocks', 'an array')
  ;(r.blocks as unknown[]).forEach((b, i) => {
    if (!isObject(b) || typeof b.kind !== 'string' || !Number.isInteger(b.line) || !isSha256Hex(b.sha256))
      fail(`blocks[${i}]`, 'an object with kind, name, line and sha256')
  })
  if (!Array.isArray(r.errors)) fail('errors', 'an array')
  if (!Array.isArray(r.checks)) fail('checks', 'an array')
  ;(r.checks as unknown[]).forEach((c, i) => {
    if (!isObject(c)) fail(`checks[${i}]`, 'an object')
    const row = c as Record<string, unknown>
    if (!Number.isInteger(row.row)) fail(`checks[${i}].row`, 'an integer')
    if (typeof row.verdict !== 'string') fail(`checks[${i}].verdict`, 'a string')
    if (typeof row.property !== 'string') fail(`checks[${i}].property`, 'a string')
  })
  if (typeof r.created !== 'string') fail('created', 'an ISO 8601 time')
}

/** One compared field whose value differs. `undefined` means the field is absent on that side. */
export interface Difference {
  /** Where, in the record's own terms: `checks[3].verdict`, `blocks[1].sha256`. */
  path: string
  recorded: unknown
  fresh: unknown
}

/** True for the fields replay does not compare: times. */
function isTime(path: string): boolean {
  return path === 'created' || /^checks\[\d+\]\.seconds$/.test(path)
}

/**
 * The differences between a record and a fresh one, every field but times. Rows are paired by
 * their plan index (`row`), so one missing row is reported once instead of shifting every later
 * row; paths use the recorded row's position in `checks`.
 */
export function compareRecords(recorded: VerificationRecord, fresh: VerificationRecord): Difference[] {
  const out: Difference[] = []
  const { checks: recordedChecks, ...recordedRest } = recorded
  const { checks: freshChecks, ...freshRest } = fresh
  diff(recordedRest, freshRest, '', out)
  const freshByRow = new Map<number, CheckRow>()
  for (const row of freshChecks) freshByRow.set(row.row, row)
  const seen = new Set<number>()
  recordedChecks.forEach((row, i) => {
    const path = `checks[${i}]`
    const match = freshByRow.get(row.row)
    if (!match || seen.has(row.row)) out.push({ path, recorded: row, fresh: undefined })
    else diff(comparable(row), comparable(match), path, out)
    seen.add(row.row)
  })
  // A row the record lacks has no position in it: name it by its plan index instead.
  for (const row of freshChecks)
    if (!recordedChecks.some((r) => r.row === row.row)) out.push({ path: `checks[row ${row.row}]`, recorded: undefined, fresh: row })
  return out
}

/**
 * A proof by induction is compared on its verdict, the failing conjunct and whether a
 * counterexample exists, not on the particular state the solver picked (induction.md).
 */
function comparable(row: CheckRow): CheckRow {
  const cx = row.counterexample
  if (row.method !== 'induction' || !cx || cx.kind !== 'induction') return row
  const kept = { kind: cx.kind, property: cx.induction?.property ?? null, conjunct: cx.induction?.conjunct ?? null }
  return { ...row, counterexample: kept as unknown as CheckRow['counterexample'] }
}

function diff(a: unknown, b: unknown, path: string, out: Difference[]): void {
  if (isTime(path)) return
  if (Array.isArray(a) && Array.isArray(b)) {
    const n = Math.max(a.length, b.length)
    for (let i = 0; i < n; i++) diff(a[i], b[i], `${path}[${i}]`, out)
    return
  }
  if (isPlainObject(a) && isPlainObject(b)) {
    const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])].sort()
    for (const key of keys) diff(a[key], b[key], path ? `${path}.${key}` : key, out)
    return
  }
  if (a === undefined && b === undefined) return
  if (a === undefined || b === undefined || canonicalJson(a) !== canonicalJson(b)) out.push({ path, recorded: a, fresh: b })
}

function isPlainObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v)
}

/** One line per difference: `checks[3].verdict: record says holds, now violated`. */
export function formatDifference(d: Difference): string {
  return `${d.path}: record says ${show(d.recorded)}, now ${show(d.fresh)}`
}

function show(value: unknown): string {
  if (value === undefined) return 'nothing'
  if (typeof value === 'string') return value
  const text = canonicalJson(value)
  return text.length > 120 ? text.slice(0, 117) + '...' : text
}

/** The outcome of a replay. */
export type ReplayOutcome =
  /** The notebook is not the one the record was made from: nothing was run. */
  | { kind: 'notebook-changed'; recorded: string; actual: string }
  /** The checks ran again; `differences` is empty when every compared field matches. */
  | { kind: 'compared'; differences: Difference[]; fresh: VerificationRecord }

/**
 * Replays `record` against the notebook `text`: checks the notebook hash, runs the record's checks
 * again with its options (under the record's notebook path, which is part of what is compared),
 * and compares. `onProgress` is passed to the run.
 */
export async function replayRecord(
  record: VerificationRecord,
  text: string,
  kernel: RecordKernel,
  onProgress?: (progress: Progress) => void,
): Promise<ReplayOutcome> {
  const actual = await sha256Hex(text)
  if (actual !== record.notebook.sha256) return { kind: 'notebook-changed', recorded: record.notebook.sha256, actual }
  const model = await kernel.analyzeNotebook(text)
  const only = record.options.only ?? undefined
  const shard = record.options.shard ?? undefined
  const report = await kernel.runNotebook(text, record.notebook.path, { only, shard, onProgress })
  const fresh = await buildRecord(report, text, model, { only, shard })
  return { kind: 'compared', differences: compareRecords(record, fresh), fresh }
}
