// `--shard auto`: the shard a job runs, read from the environment its batch system gives it, so one
// job definition (a Kubernetes Indexed Job, a Slurm job array, a CI job with parallel copies) runs
// every shard without templating I/N into each copy.
//
// What each system sets, as documented by its maintainers:
// - Kubernetes Indexed Jobs set JOB_COMPLETION_INDEX (0-based) in every pod; the Job's completion
//   count is not in the pod's environment, so it comes from `--shards N` or TWOFOLD_SHARDS, which
//   the manifest sets to the same number as `spec.completions`.
// - Slurm job arrays set SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_COUNT, SLURM_ARRAY_TASK_MIN,
//   SLURM_ARRAY_TASK_MAX and SLURM_ARRAY_TASK_STEP (`--array=1-3` gives ids 1, 2, 3).
// - CI systems with parallel copies of one job (GitLab's `parallel:`) set CI_NODE_INDEX (1-based)
//   and CI_NODE_TOTAL.
import type { Shard } from '../../kernels/record/record'
import { ShardError } from '../../kernels/record/shard'

/** The environment variables as the process sees them (unset variables are absent or undefined). */
export type Environment = Readonly<Record<string, string | undefined>>

/** The variable a Kubernetes manifest sets to the Job's `spec.completions` (ours: Kubernetes sets none). */
export const SHARD_COUNT_VARIABLE = 'TWOFOLD_SHARDS'

/** A shard found in the environment, with the batch system and variables it came from (for messages). */
export interface ScheduledShard extends Shard {
  system: string
  source: string
}

const LOOKED_FOR =
  `JOB_COMPLETION_INDEX (Kubernetes Indexed Job, with --shards N or ${SHARD_COUNT_VARIABLE}), ` +
  'SLURM_ARRAY_TASK_ID and SLURM_ARRAY_TASK_COUNT (Slurm job array), or CI_NODE_INDEX and CI_NODE_TOTAL (parallel CI jobs)'

/** Parses `--shards N` (a whole number, at least 1); a bad value is a one-line `ShardError` naming the option. */
export function parseShardCount(text: string): number {
  if (!/^\s*\d+\s*$/.test(text) || Number(text) < 1) throw new ShardError(`--shards takes a whole number of shards, at least 1, not "${text}"`)
  return Number(text)
}

/** A non-negative integer read from `name`, or undefined when unset; anything else is a one-line error. */
function whole(env: Environment, name: string): number | undefined {
  const raw = env[name]
  if (raw === undefined || raw === '') return undefined
  if (!/^\s*\d+\s*$/.test(raw)) throw new ShardError(`--shard auto: ${name}=${raw} is not a whole number`)
  return Number(raw)
}

function kubernetes(env: Environment, shards: number | undefined): ScheduledShard | undefined {
  const index = whole(env, 'JOB_COMPLETION_INDEX')
  if (index === undefined) return undefined
  const declared = whole(env, SHARD_COUNT_VARIABLE)
  if (shards !== undefined && declared !== undefined && shards !== declared)
    throw new ShardError(`--shards ${shards} disagrees with ${SHARD_COUNT_VARIABLE}=${declared} in the environment`)
  const count = shards ?? declared
  if (count === undefined)
    throw new ShardError(`--shard auto: JOB_COMPLETION_INDEX=${index} is set but the shard count is not: give --shards N (the Job's completions) or set ${SHARD_COUNT_VARIABLE}`)
  if (count < 1) throw new ShardError(`--shard auto: ${SHARD_COUNT_VARIABLE}=${count} must be at least 1`)
  if (index >= count)
    throw new ShardError(`--shard auto: JOB_COMPLETION_INDEX=${index} is out of range for ${count} shards (0..${count - 1}); ${shards !== undefined ? '--shards' : SHARD_COUNT_VARIABLE} must equal the Job's completions`)
  return { index: index + 1, count, system: 'Kubernetes Indexed Job', source: `JOB_COMPLETION_INDEX=${index}` }
}

function slurm(env: Environment): ScheduledShard | undefined {
  const id = whole(env, 'SLURM_ARRAY_TASK_ID')
  if (id === undefined) return undefined
  const count = whole(env, 'SLURM_ARRAY_TASK_COUNT')
  if (count === undefined || count < 1)
    throw new ShardError(`--shard auto: SLURM_ARRAY_TASK_ID=${id} is set but SLURM_ARRAY_TASK_COUNT is not a positive count`)
  const min = whole(env, 'SLURM_ARRAY_TASK_MIN') ?? 0
  const step = whole(env, 'SLURM_ARRAY_TASK_STEP') ?? 1
  const max = whole(env, 'SLURM_ARRAY_TASK_MAX')
  if (step < 1) throw new ShardError(`--shard auto: SLURM_ARRAY_TASK_STEP=${step} must be at least 1`)
  // A shard index must be a position in an evenly stepped range: an array such as `--array=1,4,9`
  // has ids that are not, and its count alone cannot say which shard an id is.
  if (max !== undefined && (max - min) / step + 1 !== count)
    throw new ShardError(`--shard auto: the Slurm array ${min}-${max}:${step} does not hold SLURM_ARRAY_TASK_COUNT=${count} evenly stepped tasks; submit it as a range (--array=1-${count})`)
  const offset = id - min
  if (offset < 0 || offset % step !== 0 || offset / step >= count)
    throw new ShardError(`--shard auto: SLURM_ARRAY_TASK_ID=${id} is out of range for the array from SLURM_ARRAY_TASK_MIN=${min} with step ${step} and SLURM_ARRAY_TASK_COUNT=${count}`)
  return { index: offset / step + 1, count, system: 'Slurm job array', source: `SLURM_ARRAY_TASK_ID=${id}` }
}

function ciNodes(env: Environment): ScheduledShard | undefined {
  const index = whole(env, 'CI_NODE_INDEX')
  const total = whole(env, 'CI_NODE_TOTAL')
  if (index === undefined && total === undefined) return undefined
  if (index === undefined || total === undefined)
    throw new ShardError(`--shard auto: ${index === undefined ? 'CI_NODE_TOTAL' : 'CI_NODE_INDEX'} is set without ${index === undefined ? 'CI_NODE_INDEX' : 'CI_NODE_TOTAL'}`)
  if (total < 1 || index < 1 || index > total)
    throw new ShardError(`--shard auto: CI_NODE_INDEX=${index} is out of range for CI_NODE_TOTAL=${total} (1..${total})`)
  return { index, count: total, system: 'parallel CI job', source: `CI_NODE_INDEX=${index}` }
}

/**
 * The shard of `--shard auto`, from the batch system's variables in `env`. `shards` is `--shards N`:
 * required on Kubernetes (unless TWOFOLD_SHARDS is set), and elsewhere checked against the
 * environment's count. A missing, malformed or inconsistent environment, two systems that disagree,
 * or an index out of range is a one-line `ShardError` naming the variables.
 */
export function shardFromEnvironment(env: Environment, shards?: number): ScheduledShard {
  const found = [kubernetes(env, shards), slurm(env), ciNodes(env)].filter((s): s is ScheduledShard => s !== undefined)
  if (found.length === 0) throw new ShardError(`--shard auto: no batch system's shard variables are set; looked for ${LOOKED_FOR}`)
  const [first, ...rest] = found
  for (const other of rest)
    if (other.index !== first.index || other.count !== first.count)
      throw new ShardError(`--shard auto: the environment names two different shards, ${first.index}/${first.count} (${first.source}) and ${other.index}/${other.count} (${other.source}); unset one`)
  if (shards !== undefined && shards !== first.count)
    throw new ShardError(`--shards ${shards} disagrees with the ${first.system}'s ${first.count} shards (${first.source})`)
  return first
}
