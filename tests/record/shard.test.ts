import { describe, expect, it } from 'vitest'
import { canonicalJson } from '../../kernels/base/canonical'
import { buildRecord, type VerificationRecord } from '../../kernels/record/record'
import { compareRecords } from '../../kernels/record/replay'
import { ShardError, inShard, mergeRecords, parseShard } from '../../kernels/record/shard'
import { harbourModel, harbourText, report, row } from './synthetic'

const shardRecord = (index: number, count: number, when = `2026-03-01T08:0${index}:00Z`) =>
  buildRecord(report((i) => inShard(i, { index, count })), harbourText, harbourModel, { shard: { index, count }, created: new Date(when) })
const withoutTimes = (r: VerificationRecord) => canonicalJson({ ...r, created: null, checks: r.checks.map((c) => ({ ...c, seconds: null })) })

describe('parseShard', () => {
  it('reads I/N', () => {
    expect(parseShard('2/3')).toEqual({ index: 2, count: 3 })
  })

  it('refuses an index outside 1..N or text that is not I/N', () => {
    expect(() => parseShard('0/3')).toThrow(ShardError)
    expect(() => parseShard('4/3')).toThrow(/between 1 and N/)
    expect(() => parseShard('two')).toThrow(/I\/N/)
    expect(() => parseShard('1/0')).toThrow(ShardError)
    // Oracle: 10^20 > 2^53, so the digits cannot be held exactly.
    expect(() => parseShard('99999999999999999999/99999999999999999999')).toThrow(/at most 9007199254740991/)
  })
})

describe('inShard', () => {
  it('puts row r in shard (r mod N) + 1, so the shards partition the plan', () => {
    // Oracle: count membership directly over a plan of 20 rows.
    for (let row = 0; row < 20; row++) {
      const owners = [1, 2, 3].filter((index) => inShard(row, { index, count: 3 }))
      expect(owners).toEqual([(row % 3) + 1])
    }
  })
})

describe('mergeRecords', () => {
  it('joins shards 1/3, 2/3, 3/3 into the unsharded record', async () => {
    const whole = await buildRecord(report(), harbourText, harbourModel, { created: new Date('2026-03-01T08:03:00Z') })
    const merged = mergeRecords([await shardRecord(3, 3), await shardRecord(1, 3), await shardRecord(2, 3)])
    // Oracle: the record an unsharded run writes, compared as canonical text (times included here).
    expect(canonicalJson(merged)).toBe(canonicalJson(whole))
    expect(compareRecords(whole, merged)).toEqual([])
  })

  it('keeps the latest creation time of the shards', async () => {
    const merged = mergeRecords([await shardRecord(1, 2, '2026-03-02T00:00:00Z'), await shardRecord(2, 2, '2026-03-01T00:00:00Z')])
    expect(merged.created).toBe('2026-03-02T00:00:00.000Z')
  })

  it('refuses a gap: a shard that is missing', async () => {
    const records = [await shardRecord(1, 3), await shardRecord(3, 3)]
    expect(() => mergeRecords(records, ['a.json', 'c.json'])).toThrow('shard 2/3 missing: the merge would have a gap')
  })

  it('refuses an empty list of records', () => {
    expect(() => mergeRecords([])).toThrow(/nothing to merge/)
  })

  it('refuses an overlap: a shard given twice', async () => {
    const records = [await shardRecord(1, 2), await shardRecord(2, 2), await shardRecord(2, 2)]
    expect(() => mergeRecords(records, ['a.json', 'b.json', 'b2.json'])).toThrow('shard 2/2 is given twice (b.json and b2.json): shards overlap')
  })

  it('refuses shards of different notebooks', async () => {
    const other = await buildRecord(report((i) => inShard(i, { index: 2, count: 2 })), harbourText + '\n', harbourModel, { shard: { index: 2, count: 2 } })
    const first = await shardRecord(1, 2)
    expect(() => mergeRecords([first, other], ['a.json', 'b.json'])).toThrow(/b\.json differs from a\.json in notebook hash/)
  })

  it('refuses shards run with different options or shard counts', async () => {
    const onlyIdle = await buildRecord(report((i) => inShard(i, { index: 2, count: 2 })), harbourText, harbourModel, { only: 'idle', shard: { index: 2, count: 2 } })
    const first = await shardRecord(1, 2)
    const ofThree = await shardRecord(2, 3)
    expect(() => mergeRecords([first, onlyIdle])).toThrow(/--only/)
    expect(() => mergeRecords([first, ofThree])).toThrow(/shard count/)
  })

  it('refuses a record made without --shard', async () => {
    const whole = await buildRecord(report(), harbourText, harbourModel)
    expect(() => mergeRecords([whole], ['all.json'])).toThrow('all.json is not a shard (it was made without --shard)')
  })

  it('refuses a row filed under the wrong shard', async () => {
    const wrong = await buildRecord(report((i) => i === 0 || i === 1), harbourText, harbourModel, { shard: { index: 1, count: 2 } })
    const second = await shardRecord(2, 2)
    expect(() => mergeRecords([wrong, second], ['a.json', 'b.json'])).toThrow('a.json holds row 1, which shard 1/2 does not plan (it plans rows 0, 2, 4, 6): a stray row')
  })

  it('refuses a shard with a row removed, added or repeated, naming the row', async () => {
    const [a, b] = [await shardRecord(1, 2), await shardRecord(2, 2)]
    const names = ['a.json', 'b.json']
    const removed = { ...b, checks: b.checks.filter((r) => r.row !== 5) }
    expect(() => mergeRecords([a, removed], names)).toThrow('b.json lacks row 5, which shard 2/2 plans: the merge would have a gap')
    const added = { ...b, checks: [...b.checks, row(9)] }
    expect(() => mergeRecords([a, added], names)).toThrow('b.json holds row 9, which shard 2/2 does not plan (it plans rows 1, 3, 5, 7): a stray row')
    const repeated = { ...b, checks: [...b.checks, row(3)] }
    expect(() => mergeRecords([a, repeated], names)).toThrow('b.json holds row 3 twice')
  })

  it('refuses shards of different plans', async () => {
    const [a, b] = [await shardRecord(1, 2), await shardRecord(2, 2)]
    const other = { ...b, plan: { ...b.plan, sha256: '0'.repeat(64) } }
    expect(() => mergeRecords([a, other], ['a.json', 'b.json'])).toThrow('b.json differs from a.json in row plan (row count and digest): they are not shards of one run')
  })

  it('gives a record equal in all but times to the unsharded one for any shard count', async () => {
    const whole = await buildRecord(report(), harbourText, harbourModel)
    for (const count of [1, 2, 5, 8, 11]) {
      const parts = []
      for (let index = 1; index <= count; index++) parts.push(await shardRecord(index, count, '2026-03-01T08:00:00Z'))
      expect(withoutTimes(mergeRecords(parts))).toBe(withoutTimes(whole))
    }
  })
})
