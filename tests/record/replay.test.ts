import { describe, expect, it } from 'vitest'
import { canonicalJsonPretty } from '../../kernels/record/canonical'
import { buildRecord, type VerificationRecord } from '../../kernels/record/record'
import { RecordError, compareRecords, formatDifference, parseRecord, replayRecord } from '../../kernels/record/replay'
import type { RecordKernel } from '../../kernels/record/kernel'
import { harbourModel, harbourText, report, row } from './synthetic'

const at = (iso: string) => ({ created: new Date(iso) })
const recordOf = (r = report(), when = '2026-03-01T08:00:00Z') => buildRecord(r, harbourText, harbourModel, at(when))

describe('compareRecords', () => {
  it('finds nothing between runs that differ only in times', async () => {
    const slower = report()
    for (const c of slower.checks) c.seconds *= 7
    expect(compareRecords(await recordOf(), await recordOf(slower, '2027-01-01T00:00:00Z'))).toEqual([])
  })

  it('names a changed verdict by its path, with both values', async () => {
    const now = report()
    now.checks[3] = row(3, { verdict: 'violated' })
    const diffs = compareRecords(await recordOf(), await recordOf(now))
    expect(diffs.map(formatDifference)).toEqual(['checks[3].verdict: record says holds, now violated'])
  })

  it('reports each changed field separately, in a deep path', async () => {
    const now = report()
    now.checks[5] = row(5, { states: 99, cutoff: { ...row(5).cutoff, passed: ['1'] } })
    const diffs = compareRecords(await recordOf(), await recordOf(now)).map(formatDifference)
    expect(diffs).toEqual(['checks[5].cutoff.passed[1]: record says 2, now nothing', 'checks[5].states: record says 15, now 99'])
  })

  it('reports a missing row once rather than shifting every later row', async () => {
    const diffs = compareRecords(await recordOf(), await recordOf(report((i) => i !== 2)))
    expect(diffs).toHaveLength(1)
    expect(diffs[0].path).toBe('checks[2]')
    expect(diffs[0].fresh).toBeUndefined()
  })

  it('compares provenance too: kernel version, options and block hashes', async () => {
    const old = await recordOf()
    const tampered: VerificationRecord = { ...old, kernel: { name: 'twofold', version: '0.0.1' }, blocks: old.blocks.map((b, i) => (i === 1 ? { ...b, sha256: '0'.repeat(64) } : b)) }
    const paths = compareRecords(tampered, await recordOf()).map((d) => d.path)
    expect(paths).toEqual(['blocks[1].sha256', 'kernel.version'])
  })
})

describe('parseRecord', () => {
  it('reads back a record as written', async () => {
    const record = await recordOf()
    expect(parseRecord(canonicalJsonPretty(record))).toEqual(record)
  })

  it('refuses a truncated record with a one-line message', async () => {
    const text = canonicalJsonPretty(await recordOf())
    const cut = () => parseRecord(text.slice(0, text.length / 2))
    expect(cut).toThrow(RecordError)
    expect(cut).toThrow(/^not valid JSON \(truncated or damaged\)/)
    try {
      cut()
    } catch (e) {
      expect((e as Error).message).not.toContain('\n')
    }
  })

  it('refuses JSON that is not a record, naming the field', async () => {
    expect(() => parseRecord('{"checks": []}')).toThrow(/format/)
    const record = JSON.parse(canonicalJsonPretty(await recordOf()))
    record.checks[1].verdict = 7
    expect(() => parseRecord(JSON.stringify(record))).toThrow('not a twofold record: checks[1].verdict should be a string')
    delete record.notebook.sha256
    expect(() => parseRecord(JSON.stringify(record))).toThrow(/notebook\.sha256/)
  })

  it('refuses a format version it does not read', async () => {
    const record = JSON.parse(canonicalJsonPretty(await recordOf()))
    record.format.version = 2
    expect(() => parseRecord(JSON.stringify(record))).toThrow(/version 2/)
  })

  it('refuses an empty file', () => {
    expect(() => parseRecord('  \n')).toThrow('the file is empty')
  })
})

describe('replayRecord', () => {
  /** A scripted kernel that answers with a fixed report; it records the options it was run with. */
  const scripted = (r = report()) => {
    const calls: unknown[] = []
    const kernel: RecordKernel = {
      analyzeNotebook: () => harbourModel,
      runNotebook: async (_text, path, options) => {
        calls.push({ path, only: options.only, shard: options.shard })
        return { ...r, notebook: { ...r.notebook, path } }
      },
    }
    return { kernel, calls }
  }

  it('refuses to run on a notebook whose hash differs', async () => {
    const { kernel, calls } = scripted()
    const outcome = await replayRecord(await recordOf(), harbourText + '\nA new paragraph.\n', kernel)
    expect(outcome.kind).toBe('notebook-changed')
    expect(calls).toEqual([])
  })

  it('runs again with the record\'s own path and options', async () => {
    const { kernel, calls } = scripted(report((i) => i % 2 === 0))
    const record = await buildRecord(report((i) => i % 2 === 0), harbourText, harbourModel, { only: 'idle', shard: { index: 1, count: 2 } })
    const outcome = await replayRecord(record, harbourText, kernel)
    expect(calls).toEqual([{ path: 'notebooks/harbour.md', only: 'idle', shard: { index: 1, count: 2 } }])
    expect(outcome.kind === 'compared' && outcome.differences).toEqual([])
  })
})
