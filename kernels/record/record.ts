// Verification records (records.md): the `--json` report of a run plus what a reviewer needs to
// replay it bit for bit: the format, the kernel version, every option that changes results, a
// SHA-256 of the notebook and of each formal block, and when it was made.
//
// A record is integrity evidence, not a signature: it shows what was checked and lets anyone detect
// a changed notebook or a doctored result by replaying it; it says nothing about who made it.
import pkg from '../../package.json' with { type: 'json' }
import type { BlockRef, NotebookModel } from '../language/model'
import type { CheckRow, ErrorEntry, Report } from '../result'
import { planDigest, planOf, shardIndices } from '../plan'
import { sha256Hex } from '../base/hash'

/** The record format this kernel writes and reads. */
// Version 2: the notebook text is embedded, the plan is stated, a shard lists its planned rows.
export const RECORD_FORMAT = { name: 'twofold-record', version: 2 } as const

/** The version of the kernel that made a record (package.json). */
export const KERNEL_VERSION: string = pkg.version

/** A shard of the row plan: the rows whose plan index is congruent to `index - 1` modulo `count`. */
export interface Shard { index: number; count: number }

/** A shard as a record states it: which share, and the plan indices of the rows it must hold. */
export interface RecordShard extends Shard { indices: number[] }

/** Every option that affects results. `limits` restates each check's `limit` (null: none). */
export interface RecordOptions {
  only: string | null
  shard: RecordShard | null
  /** The solver's name and version, when some row was proved by induction (induction.md). */
  solver?: string
  limits: (number | null)[]
}

/** The row plan a run followed (after `--only`, before `--shard`): its row count and digest (plan.ts). */
export interface RecordPlan { rows: number; sha256: string }

/**
 * The hash of one formal block. `name` is what the block defines: the protocol's name, the
 * properties' names joined by ", ", or for a check block the checked protocols; "" when the block
 * defines nothing the reader recognised.
 */
export interface BlockHash {
  kind: BlockRef['kind']
  name: string
  line: number
  sha256: string
}

/** A verification record: the report fields (`notebook`, `errors`, `checks`) plus provenance. */
export interface VerificationRecord extends Report {
  /** The notebook's path (information only: replay never opens it), hash, and whole text. */
  notebook: { path: string; sha256: string; text: string }
  plan: RecordPlan
  format: { name: 'twofold-record'; version: number }
  kernel: { name: 'twofold'; version: string }
  options: RecordOptions
  blocks: BlockHash[]
  /** Creation time, ISO 8601 in UTC. Not compared on replay. */
  created: string
}

/** How the run that produced a report was asked for. */
export interface BuildOptions {
  only?: string | null
  shard?: Shard | null
  /** Creation time; now when omitted. */
  created?: Date
}

/**
 * Builds the record of `report`, which must be the run of `text` (whose typed model is `model`)
 * under `options`. The rows are ordered by plan index so that records of the same run are equal
 * whatever order the rows were finished in. The record embeds `text`, so a reviewer needs nothing
 * else, and states the plan (row count, digest; a shard also its planned indices). Throws when the report names a different notebook hash.
 */
export async function buildRecord(
  report: Report,
  text: string,
  model: NotebookModel,
  options: BuildOptions = {},
): Promise<VerificationRecord> {
  const sha256 = await sha256Hex(text)
  if (report.notebook.sha256 && report.notebook.sha256 !== sha256)
    throw new Error(`the report is for notebook ${report.notebook.sha256.slice(0, 12)}..., not for the text given (${sha256.slice(0, 12)}...)`)
  // A JSON round trip makes the record plain data that shares nothing with the report.
  const errors: ErrorEntry[] = JSON.parse(JSON.stringify(report.errors))
  const checks: CheckRow[] = JSON.parse(JSON.stringify(report.checks))
  checks.sort((a, b) => a.row - b.row)
  const only = options.only ?? null
  const plan = await planDigest(planOf(model, only ?? undefined))
  const shard = options.shard ?? null
  return {
    format: { ...RECORD_FORMAT },
    kernel: { name: 'twofold', version: KERNEL_VERSION },
    notebook: { path: report.notebook.path, sha256, text },
    plan,
    options: {
      only,
      shard: shard ? { index: shard.index, count: shard.count, indices: shardIndices(plan.rows, shard) } : null,
      limits: model.checks.map((check) => check.limit),
      ...solverOf(checks),
    },
    blocks: await hashBlocks(model),
    errors,
    checks,
    created: (options.created ?? new Date()).toISOString(),
  }
}

function solverOf(checks: CheckRow[]): { solver?: string } {
  const row = checks.find((r) => r.method === 'induction' && r.solver)
  return row ? { solver: row.solver } : {}
}

/** The SHA-256 of each formal block's text, in notebook order, with its kind, name and line. */
export async function hashBlocks(model: NotebookModel): Promise<BlockHash[]> {
  const names = new Map<number, string[]>()
  const add = (block: BlockRef, name: string) => {
    const list = names.get(block.from) ?? []
    if (!list.includes(name)) list.push(name)
    names.set(block.from, list)
  }
  for (const protocol of model.protocols) add(protocol.block, protocol.name)
  for (const property of model.properties) add(property.block, property.name)
  for (const check of model.checks) {
    const protocol = model.protocols[check.protocol]
    if (protocol) add(check.block, protocol.name)
  }
  const hashes: BlockHash[] = []
  for (const block of model.blocks) {
    hashes.push({
      kind: block.kind,
      name: (names.get(block.from) ?? []).join(', '),
      line: block.line,
      sha256: await sha256Hex(block.text),
    })
  }
  return hashes
}
