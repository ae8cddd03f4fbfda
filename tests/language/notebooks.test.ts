// Every notebook we ship parses with zero diagnostics (errors and warnings alike): the guide is
// the language's reference, so it must itself be clean.
import { readdirSync, readFileSync } from 'node:fs'
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'

const dir = new URL('../../notebooks/', import.meta.url)
const notebooks = readdirSync(dir).filter((f) => f.endsWith('.md'))

describe('shipped notebooks', () => {
  test('there is a guide and at least two more examples', () => {
    expect(notebooks).toContain('guide.md')
    expect(notebooks.length).toBeGreaterThanOrEqual(3)
  })
  for (const name of notebooks) {
    test(`${name} parses with no diagnostics`, () => {
      const model = analyzeNotebook(readFileSync(new URL(name, dir), 'utf8'))
      expect(model.diagnostics.map((d) => `${d.line}:${d.column} ${d.message}`)).toEqual([])
      expect(model.checks.length).toBeGreaterThan(0)
    })
  }

  test('the guide uses every statement, declaration and check form at least once', () => {
    const text = readFileSync(new URL('guide.md', dir), 'utf8')
    for (const construct of [
      'const ', 'timing synchronous(', 'timing eventually synchronous(', 'timing asynchronous', 'faults crash', 'faults none',
      'message flash', 'message ring(', 'state ', '[peer]', ': bool', '..', '{calm, busy, moored}', '= any',
      'on flash from q', 'on ring(l) from q', 'step {', ' := ', '[q] := ', 'if ', '} else if ', '} else {', 'for q {',
      'broadcast flash', 'broadcast ring(', 'send nod to q', 'one of {', 'one of 0..', 'skip',
      ' + ', ' - ', ' * ', ' / ', ' % ', 'min(', 'max(', ' = ', ' != ', ' < ', ' <= ', ' > ', ' >= ', ' and ', ' or ',
      'not ', ' implies ', 'if level = top then busy else calm', 'count q:', 'some q:', 'every r:',
      'forall p, q:', 'forall p:', 'always', 'eventually', 'next', ' until ', ' unless ', ' iff ', 'alive(', 'crashed(',
      'correct(', 'faulty(', 'pending(', '#1', 'at N = 2..3', 'at N = 2', 'at N = 1', 'with delay in 1..2',
      'patience = 1', 'within 100000 states',
    ]) {
      expect(text, construct).toContain(construct)
    }
  })
})
