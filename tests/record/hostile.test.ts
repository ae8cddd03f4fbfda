// Hostile records (issue 10): duplicate keys, reordered rows, wrong types, non-canonical layout,
// truncation, huge fields, edited hashes and edited paths, generated with fast-check. Whatever the
// record, replay answers with an exit code and short lines, never a throw, and never opens a path
// written inside the record (every file the command line opens is watched).
import { join } from 'node:path'
import fc from 'fast-check'
import { afterAll, describe, expect, it, vi } from 'vitest'
import { canonicalJsonPretty } from '../../kernels/base/canonical'
import type { RecordKernel } from '../../kernels/record/kernel'
import { buildRecord } from '../../kernels/record/record'
import { workspace } from '../cli/harness'
import { main } from '../../src/cli/main'
import { harbourModel, harbourText, report } from './synthetic'

const opened = vi.hoisted(() => [] as string[])
vi.mock('node:fs/promises', async (load) => {
  const real = await load<typeof import('node:fs/promises')>()
  const watch = <F extends (...a: never[]) => unknown>(f: F) => ((...a: Parameters<F>) => { opened.push(String(a[0])); return f(...a) }) as F
  return { ...real, default: real, readFile: watch(real.readFile), open: watch(real.open) }
})
vi.mock('node:fs', async (load) => {
  const real = await load<typeof import('node:fs')>()
  const watch = <F extends (...a: never[]) => unknown>(f: F) => ((...a: Parameters<F>) => { opened.push(String(a[0])); return f(...a) }) as F
  return { ...real, default: real, readFileSync: watch(real.readFileSync), openSync: watch(real.openSync), createReadStream: watch(real.createReadStream), existsSync: watch(real.existsSync) }
})

const ws = workspace({ 'secret.md': 'a private file replay must never read\n' })
afterAll(() => ws.remove())
const traps = [join(ws.dir, 'secret.md'), '/dev/urandom', 'secret.md']

const kernel: RecordKernel = {
  analyzeNotebook: () => harbourModel,
  runNotebook: async (_text, path, options) => {
    const r = report((i) => !options.shard || i % options.shard.count === options.shard.index - 1)
    return { ...r, notebook: { ...r.notebook, path } }
  },
}

type Json = Record<string, unknown>
/** One hostile edit: of the parsed record (then written canonically) or of the text itself. */
const edits = fc.oneof(
  fc.record({ k: fc.constant('type' as const), row: fc.nat(7), field: fc.constantFrom('seconds', 'states', 'verdict', 'complete', 'constants', 'cutoff', 'row'), value: fc.constantFrom<unknown>('yesterday', '63', -1, 1.5, null, true, [], {}) }),
  fc.record({ k: fc.constant('duplicate' as const), field: fc.constantFrom('verdict', 'states', 'sha256', 'path') }),
  fc.record({ k: fc.constant('swap' as const), a: fc.nat(7), b: fc.nat(7) }),
  fc.record({ k: fc.constant('space' as const), at: fc.nat(), what: fc.constantFrom(' ', '\n', '\t', '\r\n') }),
  fc.record({ k: fc.constant('truncate' as const), at: fc.nat() }),
  fc.record({ k: fc.constant('huge' as const), row: fc.nat(7), size: fc.constantFrom(1000, 300_000) }),
  fc.record({ k: fc.constant('hash' as const), which: fc.constantFrom('notebook', 'block', 'plan'), digit: fc.constantFrom('0', 'f') }),
  fc.record({ k: fc.constant('path' as const), to: fc.constantFrom(...traps) }),
  fc.record({ k: fc.constant('result' as const), row: fc.nat(7), states: fc.integer({ min: 0, max: 1000 }) }),
)
type Edit = typeof edits extends fc.Arbitrary<infer T> ? T : never

function apply(text: string, e: Edit): string {
  if (e.k === 'space') { const i = e.at % (text.length + 1); return text.slice(0, i) + e.what + text.slice(i) }
  if (e.k === 'truncate') return text.slice(0, e.at % text.length)
  if (e.k === 'duplicate') return text.replace(new RegExp(`"${e.field}": `), `"${e.field}": "holds", "${e.field}": `)
  let doc: Json
  try {
    doc = JSON.parse(text) as Json
  } catch {
    return text // an earlier edit broke the JSON; structural edits have nothing to edit
  }
  const checks = doc.checks as Json[]
  const write = () => canonicalJsonPretty(doc) + '\n'
  switch (e.k) {
    default: return text
    case 'type': checks[e.row][e.field] = e.value; return write()
    case 'swap': [checks[e.a], checks[e.b]] = [checks[e.b], checks[e.a]]; return write()
    case 'huge': checks[e.row].note = 'x'.repeat(e.size); return write()
    case 'hash': {
      const target = e.which === 'notebook' ? (doc.notebook as Json) : e.which === 'plan' ? (doc.plan as Json) : (doc.blocks as Json[])[0]
      target.sha256 = e.digit.repeat(64)
      return write()
    }
    case 'path': (doc.notebook as Json).path = e.to; return write()
    case 'result': checks[e.row].states = e.states; return write()
  }
}

describe('replay of hostile records', () => {
  it('exits 0, 1 or 2 with short lines, never throws, and never opens a path from the record', async () => {
    const good = canonicalJsonPretty(await buildRecord(report(), harbourText, harbourModel)) + '\n'
    await fc.assert(
      fc.asyncProperty(fc.array(edits, { minLength: 1, maxLength: 3 }), async (list) => {
        // Edits of the text come last, so that a structural edit (which rewrites the JSON) cannot undo them.
        const textual = (e: Edit) => e.k === 'space' || e.k === 'truncate' || e.k === 'duplicate'
        const text = [...list.filter((e) => !textual(e)), ...list.filter(textual)].reduce(apply, good)
        ws.write('r.json', text)
        opened.length = 0
        let out = '', err = ''
        const code = await main(['replay', 'r.json'], { stdout: (s) => void (out += s), stderr: (s) => void (err += s), stderrIsTTY: false, cwd: ws.dir, kernel })
        // The watch works: it saw the record file being read.
        expect(opened.some((p) => p.endsWith('r.json'))).toBe(true)
        expect(opened.filter((p) => traps.some((t) => p.endsWith(t)))).toEqual([])
        expect(err).not.toContain('internal error')
        expect([0, 1, 2]).toContain(code)
        if (code === 2) expect(err.trimEnd().split('\n')).toHaveLength(1)
        for (const line of (out + err).split('\n')) expect(line.length).toBeLessThan(700)
        // Exit 0 or 1 only for a record that is byte for byte canonical; a result edit alone is 1.
        if (code !== 2) expect(text).toBe(canonicalJsonPretty(JSON.parse(text)) + '\n')
        if (text === good) expect(code).toBe(0)
        if (list.every((e) => e.k === 'result') && text !== good) expect(code).toBe(1)
        if (list.some((e) => e.k === 'duplicate' || e.k === 'truncate')) expect(code).toBe(2)
      }),
      { numRuns: 80, seed: 20261202 },
    )
  })
})
