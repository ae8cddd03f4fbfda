// Segments, titles and structural edits are pure functions of the notebook text. Oracles: the
// tiling invariant (segments concatenate back to the text) and hand-read expectations on short
// fixtures.
import { describe, expect, it } from 'vitest'
import { contentOf, deleteBlock, insertBlock, lineAt, moveBlock, newBlockText, offsetOf, replaceContent, segment } from '../../src/app/segments'
import { titleOf, withTitle } from '../../src/app/title'
import { analyzeNotebook } from '../../kernels/api'

const harbour = [
  '---',
  'title: Harbour lights',
  '---',
  '',
  '# Lights',
  '',
  'Each lighthouse blinks.',
  '',
  '```protocol',
  'protocol lights {',
  '  timing asynchronous',
  '}',
  '```',
  '',
  '## Claims',
  '',
  '```property',
  'property calm = forall p: always alive(p)',
  '```',
  '',
  '```check',
  'check lights: calm',
  '```',
  '',
].join('\n')

function tiles(text: string) {
  const segs = segment(text)
  expect(segs[0].from).toBe(0)
  for (let i = 1; i < segs.length; i++) expect(segs[i].from).toBe(segs[i - 1].to)
  expect(segs[segs.length - 1].to).toBe(text.length)
  return segs
}

describe('segment', () => {
  it('tiles the text with front matter, prose sections and formal blocks', () => {
    expect(tiles(harbour).map((s) => s.kind)).toEqual(['front', 'prose', 'protocol', 'prose', 'property', 'check'])
  })
  it('gives a formal block its lines between the fences as content', () => {
    const p = segment(harbour)[2]
    expect(contentOf(harbour, p)).toBe('protocol lights {\n  timing asynchronous\n}\n')
  })
  it('treats other fences as prose', () => {
    const text = '# A\n\n```js\nx\n```\n'
    expect(tiles(text).map((s) => s.kind)).toEqual(['prose'])
  })
  it('runs an unclosed formal fence to the end', () => {
    const text = 'Intro.\n\n```check\ncheck a: b\n'
    const segs = tiles(text)
    expect(segs.map((s) => s.kind)).toEqual(['prose', 'check'])
    expect(contentOf(text, segs[1])).toBe('check a: b\n')
  })
  it('gives an empty text one prose segment', () => {
    expect(segment('')).toEqual([{ kind: 'prose', from: 0, to: 0, contentFrom: 0, contentTo: 0 }])
  })
})

describe('block edits', () => {
  it('replaces a block body and nothing else', () => {
    const seg = segment(harbour)[5]
    const next = replaceContent(harbour, seg, 'check lights: calm at N = 2\n')
    expect(next).toBe(harbour.replace('check lights: calm\n', 'check lights: calm at N = 2\n'))
  })
  it('inserts a new block before another one', () => {
    const next = insertBlock(harbour, 2, 'property')
    expect(tiles(next).map((s) => s.kind)).toEqual(['front', 'prose', 'property', 'protocol', 'prose', 'property', 'check'])
  })
  it('appends a new prose section at the end', () => {
    const next = insertBlock(harbour, 99, 'prose')
    expect(tiles(next).map((s) => s.kind).at(-1)).toBe('prose')
    expect(next.startsWith(harbour)).toBe(true)
  })
  it('starts a new check from the names the blocks declare, not from words in prose or comments', () => {
    const text = 'protocol words in prose.\n\n```protocol\n// protocol nope\nprotocol quay { timing asynchronous }\n```\n\n```property\nproperty calm = always true\n```\n'
    expect(newBlockText('check', text)).toBe('```check\ncheck quay: calm\n```\n\n')
  })
  it('never inserts above the front matter', () => {
    expect(tiles(insertBlock(harbour, 0, 'prose'))[0].kind).toBe('front')
  })
  it('deletes a block with its trailing blank line', () => {
    const next = deleteBlock(harbour, 4)
    expect(tiles(next).map((s) => s.kind)).toEqual(['front', 'prose', 'protocol', 'prose', 'check'])
    expect(next).not.toContain('property calm')
  })
  it('moves a block down past its neighbour', () => {
    const next = moveBlock(harbour, 4, 1)
    expect(tiles(next).map((s) => s.kind)).toEqual(['front', 'prose', 'protocol', 'prose', 'check', 'property'])
  })
  it('moving keeps the same characters apart from blank lines', () => {
    const squash = (s: string) => s.split('\n').filter((l) => l.trim()).sort().join('\n')
    expect(squash(moveBlock(harbour, 2, -1))).toBe(squash(harbour))
  })
  it('keeps the front matter first', () => {
    expect(moveBlock(harbour, 1, -1)).toBe(harbour)
  })
})

describe('offsetOf', () => {
  it('maps line and column to an offset', () => {
    expect(harbour.slice(offsetOf(harbour, 10, 10))).toMatch(/^lights \{/)
  })
  it('counts CR and CRLF line endings as the kernel does', () => {
    for (const eol of ['\r', '\r\n']) {
      const text = harbour.replace(/\n/g, eol)
      expect(text.slice(offsetOf(text, 10, 10))).toMatch(/^lights \{/)
      expect(lineAt(text, offsetOf(text, 10, 10))).toBe(10)
    }
  })
})

describe('titleOf', () => {
  it('reads the front-matter title first', () => {
    expect(titleOf(harbour)).toBe('Harbour lights')
  })
  it('falls back to the first heading outside code', () => {
    expect(titleOf('```\n# not this\n```\n\n## Depot watch\n')).toBe('Depot watch')
  })
  it('is null without either', () => {
    expect(titleOf('just words')).toBeNull()
  })
})

describe('withTitle', () => {
  it('rewrites an existing title', () => {
    expect(titleOf(withTitle(harbour, 'Quay lamps'))).toBe('Quay lamps')
  })
  it('adds front matter when there is none', () => {
    const next = withTitle('# Old\n', 'New')
    expect(titleOf(next)).toBe('New')
    expect(next.endsWith('# Old\n')).toBe(true)
  })
  it('keeps a new title on one line', () => {
    expect(titleOf(withTitle(harbour, 'a\nb'))).toBe('a b')
  })
})

describe('the page reads a notebook as the kernel does', () => {
  // Oracle: the kernel's own reader (analyzeNotebook); the page's segments come from the same spans.
  const fenced = 'Intro words.\n\n```js\n# not a title\n```\n\n## Depot watch\n\n```check\ncheck depot: calm\n```\n'
  it('does not take a `# heading` inside a fenced block as the title (the page)', () => {
    expect(titleOf(fenced)).toBe('Depot watch')
    expect(titleOf(fenced)).toBe(analyzeNotebook(fenced).title)
    // Nor does it start a prose section there: the fence stays inside the first prose segment.
    expect(tiles(fenced).map((s) => [s.kind, fenced.slice(s.from, s.to).split('\n')[0]])).toEqual([
      ['prose', 'Intro words.'], ['prose', '## Depot watch'], ['check', '```check'],
    ])
  })
  it('cuts formal segments exactly where the kernel reads its blocks', () => {
    for (const text of [harbour, fenced, harbour.replace(/\n/g, '\r\n')]) {
      const formal = segment(text).filter((s) => s.kind !== 'prose' && s.kind !== 'front')
      const blocks = analyzeNotebook(text).blocks
      expect(formal.map((s) => [s.kind, s.contentFrom, contentOf(text, s).replace(/\r?\n$/, '')])).toEqual(blocks.map((b) => [b.kind, b.from, b.text]))
    }
  })
})
