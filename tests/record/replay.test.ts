import { describe, expect, it } from 'vitest'
import { canonicalJsonPretty } from '../../kernels/base/canonical'
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
    expect(diffs.map((d) => formatDifference(d))).toEqual(['checks[3].verdict: record says holds, now violated'])
  })

  it('reports each changed field separately, in a deep path', async () => {
    const now = report()
    now.checks[5] = row(5, { states: 99, cutoff: { ...row(5).cutoff, passed: ['1'] } })
    const diffs = compareRecords(await recordOf(), await recordOf(now)).map((d) => formatDifference(d))
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

describe('formatDifference', () => {
  it('shows both types when they differ', () => {
    expect(formatDifference({ path: 'checks[0].states', recorded: '63', fresh: 63 })).toBe('checks[0].states: record says "63" (string), now 63 (number)')
  })

  it('cuts a huge value and says how long it was', () => {
    const line = formatDifference({ path: 'checks[0].note', recorded: 'x'.repeat(5_000_000), fresh: 'short' })
    expect(line.length).toBeLessThan(400)
    expect(line).toContain('(5000000 characters in all)')
  })

  it('names the block of a changed block hash: kind, name and line', async () => {
    const record = await recordOf()
    const line = formatDifference({ path: 'blocks[1].sha256', recorded: '0'.repeat(64), fresh: record.blocks[1].sha256 }, record)
    expect(line).toMatch(/^blocks\[1\]\.sha256 \(property block "idle, calm" at line 14\): record says 0{64}, now [0-9a-f]{64}$/)
  })
})

describe('parseRecord', () => {
  const canonical = async () => canonicalJsonPretty(await recordOf()) + '\n'

  it('reads back a record as written', async () => {
    const record = await recordOf()
    expect(await parseRecord(canonicalJsonPretty(record) + '\n')).toEqual(record)
  })

  it('refuses a truncated record with a one-line message', async () => {
    const text = await canonical()
    const cut = parseRecord(text.slice(0, text.length / 2))
    await expect(cut).rejects.toThrow(RecordError)
    await expect(parseRecord(text.slice(0, text.length / 2))).rejects.toThrow(/^not valid JSON \(truncated or damaged\): [^\n]* at line \d+, column \d+$/)
  })

  it('refuses JSON that is not a record, naming the field and both types', async () => {
    await expect(parseRecord('{"checks": []}')).rejects.toThrow(/format is missing/)
    const record = JSON.parse(await canonical())
    record.checks[1].verdict = 7
    await expect(parseRecord(canonicalJsonPretty(record) + '\n')).rejects.toThrow('not a twofold record: checks[1].verdict should be one of "holds", "violated", "inconclusive", "error", not number 7')
    record.checks[1].verdict = 'holds'
    record.checks[2].seconds = 'yesterday'
    await expect(parseRecord(canonicalJsonPretty(record) + '\n')).rejects.toThrow('checks[2].seconds should be a number, not the string "yesterday"')
    delete record.notebook.sha256
    await expect(parseRecord(canonicalJsonPretty(record) + '\n')).rejects.toThrow(/notebook\.sha256 is missing/)
  })

  it('refuses a duplicate key, naming it and where it is', async () => {
    const text = (await canonical()).replace('"verdict": "holds"\n', '"verdict": "holds", "verdict": "violated"\n')
    await expect(parseRecord(text)).rejects.toThrow(/^not a trustworthy record: duplicate key "verdict" at line \d+, column \d+$/)
  })

  it('refuses rows out of plan order', async () => {
    const record = JSON.parse(await canonical())
    ;[record.checks[0], record.checks[1]] = [record.checks[1], record.checks[0]]
    await expect(parseRecord(canonicalJsonPretty(record) + '\n')).rejects.toThrow('checks[1] (row 0) comes after row 1')
  })

  it('refuses a layout that is not canonical, naming the first difference', async () => {
    const record = await recordOf()
    await expect(parseRecord(JSON.stringify(record))).rejects.toThrow(/^not in canonical form .*: first difference at line 1, column 2, where "\\n  \\"blocks/)
    await expect(parseRecord(canonicalJsonPretty(record))).rejects.toThrow(/where the end of the file belongs|"\\n" belongs/)
  })

  it('refuses an embedded notebook that does not hash as the record says', async () => {
    const record = JSON.parse(await canonical())
    record.notebook.text += 'edited'
    await expect(parseRecord(canonicalJsonPretty(record) + '\n')).rejects.toThrow(/notebook\.text does not hash to notebook\.sha256/)
  })

  it('refuses a shard whose planned indices were edited', async () => {
    const record = JSON.parse(canonicalJsonPretty(await buildRecord(report((i) => i % 2 === 0), harbourText, harbourModel, { shard: { index: 1, count: 2 } })))
    record.options.shard.indices.pop()
    await expect(parseRecord(canonicalJsonPretty(record) + '\n')).rejects.toThrow(/options\.shard\.indices should list/)
  })

  it('refuses a format version it does not read', async () => {
    const record = JSON.parse(await canonical())
    record.format.version = 1
    await expect(parseRecord(canonicalJsonPretty(record) + '\n')).rejects.toThrow(/version 1 is not one this kernel reads/)
  })

  it('refuses an empty file', async () => {
    await expect(parseRecord('  \n')).rejects.toThrow('the file is empty')
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

  it('replays the embedded notebook when none is given', async () => {
    const texts: string[] = []
    const { kernel } = scripted()
    const spy: RecordKernel = { ...kernel, runNotebook: (text, path, options) => { texts.push(text); return kernel.runNotebook(text, path, options) } }
    const outcome = await replayRecord(await recordOf(), undefined, spy)
    expect(texts).toEqual([harbourText])
    expect(outcome.kind === 'compared' && outcome.differences).toEqual([])
  })

  it('runs again with the record\'s own path and options', async () => {
    const { kernel, calls } = scripted(report((i) => i % 2 === 0))
    const record = await buildRecord(report((i) => i % 2 === 0), harbourText, harbourModel, { only: 'idle', shard: { index: 1, count: 2 } })
    const outcome = await replayRecord(record, harbourText, kernel)
    expect(calls).toEqual([{ path: 'notebooks/harbour.md', only: 'idle', shard: { index: 1, count: 2 } }])
    expect(outcome.kind === 'compared' && outcome.differences).toEqual([])
  })
})
