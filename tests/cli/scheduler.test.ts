// `--shard auto`: the shard from each batch system's variables, set here as the system would set
// them (values from each system's documentation: Kubernetes Indexed Jobs give JOB_COMPLETION_INDEX
// from 0; a Slurm `--array=1-3` gives SLURM_ARRAY_TASK_ID 1..3 with SLURM_ARRAY_TASK_MIN=1,
// SLURM_ARRAY_TASK_MAX=3, SLURM_ARRAY_TASK_STEP=1, SLURM_ARRAY_TASK_COUNT=3; GitLab's `parallel: 3`
// gives CI_NODE_INDEX 1..3 and CI_NODE_TOTAL=3).
import { describe, expect, it } from 'vitest'
import { ShardError } from '../../kernels/record/shard'
import { shardFromEnvironment } from '../../src/cli/scheduler'

const shard = (env: Record<string, string>, shards?: number) => {
  const { index, count } = shardFromEnvironment(env, shards)
  return `${index}/${count}`
}
const refusal = (env: Record<string, string>, shards?: number) => {
  try {
    shardFromEnvironment(env, shards)
  } catch (e) {
    expect(e).toBeInstanceOf(ShardError)
    return (e as Error).message
  }
  throw new Error('expected a refusal')
}
const slurm = (id: number, min: number, count: number, step = 1) => ({
  SLURM_ARRAY_TASK_ID: String(id),
  SLURM_ARRAY_TASK_MIN: String(min),
  SLURM_ARRAY_TASK_MAX: String(min + (count - 1) * step),
  SLURM_ARRAY_TASK_STEP: String(step),
  SLURM_ARRAY_TASK_COUNT: String(count),
})

describe('Kubernetes Indexed Jobs', () => {
  it('turns the 0-based completion index into shard index + 1, with the count from --shards', () => {
    expect([0, 1, 2].map((i) => shard({ JOB_COMPLETION_INDEX: String(i) }, 3))).toEqual(['1/3', '2/3', '3/3'])
  })

  it('takes the count from TWOFOLD_SHARDS when the manifest sets it', () => {
    expect(shard({ JOB_COMPLETION_INDEX: '1', TWOFOLD_SHARDS: '4' })).toBe('2/4')
  })

  it('requires the count, since the pod environment does not carry the completions', () => {
    expect(refusal({ JOB_COMPLETION_INDEX: '0' })).toBe('--shard auto: JOB_COMPLETION_INDEX=0 is set but the shard count is not: give --shards N (the Job\'s completions) or set TWOFOLD_SHARDS')
  })

  it('refuses an index out of range and a --shards that disagrees with TWOFOLD_SHARDS', () => {
    expect(refusal({ JOB_COMPLETION_INDEX: '3' }, 3)).toMatch(/^--shard auto: JOB_COMPLETION_INDEX=3 is out of range for 3 shards \(0\.\.2\)/)
    expect(refusal({ JOB_COMPLETION_INDEX: '0', TWOFOLD_SHARDS: '3' }, 2)).toBe('--shards 2 disagrees with TWOFOLD_SHARDS=3 in the environment')
  })
})

describe('Slurm job arrays', () => {
  it('counts from the minimum index, which need not be zero', () => {
    expect([1, 2, 3].map((id) => shard(slurm(id, 1, 3)))).toEqual(['1/3', '2/3', '3/3'])
    expect([0, 1].map((id) => shard(slurm(id, 0, 2)))).toEqual(['1/2', '2/2'])
    expect([10, 11, 12, 13].map((id) => shard(slurm(id, 10, 4)))).toEqual(['1/4', '2/4', '3/4', '4/4'])
  })

  it('follows a stepped range such as --array=0-8:4', () => {
    expect([0, 4, 8].map((id) => shard(slurm(id, 0, 3, 4)))).toEqual(['1/3', '2/3', '3/3'])
  })

  it('defaults the minimum to 0 when SLURM_ARRAY_TASK_MIN is absent', () => {
    expect(shard({ SLURM_ARRAY_TASK_ID: '1', SLURM_ARRAY_TASK_COUNT: '2' })).toBe('2/2')
  })

  it('refuses an array that is not an evenly stepped range, and a task id outside it', () => {
    // --array=1,4,9: min 1, max 9, count 3.
    expect(refusal({ SLURM_ARRAY_TASK_ID: '4', SLURM_ARRAY_TASK_MIN: '1', SLURM_ARRAY_TASK_MAX: '9', SLURM_ARRAY_TASK_COUNT: '3' })).toMatch(/does not hold SLURM_ARRAY_TASK_COUNT=3 evenly stepped tasks/)
    expect(refusal({ SLURM_ARRAY_TASK_ID: '0', SLURM_ARRAY_TASK_MIN: '1', SLURM_ARRAY_TASK_COUNT: '3' })).toMatch(/^--shard auto: SLURM_ARRAY_TASK_ID=0 is out of range/)
    expect(refusal({ SLURM_ARRAY_TASK_ID: '3', SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_COUNT: '3' })).toMatch(/SLURM_ARRAY_TASK_ID=3 is out of range/)
  })

  it('refuses a task id without a count', () => {
    expect(refusal({ SLURM_ARRAY_TASK_ID: '2' })).toMatch(/SLURM_ARRAY_TASK_COUNT is not a positive count/)
  })

  it('refuses a --shards that disagrees with the array', () => {
    expect(refusal(slurm(1, 1, 3), 4)).toBe("--shards 4 disagrees with the Slurm job array's 3 shards (SLURM_ARRAY_TASK_ID=1)")
    expect(shard(slurm(2, 1, 3), 3)).toBe('2/3')
  })
})

describe('parallel CI jobs', () => {
  it('takes the 1-based CI_NODE_INDEX and CI_NODE_TOTAL as they are', () => {
    expect([1, 2, 3].map((i) => shard({ CI_NODE_INDEX: String(i), CI_NODE_TOTAL: '3' }))).toEqual(['1/3', '2/3', '3/3'])
  })

  it('refuses one variable without the other, an index out of range, and a non-number', () => {
    expect(refusal({ CI_NODE_INDEX: '1' })).toBe('--shard auto: CI_NODE_INDEX is set without CI_NODE_TOTAL')
    expect(refusal({ CI_NODE_INDEX: '0', CI_NODE_TOTAL: '3' })).toBe('--shard auto: CI_NODE_INDEX=0 is out of range for CI_NODE_TOTAL=3 (1..3)')
    expect(refusal({ CI_NODE_INDEX: 'two', CI_NODE_TOTAL: '3' })).toBe('--shard auto: CI_NODE_INDEX=two is not a whole number')
  })
})

describe('the environment as a whole', () => {
  it('names every variable it looked for when none is set', () => {
    const message = refusal({ PATH: '/usr/bin' })
    for (const name of ['JOB_COMPLETION_INDEX', 'TWOFOLD_SHARDS', 'SLURM_ARRAY_TASK_ID', 'SLURM_ARRAY_TASK_COUNT', 'CI_NODE_INDEX', 'CI_NODE_TOTAL']) expect(message).toContain(name)
  })

  it('accepts two systems that agree and refuses two that name different shards', () => {
    expect(shard({ ...slurm(2, 1, 3), CI_NODE_INDEX: '2', CI_NODE_TOTAL: '3' })).toBe('2/3')
    expect(refusal({ ...slurm(2, 1, 3), CI_NODE_INDEX: '1', CI_NODE_TOTAL: '3' })).toBe(
      '--shard auto: the environment names two different shards, 2/3 (SLURM_ARRAY_TASK_ID=2) and 1/3 (CI_NODE_INDEX=1); unset one',
    )
  })

  it('treats an empty variable as unset', () => {
    expect(shard({ JOB_COMPLETION_INDEX: '', CI_NODE_INDEX: '3', CI_NODE_TOTAL: '3' })).toBe('3/3')
  })
})
