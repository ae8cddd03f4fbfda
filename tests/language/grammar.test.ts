// The committed parser is generated output: this test regenerates it from the grammar and fails
// when they differ, so the editor and the kernel can never parse with a stale parser.
import { readFileSync } from 'node:fs'
import { buildParserFile } from '@lezer/generator'
import { describe, expect, test } from 'vitest'
import { parser } from '../../kernels/language/parser.js'

const dir = new URL('../../kernels/language/', import.meta.url)

describe('grammar', () => {
  test('the committed parser and terms are what the grammar generates (run `npm run grammar` if not)', () => {
    const grammar = readFileSync(new URL('twofold.grammar', dir), 'utf8')
    const built = buildParserFile(grammar, { fileName: 'kernels/language/twofold.grammar', moduleStyle: 'es' })
    expect(readFileSync(new URL('parser.js', dir), 'utf8')).toBe(built.parser)
    expect(readFileSync(new URL('parser.terms.js', dir), 'utf8')).toBe(built.terms)
  })

  test('precedence follows the language contract: prefix operators bind looser than comparisons', () => {
    const text = 'property x = eventually always p.round = 0'
    const tree = parser.parse(text)
    const shapes: string[] = []
    tree.iterate({ enter: (n) => { if (n.name === 'PrefixExpression' || n.name === 'BinaryExpression') shapes.push(`${n.name}:${text.slice(n.from, n.to)}`) } })
    expect(shapes).toEqual([
      'PrefixExpression:eventually always p.round = 0',
      'PrefixExpression:always p.round = 0',
      'BinaryExpression:p.round = 0',
    ])
  })

  test('and binds tighter than implies, which needs no parentheses', () => {
    const text = 'property x = correct(p) and faulty(q) implies eventually always p.suspect[q]'
    const top = parser.parse(text).topNode.firstChild!.lastChild!
    expect(top.name).toBe('BinaryExpression')
    expect(text.slice(top.firstChild!.from, top.firstChild!.to)).toBe('correct(p) and faulty(q)')
  })

  test('a range type followed by an initial value reads as type then value', () => {
    const text = 'protocol a { state w[peer]: 1..cap = patience }'
    const tree = parser.parse(text)
    let range = ''
    tree.iterate({ enter: (n) => { if (n.name === 'RangeType') range = text.slice(n.from, n.to) } })
    expect(range).toBe('1..cap')
  })
})
