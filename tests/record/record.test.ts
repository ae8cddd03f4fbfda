import { createHash } from 'node:crypto'
import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { KERNEL_VERSION, RECORD_FORMAT, buildRecord, hashBlocks } from '../../kernels/record/record'
import { harbourModel, harbourText, report } from './synthetic'

const nodeSha = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex')
const created = new Date('2026-03-01T08:00:00Z')

describe('buildRecord', () => {
  it('carries the report fields unchanged and adds the format', async () => {
    const r = report()
    const record = await buildRecord(r, harbourText, harbourModel, { created })
    expect(record.format).toEqual({ name: 'twofold-record', version: 2 })
    expect(RECORD_FORMAT.name).toBe('twofold-record')
    expect(record.checks).toEqual(r.checks)
    expect(record.errors).toEqual([])
    expect(record.notebook.path).toBe('notebooks/harbour.md')
  })

  it('embeds the notebook text, so the record is all a reviewer needs', async () => {
    const record = await buildRecord(report(), harbourText, harbourModel, { created })
    expect(record.notebook.text).toBe(harbourText)
    expect(nodeSha(record.notebook.text)).toBe(record.notebook.sha256)
  })

  it('hashes the notebook text with SHA-256', async () => {
    // Oracle: node:crypto, not the Web Crypto path the record uses.
    const record = await buildRecord(report(), harbourText, harbourModel, { created })
    expect(record.notebook.sha256).toBe(nodeSha(harbourText))
  })

  it('names the kernel version from package.json', async () => {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8'))
    const record = await buildRecord(report(), harbourText, harbourModel, { created })
    expect(record.kernel).toEqual({ name: 'twofold', version: pkg.version })
    expect(KERNEL_VERSION).toBe(pkg.version)
  })

  it('records --only, --shard and each check limit', async () => {
    const record = await buildRecord(report((i) => i % 3 === 1), harbourText, harbourModel, {
      only: 'idle',
      shard: { index: 2, count: 3 },
      created,
    })
    // Oracle: `only: idle` keeps the 4 rows of idle (reach 1..4); shard 2/3 of rows 0..3 is rows 1 (r mod 3 = 1).
    expect(record.options).toEqual({ only: 'idle', shard: { index: 2, count: 3, indices: [1] }, limits: [null] })
    expect(record.plan.rows).toBe(4)
    const plain = await buildRecord(report(), harbourText, harbourModel, { created })
    expect(plain.options).toEqual({ only: null, shard: null, limits: [null] })
    expect(plain.plan.rows).toBe(8)
    expect(plain.plan.sha256).not.toBe(record.plan.sha256)
  })

  it('writes the creation time in ISO 8601 UTC', async () => {
    const record = await buildRecord(report(), harbourText, harbourModel, { created })
    expect(record.created).toBe('2026-03-01T08:00:00.000Z')
  })

  it('orders rows by plan index whatever order the report lists them in', async () => {
    const shuffled = report()
    shuffled.checks.reverse()
    const record = await buildRecord(shuffled, harbourText, harbourModel, { created })
    expect(record.checks.map((r) => r.row)).toEqual([0, 1, 2, 3, 4, 5, 6, 7])
  })

  it('shares nothing with the report it was built from', async () => {
    const r = report()
    const record = await buildRecord(r, harbourText, harbourModel, { created })
    r.checks[0].verdict = 'violated'
    expect(record.checks[0].verdict).toBe('holds')
  })

  it('refuses a report whose notebook hash is not the text given', async () => {
    const r = report()
    r.notebook.sha256 = nodeSha('a different notebook')
    await expect(buildRecord(r, harbourText, harbourModel, { created })).rejects.toThrow(/not for the text given/)
  })
})

describe('hashBlocks', () => {
  it('hashes each formal block with its kind, name and line', async () => {
    const blocks = await hashBlocks(harbourModel)
    expect(blocks).toEqual(
      harbourModel.blocks.map((b, i) => ({
        kind: b.kind,
        name: ['cranes', 'idle, calm', 'cranes'][i],
        line: b.line,
        sha256: nodeSha(b.text),
      })),
    )
  })
})
