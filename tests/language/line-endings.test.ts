// Line endings: CommonMark ends a line at LF, CR or CRLF alike, so a notebook saved with any of
// them reads the same. Oracle: the LF version of the same notebook (positions by line and column
// must agree, offsets must point at the same characters of each text).
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { LineMap } from '../../kernels/language/positions'

const NOTEBOOK = `---
title: Harbour lights
---
# Harbour lights

\`\`\`protocol
protocol lamp {
  timing synchronous(delay: 1, idle: 1)
  // a comment that must stop at the end of its line
  state lit: bool = false
  step { lit := not lit }
}
\`\`\`

\`\`\`property
property blinks = forall p: eventually p.lit and undefinedThing
\`\`\`

\`\`\`check
check lamp: blinks
\`\`\`
`

const withEndings = (eol: string) => NOTEBOOK.replace(/\n/g, eol)

describe('line endings', () => {
  const lf = analyzeNotebook(withEndings('\n'))

  it('the LF notebook has one located error (the unknown name) and reads its title', () => {
    expect(lf.title).toBe('Harbour lights')
    expect(lf.protocols.map((p) => p.name)).toEqual(['lamp'])
    expect(lf.diagnostics.filter((d) => d.severity === 'error').map((d) => [d.line, d.column])).toEqual([[16, 50]])
  })

  for (const [name, eol] of [['CR', '\r'], ['CRLF', '\r\n']] as const) {
    it(`${name} line endings give the same blocks, model and diagnostic positions as LF`, () => {
      const text = withEndings(eol)
      const m = analyzeNotebook(text)
      expect(m.title).toBe(lf.title)
      expect(m.protocols.map((p) => p.name)).toEqual(['lamp'])
      expect(m.blocks.map((b) => [b.kind, b.line])).toEqual(lf.blocks.map((b) => [b.kind, b.line]))
      expect(m.blocks.map((b) => b.text.replace(/\r\n?/g, '\n'))).toEqual(lf.blocks.map((b) => b.text))
      expect(m.diagnostics.map((d) => [d.line, d.column, d.endLine, d.endColumn, d.message]))
        .toEqual(lf.diagnostics.map((d) => [d.line, d.column, d.endLine, d.endColumn, d.message]))
      for (const d of m.diagnostics) expect(text.slice(d.from, d.to)).toBe('undefinedThing')
    })
  }

  it('LineMap counts LF, CR and CRLF as one line ending each, and columns restart after each', () => {
    const map = new LineMap('a\rbc\r\nd\ne')
    expect(map.lines).toBe(4)
    expect([1, 2, 3, 4].map((l) => [map.lineStart(l), map.lineEnd(l)])).toEqual([[0, 1], [2, 4], [6, 7], [8, 9]])
    expect(map.position(3)).toEqual({ line: 2, column: 2 })
    expect(map.position(6)).toEqual({ line: 3, column: 1 })
  })
})
