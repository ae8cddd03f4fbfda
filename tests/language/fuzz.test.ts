// Generated bad input: thousands of notebooks mutated from the shipped ones (characters deleted,
// tokens inserted, lines duplicated, swapped or cut). Whatever the input, the reader and checker
// never throw, and every diagnostic points inside the input.
import { readdirSync, readFileSync } from 'node:fs'
import fc from 'fast-check'
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { LineMap } from '../../kernels/language/positions'

const dir = new URL('../../notebooks/', import.meta.url)
const seeds = readdirSync(dir).filter((f) => f.endsWith('.md')).map((f) => readFileSync(new URL(f, dir), 'utf8'))

const TOKENS = [
  '{', '}', '(', ')', '[', ']', ':=', '..', ',', ':', '.', '->', '=', '!=', '<', '>=', '+', '-', '*', '/', '%', '#1',
  'if', 'else', 'for', 'on', 'from', 'step', 'state', 'message', 'const', 'timing', 'faults', 'broadcast', 'send',
  'to', 'one of', 'skip', 'always', 'eventually', 'next', 'until', 'unless', 'forall', 'property', 'check',
  'protocol', 'count q:', 'some q:', 'every q:', 'pending(', 'alive(', 'q', 'p', 'x', 'wait', '0', '7', '99999999999999999999',
  '\n', '```', '```protocol\n', '---\n', '$', '$$', '<script>', '\u00e9', '\t', '//',
]

type Mutation = { kind: 0 | 1 | 2 | 3 | 4; at: number; len: number; token: number }

function mutate(text: string, ms: Mutation[]): string {
  let t = text
  for (const m of ms) {
    const at = t.length ? m.at % (t.length + 1) : 0
    switch (m.kind) {
      case 0: t = t.slice(0, at) + t.slice(at + (m.len % 12)); break // delete a few characters
      case 1: t = t.slice(0, at) + ' ' + TOKENS[m.token % TOKENS.length] + ' ' + t.slice(at); break // insert a token
      case 2: { // duplicate a line
        const lines = t.split('\n'); const i = at % lines.length
        lines.splice(i, 0, lines[i]); t = lines.join('\n'); break
      }
      case 3: { // swap two lines
        const lines = t.split('\n'); const i = at % lines.length, j = (at + m.len) % lines.length
        ;[lines[i], lines[j]] = [lines[j], lines[i]]; t = lines.join('\n'); break
      }
      case 4: t = t.slice(0, at); break // truncate
    }
  }
  return t
}

const mutation = fc.record({
  kind: fc.constantFrom<Mutation['kind']>(0, 0, 1, 1, 1, 2, 3, 4),
  at: fc.nat(),
  len: fc.nat(40),
  token: fc.nat(),
})

describe('generated bad input', () => {
  test('5,000 mutated notebooks: no throw, every diagnostic inside the input', () => {
    let runs = 0
    let withErrors = 0
    fc.assert(
      fc.property(fc.nat(seeds.length - 1), fc.array(mutation, { minLength: 1, maxLength: 4 }), (s, ms) => {
        const text = mutate(seeds[s], ms)
        const model = analyzeNotebook(text)
        runs++
        const lines = new LineMap(text)
        for (const d of model.diagnostics) {
          // A failure inside the reader would surface as this internal-failure diagnostic.
          expect(d.message).not.toMatch(/could not be read/)
          expect(d.from).toBeGreaterThanOrEqual(0)
          expect(d.to).toBeLessThanOrEqual(text.length)
          expect(d.from).toBeLessThanOrEqual(d.to)
          expect(d.line).toBeGreaterThanOrEqual(1)
          expect(d.line).toBeLessThanOrEqual(lines.lines)
          expect(d.column).toBeGreaterThanOrEqual(1)
          expect(d.column).toBeLessThanOrEqual(lines.lineEnd(d.line) - lines.lineStart(d.line) + 1)
          expect(d.message).not.toMatch(/\n|\bat .*\.ts:\d+/)
        }
        if (model.diagnostics.some((d) => d.severity === 'error')) withErrors++
      }),
      { numRuns: 5000, seed: 20261201 },
    )
    expect(runs).toBe(5000)
    // The mutator must actually produce bad input most of the time, or the test proves little.
    expect(withErrors).toBeGreaterThan(2500)
  })
})
