// Replay: read a record back, run its checks again and say, field by field, what is different.
// Every field is compared except the times (each row's `seconds` and the record's `created`): a
// check that explores the same states must find the same counts, verdicts and counterexamples.
import type { CheckRow } from '../result'
import type { RunOptions } from '../plan'
import { canonicalJson, canonicalJsonPretty } from '../base/canonical'
import { shardIndices } from '../plan'
import { RECORD_TYPE, typeFault } from './schema'
import { StrictJsonError, lineColumn, parseStrictJson } from './strict-json'
import { sha256Hex } from '../base/hash'
import type { RecordKernel } from './kernel'
import { RECORD_FORMAT, buildRecord, hashBlocks, type BlockHash, type VerificationRecord } from './record'

/** A record that cannot be read: malformed, truncated, or of a format this kernel does not know. */
export class RecordError extends Error {
  override name = 'RecordError'
}

/**
 * Parses and validates the text of a record file. Throws a `RecordError` with a one-line message
 * when it is not a record a reader can trust: not JSON (where it breaks off), a duplicate key, a
 * field of the wrong type, rows out of plan order, an embedded notebook that does not match its
 * hash, or text that is not byte for byte the canonical form (naming the first difference).
 */
export async function parseRecord(text: string): Promise<VerificationRecord> {
  if (text.trim() === '') throw new RecordError('the file is empty')
  let value: unknown
  try {
    value = parseStrictJson(text)
  } catch (e) {
    if (!(e instanceof StrictJsonError)) throw e
    throw new RecordError(/duplicate key/.test(e.message) ? `not a trustworthy record: ${e.message}` : `not valid JSON (truncated or damaged): ${e.message}`)
  }
  const format = (value as { format?: { name?: unknown; version?: unknown } } | null)?.format
  if (format && format.name === RECORD_FORMAT.name && format.version !== RECORD_FORMAT.version)
    throw new RecordError(`record format version ${JSON.stringify(format.version)} is not one this kernel reads (it reads ${RECORD_FORMAT.version})`)
  const fault = typeFault(value, RECORD_TYPE)
  if (fault) throw new RecordError(`not a twofold record: ${fault}`)
  const record = value as VerificationRecord
  checkPlanOrder(record)
  if ((await sha256Hex(record.notebook.text)) !== record.notebook.sha256)
    throw new RecordError('not a trustworthy record: notebook.text does not hash to notebook.sha256 (the embedded notebook or its hash was edited)')
  const canonical = canonicalJsonPretty(record) + '\n'
  if (canonical !== text) {
    let i = 0
    while (i < text.length && text[i] === canonical[i]) i++
    const { line, column } = lineColumn(text, i)
    const expected = i < canonical.length ? JSON.stringify(canonical.slice(i, i + 12)) : 'the end of the file'
    throw new RecordError(`not in canonical form (sorted keys, two-space indentation, one final newline): first difference at line ${line}, column ${column}, where ${expected} belongs; records are compared byte for byte, so write them only with twofold check --record or merge`)
  }
  return record
}

/** Rows in strictly increasing plan order, within the plan, and a shard's list equal to the rows its share selects. */
function checkPlanOrder(record: VerificationRecord): void {
  const { rows } = record.plan
  const shard = record.options.shard
  if (shard) {
    if (shard.count < 1 || shard.index < 1 || shard.index > shard.count) throw new RecordError('not a twofold record: options.shard should have 1 <= index <= count')
    const expected = shardIndices(rows, shard)
    if (canonicalJson(expected) !== canonicalJson(shard.indices))
      throw new RecordError(`not a trustworthy record: options.shard.indices should list the plan rows r < ${rows} with r mod ${shard.count} = ${shard.index - 1}`)
  }
  record.checks.forEach((row, i) => {
    if (row.row >= rows) throw new RecordError(`not a trustworthy record: checks[${i}].row is ${row.row}, outside the plan of ${rows} rows`)
    if (i > 0 && row.row <= record.checks[i - 1].row)
      throw new RecordError(`not a trustworthy record: checks[${i}] (row ${row.row}) comes after row ${record.checks[i - 1].row}; rows are in increasing plan order, each once`)
  })
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

/** Longest value shown in a difference; longer ones are cut, with their full length said. */
const SHOWN = 160

/**
 * One line per difference: `checks[3].verdict: record says holds, now violated`. When the two sides
 * have different types, both are shown as JSON with their type (`record says "63" (string), now 63
 * (number)`); a long value is cut with its full length; a block's field names the block.
 */
export function formatDifference(d: Difference, recorded?: VerificationRecord): string {
  const typed = typeOf(d.recorded) !== typeOf(d.fresh) && d.recorded !== undefined && d.fresh !== undefined
  const side = (v: unknown) => (typed ? `${show(v, true)} (${typeOf(v)})` : show(v, false))
  return `${d.path}${blockLabel(d.path, recorded)}: record says ${side(d.recorded)}, now ${side(d.fresh)}`
}

function typeOf(v: unknown): string {
  if (v === null) return 'null'
  if (Array.isArray(v)) return 'array'
  return typeof v
}

/** ` (property block "steady, dark" at line 21)` for a path into `blocks[i]`, from the record's own entry. */
function blockLabel(path: string, record: VerificationRecord | undefined): string {
  const m = /^blocks\[(\d+)\]/.exec(path)
  const block = m && record ? record.blocks[Number(m[1])] : undefined
  return block ? ` (${describeBlock(block)})` : ''
}

/** `property block "steady, dark" at line 21`. */
export function describeBlock(b: BlockHash): string {
  return `${b.kind} block${b.name ? ` ${JSON.stringify(b.name)}` : ''} at line ${b.line}`
}

function show(value: unknown, quoted: boolean): string {
  if (value === undefined) return 'nothing'
  if (typeof value === 'string') {
    const cut = value.length > SHOWN ? value.slice(0, SHOWN) : value
    const text = quoted || cut !== value ? JSON.stringify(cut) : cut
    return cut === value ? text : `${text}... (${value.length} characters in all)`
  }
  const text = canonicalJson(value)
  return text.length > SHOWN ? `${text.slice(0, SHOWN)}... (${text.length} characters in all)` : text
}

/** The outcome of a replay. */
export type ReplayOutcome =
  /** The notebook is not the one the record was made from: nothing was run. `blocks` says which formal blocks changed. */
  | { kind: 'notebook-changed'; recorded: string; actual: string; blocks: string[] }
  /** The checks ran again; `differences` is empty when every compared field matches. */
  | { kind: 'compared'; differences: Difference[]; fresh: VerificationRecord }
  /** The run was stopped (`ReplayRunOptions.shouldStop`): nothing was compared. */
  | { kind: 'stopped' }

/** What a replay passes on to its run: progress, and a stop (Ctrl-C) with the solver waits it listens during. */
export type ReplayRunOptions = Pick<RunOptions, 'onProgress' | 'shouldStop' | 'onWait'>

/**
 * Replays `record`: on `text` when given (a notebook the reviewer holds, which must hash as the
 * record says), else on the notebook text the record embeds. Runs the record's checks again with
 * its options (under the record's notebook path, which is information and never opened) and
 * compares. `run` is passed to the run; a run stopped by it is `stopped`, compared with nothing.
 */
export async function replayRecord(
  record: VerificationRecord,
  text: string | undefined,
  kernel: RecordKernel,
  run: ReplayRunOptions = {},
): Promise<ReplayOutcome> {
  const notebook = text ?? record.notebook.text
  const actual = await sha256Hex(notebook)
  const model = await kernel.analyzeNotebook(notebook)
  if (actual !== record.notebook.sha256) return { kind: 'notebook-changed', recorded: record.notebook.sha256, actual, blocks: changedBlocks(record.blocks, await hashBlocks(model)) }
  const only = record.options.only ?? undefined
  const shard = record.options.shard ? { index: record.options.shard.index, count: record.options.shard.count } : undefined
  const report = await kernel.runNotebook(notebook, record.notebook.path, { only, shard, ...run })
  if (run.shouldStop?.()) return { kind: 'stopped' }
  const fresh = await buildRecord(report, notebook, model, { only, shard })
  return { kind: 'compared', differences: compareRecords(record, fresh), fresh }
}

/** Each formal block whose hash differs, or that one side lacks, described by kind, name and line. */
function changedBlocks(recorded: BlockHash[], now: BlockHash[]): string[] {
  const out: string[] = []
  for (let i = 0; i < Math.max(recorded.length, now.length); i++) {
    const r = recorded[i], n = now[i]
    if (r && n && r.sha256 === n.sha256 && r.kind === n.kind) continue
    if (r && n) out.push(`${describeBlock(r)} (now ${describeBlock(n)}): sha256 ${r.sha256.slice(0, 12)}... in the record, ${n.sha256.slice(0, 12)}... now`)
    else if (r) out.push(`${describeBlock(r)} is gone`)
    else out.push(`${describeBlock(n)} is new`)
  }
  return out
}
