// Generated input of hostile shape (issue 10, items 14, 16 and 17): deep nesting, long enums and
// mixed line endings. Each generator knows the answer by construction: how deep its spine nests
// and where it passes MAX_NESTING, which label sits at which position, and what the same notebook
// with LF endings reports. Modest run counts, so the suite stays part of `npm test`.
import { readdirSync, readFileSync } from 'node:fs'
import fc from 'fast-check'
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { MAX_NESTING } from '../../kernels/language/limits'
import { LineMap } from '../../kernels/language/positions'

/**
 * A nesting spine, outside in. Each wrapper adds counted levels (limits.ts: parentheses,
 * operators, calls, `if`, `for`, ...) and says where each level's construct starts in its text,
 * so the generator knows the offset of the construct at every depth. No sibling of the spine
 * nests, so the spine decides the depth.
 */
interface Piece { text: string; levels: number[] }

type ExprWrap = 'paren' | 'min' | 'neg' | 'plus' | 'times'
type StmtWrap = 'if' | 'else' | 'for'
type PropWrap = 'paren' | 'not' | 'always' | 'eventually' | 'and' | 'or'

/** Wraps `inner` (its levels relative to its start) in `open` ... `close`; `starts` are offsets of the new levels in `open`. */
function wrap(open: string, inner: Piece, close: string, starts: number[]): Piece {
  return { text: open + inner.text + close, levels: [...starts, ...inner.levels.map((l) => l + open.length)] }
}

function exprPiece(ws: ExprWrap[]): Piece {
  let p: Piece = { text: 'x', levels: [] }
  for (let k = ws.length - 1; k >= 0; k--) {
    switch (ws[k]) {
      case 'paren': p = wrap('(', p, ')', [0]); break
      case 'min': p = wrap('min(', p, ', 3)', [0]); break
      case 'neg': p = wrap('-(', p, ')', [0, 1]); break
      // `(1 + E)`: the parenthesis, then the sum, which starts at its left operand.
      case 'plus': p = wrap('(1 + ', p, ')', [0, 1]); break
      case 'times': p = wrap('(', p, ' * 1)', [0, 1]); break
    }
  }
  return p
}

function stmtPiece(ws: StmtWrap[], body: Piece): Piece {
  let p = body
  for (let k = ws.length - 1; k >= 0; k--) {
    switch (ws[k]) {
      case 'if': p = wrap('if b { ', p, ' }', [0]); break
      case 'else': p = wrap('if b { skip } else { ', p, ' }', [0, 13]); break
      case 'for': p = wrap(`for q${k} { `, p, ' }', [0]); break
    }
  }
  return p
}

function propPiece(ws: PropWrap[]): Piece {
  let p: Piece = { text: 'p.b', levels: [] }
  for (let k = ws.length - 1; k >= 0; k--) {
    switch (ws[k]) {
      case 'paren': p = wrap('(', p, ')', [0]); break
      case 'not': p = wrap('not (', p, ')', [0, 4]); break
      case 'always': p = wrap('always (', p, ')', [0, 7]); break
      case 'eventually': p = wrap('eventually (', p, ')', [0, 11]); break
      case 'and': p = wrap('(', p, ' and p.b)', [0, 1]); break
      case 'or': p = wrap('(p.b or ', p, ')', [0, 1]); break
    }
  }
  // `forall p:` is the outermost level.
  return wrap('forall p: ', p, '', [0])
}

const deepNotebook = (stmt: Piece, prop: Piece) => {
  const head = '# Deep orchard\n\n```protocol\nprotocol deep {\n  timing asynchronous\n  state x: 0..3 = 0\n  state b: bool = false\n  step { '
  const mid = ' }\n}\n```\n\n```property\nproperty calm = '
  const text = head + stmt.text + mid + prop.text + '\n```\n\n```check\ncheck deep: calm at N = 1\n```\n'
  return { text, stmtAt: head.length, propAt: head.length + stmt.text.length + mid.length }
}

/** Depths: mostly around the limit, some far past it (where the parser itself gives up). */
const depth = fc.oneof(
  { weight: 3, arbitrary: fc.integer({ min: MAX_NESTING - 8, max: MAX_NESTING + 8 }) },
  { weight: 1, arbitrary: fc.integer({ min: 1, max: MAX_NESTING }) },
  { weight: 1, arbitrary: fc.integer({ min: MAX_NESTING, max: 1500 }) },
)

describe('generated deep nesting', () => {
  test('within the limit no error; past it one error, at the construct that passes it', () => {
    let deep = 0, shallow = 0
    fc.assert(
      fc.property(
        depth, depth,
        fc.array(fc.constantFrom<StmtWrap>('if', 'else', 'for'), { maxLength: 60 }),
        fc.infiniteStream(fc.constantFrom<ExprWrap>('paren', 'min', 'neg', 'plus', 'times')),
        fc.infiniteStream(fc.constantFrom<PropWrap>('paren', 'not', 'always', 'eventually', 'and', 'or')),
        (stmtDepth, propDepth, stmts, exprs, props) => {
          // Statement wrappers first, then expression wrappers until the spine has stmtDepth
          // levels (and the property's spine propDepth).
          const stmtLevels = stmts.reduce((n, w) => n + (w === 'else' ? 2 : 1), 0)
          const ews: ExprWrap[] = []
          for (let n = stmtLevels, it = exprs[Symbol.iterator](); n < stmtDepth;) {
            const w = it.next().value as ExprWrap
            ews.push(w)
            n += w === 'paren' || w === 'min' ? 1 : 2
          }
          const stmt = stmtPiece(stmts, wrap('x := ', exprPiece(ews), '', []))
          const pws: PropWrap[] = []
          for (let n = 1, it = props[Symbol.iterator](); n < propDepth;) {
            const w = it.next().value as PropWrap
            pws.push(w)
            n += w === 'paren' ? 1 : 2
          }
          const prop = propPiece(pws)
          const { text, stmtAt, propAt } = deepNotebook(stmt, prop)
          const lines = new LineMap(text)
          const expected: [number, number][] = []
          if (stmt.levels.length > MAX_NESTING) { const at = lines.position(stmtAt + stmt.levels[MAX_NESTING]); expected.push([at.line, at.column]) }
          if (prop.levels.length > MAX_NESTING) { const at = lines.position(propAt + prop.levels[MAX_NESTING]); expected.push([at.line, at.column]) }
          const errs = analyzeNotebook(text).diagnostics.filter((d) => d.severity === 'error')
          expect(errs.map((d) => [d.line, d.column]), text.length < 2000 ? text : `${stmt.levels.length}/${prop.levels.length} levels`).toEqual(expected)
          for (const d of errs) expect(d.message).toMatch(new RegExp(`nests more than ${MAX_NESTING} levels deep here`))
          if (expected.length) deep++
          else shallow++
        },
      ),
      { numRuns: 80, seed: 20261202 },
    )
    // Both sides of the limit are exercised.
    expect(deep).toBeGreaterThan(15)
    expect(shallow).toBeGreaterThan(10)
  })
})

describe('generated long enums', () => {
  test('every label resolves to its position; a repeated label is one error at its second place', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 5000 }), fc.nat(), fc.nat(), fc.option(fc.nat(), { freq: 3 }),
        (n, a, b, dup) => {
          // Labels of mixed shapes, all distinct: bays, berths and piers of a harbour.
          const labels = Array.from({ length: n }, (_, i) => ['bay', 'berth_', 'Pier'][i % 3] + i.toString(36))
          const set = labels[a % n], watched = labels[b % n]
          const listed = dup === null ? labels : [...labels.slice(0, (dup % n) + 1), labels[dup % n], ...labels.slice((dup % n) + 1)]
          const decl = `  state dock: {${listed.join(', ')}} = ${labels[0]}\n`
          const text = '```protocol\nprotocol harbour {\n  timing asynchronous\n' + decl +
            `  state spare: {${labels.join(', ')}} = ${labels[n - 1]}\n  step { dock := ${set}  spare := dock }\n}\n\`\`\`\n\n` +
            `\`\`\`property\nproperty moored = forall p: always p.dock != ${watched} or p.spare = ${watched}\n\`\`\`\n`
          const m = analyzeNotebook(text)
          const errs = m.diagnostics.filter((d) => d.severity === 'error')
          if (dup !== null) {
            // The second copy comes right after the first, inside the declaration of `dock`.
            const d = dup % n
            const first = text.indexOf(decl) + '  state dock: {'.length + listed.slice(0, d + 1).join(', ').length + 2
            const at = new LineMap(text).position(first)
            expect(errs.map((d) => [d.line, d.column, d.message])).toEqual([
              [at.line, at.column, `enum label \`${labels[d]}\` appears twice in \`dock\`; remove one`],
            ])
            return
          }
          expect(errs).toEqual([])
          const p = m.protocols[0]
          const [dock, spare] = p.vars
          expect(dock.type.k === 'enum' && [...dock.type.labels]).toEqual(labels)
          // Equal enums are one: the checker shares their labels.
          expect(dock.type.k === 'enum' && spare.type.k === 'enum' && dock.type.labels === spare.type.labels).toBe(true)
          const step = p.step[0]
          expect(step.k === 'assign' && step.value.k === 'lit' && step.value.value).toBe(a % n)
        },
      ),
      { numRuns: 40, seed: 20261203 },
    )
  })
})

const dir = new URL('../../notebooks/', import.meta.url)
const seeds = readdirSync(dir).filter((f) => f.endsWith('.md')).map((f) => readFileSync(new URL(f, dir), 'utf8').replace(/\r\n?/g, '\n'))

describe('generated mixed line endings', () => {
  test('any mix of LF, CR and CRLF reads as the LF notebook: same blocks, models and diagnostic positions', () => {
    fc.assert(
      fc.property(fc.nat(seeds.length - 1), fc.infiniteStream(fc.constantFrom('\n', '\r', '\r\n')), fc.nat(), (s, eols, cut) => {
        // A seed, cut at a line so that some notebooks end inside a block (errors to compare).
        const all = seeds[s].split('\n')
        const lines = cut % 3 === 0 ? all.slice(0, 1 + (cut % all.length)) : all
        const lf = lines.join('\n')
        const it = eols[Symbol.iterator]()
        let text = ''
        for (let i = 0; i < lines.length; i++) {
          text += lines[i]
          if (i === lines.length - 1) break
          let eol = it.next().value as string
          // A CR right before an empty line ending in LF would make one CRLF of two endings.
          if (eol === '\r' && lines[i + 1] === '' && i + 1 < lines.length - 1) eol = '\r\n'
          text += eol
        }
        const a = analyzeNotebook(lf), b = analyzeNotebook(text)
        expect(b.title).toBe(a.title)
        expect(b.blocks.map((x) => [x.kind, x.line, x.text.replace(/\r\n?/g, '\n')])).toEqual(a.blocks.map((x) => [x.kind, x.line, x.text]))
        expect(b.protocols.map((p) => [p.name, p.vars.length, p.messages.length, p.span.line, p.span.column]))
          .toEqual(a.protocols.map((p) => [p.name, p.vars.length, p.messages.length, p.span.line, p.span.column]))
        expect(b.checks.map((c) => [c.span.line, c.properties.map((p) => p.name)])).toEqual(a.checks.map((c) => [c.span.line, c.properties.map((p) => p.name)]))
        expect(b.diagnostics.map((d) => [d.line, d.column, d.endLine, d.endColumn, d.severity, d.message]))
          .toEqual(a.diagnostics.map((d) => [d.line, d.column, d.endLine, d.endColumn, d.severity, d.message]))
      }),
      { numRuns: 60, seed: 20261204 },
    )
  })
})
