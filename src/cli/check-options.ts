// The options of `twofold check` that decide how it runs and where its report goes, checked before
// anything is read or run: each bad value is one line naming the option, and exit code 2.
import { resolve } from 'node:path'
import type { Shard } from '../../kernels/record/record'
import { ShardError, parseShard } from '../../kernels/record/shard'
import { OutputError, refuseInputAsOutput } from './atomic'
import { parseColorMode, useColor } from './color'
import { REFUSED } from './exit'
import { CliFailure, environment, type CliIo } from './io'
import { parseShardCount, shardFromEnvironment } from './scheduler'

/** The report formats of `--format`. */
export const FORMATS = ['table', 'json', 'junit', 'sarif'] as const
/** One of `FORMATS`. */
export type ReportFormat = (typeof FORMATS)[number]

/** The most parallel workers `--workers` accepts. */
export const MAX_WORKERS = 256

/** The flags of `twofold check` that this file resolves, as commander parses them. */
export interface OutputFlags {
  json?: boolean
  format?: string
  record?: string
  shard?: string
  shards?: string
  workers?: string
  recomputeEdges?: boolean
  output?: string
  quiet?: boolean
  color?: string | boolean
}

/** The resolved options: what to run and how to report it. */
export interface CheckOptions {
  shard: Shard | undefined
  workers: number | undefined
  /** Temporal rows keep no fair graph and recompute its rows on demand (less memory, slower). */
  recomputeEdges: boolean
  format: ReportFormat
  output: string | undefined
  quiet: boolean
  /** Whether the table on stdout is coloured. */
  color: boolean
}

const refused = (message: string) => new CliFailure(message, REFUSED)

function format(flags: OutputFlags): ReportFormat {
  const named = flags.format
  if (named === undefined) return flags.json ? 'json' : 'table'
  if (!(FORMATS as readonly string[]).includes(named)) throw refused(`--format takes ${FORMATS.slice(0, -1).join(', ')} or ${FORMATS.at(-1)}, not "${named}"`)
  if (flags.json && named !== 'json') throw refused(`--json is short for --format json and disagrees with --format ${named}; give one of them`)
  return named as ReportFormat
}

function shard(io: CliIo, flags: OutputFlags): Shard | undefined {
  try {
    const count = flags.shards === undefined ? undefined : parseShardCount(flags.shards)
    if (flags.shard?.trim() === 'auto') {
      const { index, count: total } = shardFromEnvironment(environment(io), count)
      return { index, count: total }
    }
    if (count !== undefined) throw new ShardError(`--shards is only used with --shard auto${flags.shard === undefined ? '' : ` (--shard ${flags.shard} names its count)`}`)
    return flags.shard === undefined ? undefined : parseShard(flags.shard)
  } catch (e) {
    if (e instanceof ShardError) throw refused(e.message)
    throw e
  }
}

function workers(flags: OutputFlags): number | undefined {
  if (flags.workers === undefined) return undefined
  const n = /^\s*\d+\s*$/.test(flags.workers) ? Number(flags.workers) : NaN
  if (!(n >= 1 && n <= MAX_WORKERS)) throw refused(`--workers takes a whole number from 1 to ${MAX_WORKERS}, not "${flags.workers}"`)
  return n
}

function output(io: CliIo, notebook: string | undefined, flags: OutputFlags): string | undefined {
  if (flags.output === undefined) return undefined
  try {
    if (notebook !== undefined) refuseInputAsOutput(io.cwd, flags.output, [notebook], 'report')
  } catch (e) {
    if (e instanceof OutputError) throw refused(e.message)
    throw e
  }
  if (flags.record !== undefined && resolve(io.cwd, flags.record) === resolve(io.cwd, flags.output))
    throw refused(`--output ${flags.output} is also the --record file; give the report and the record different files`)
  return flags.output
}

/**
 * Checks and resolves the options of `twofold check`. `notebook` is the notebook's path, undefined
 * when it is read from standard input. Throws a `CliFailure` (exit 2) naming the bad option.
 */
export function resolveCheckOptions(io: CliIo, notebook: string | undefined, flags: OutputFlags): CheckOptions {
  const mode = parseColorMode(flags.color)
  if (mode === undefined) throw refused(`--color takes always, never or auto (as --color=WHEN), not "${String(flags.color)}"`)
  return {
    format: format(flags),
    shard: shard(io, flags),
    workers: workers(flags),
    recomputeEdges: Boolean(flags.recomputeEdges),
    output: output(io, notebook, flags),
    quiet: Boolean(flags.quiet),
    color: useColor(mode, environment(io), Boolean(io.stdoutIsTTY)),
  }
}
