// The notebook's Markdown spans and the title rule (kernels/language/spans.ts), which the kernel's
// reader and the workbench both use. Oracle: hand-read offsets and titles on short fixtures, and
// the kernel's own model (analyzeNotebook) for the title as the rest of the kernel sees it.
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/api'
import { frontMatterSpan, notebookSpans, titleOf } from '../../kernels/language/spans'

const fenced = [
  'Intro words.', // line 1
  '', // 2
  '```js', // 3
  '# not a title', // 4
  '```', // 5
  '', // 6
  '## Depot watch', // 7
  '', // 8
  '```protocol', // 9
  'protocol depot { timing asynchronous }', // 10
  '```', // 11
  '',
].join('\n')

describe('the title rule', () => {
  it('does not take a `# heading` inside a fenced block as the title (the kernel)', () => {
    expect(titleOf(fenced)).toBe('Depot watch')
    expect(analyzeNotebook(fenced).title).toBe('Depot watch')
  })
  it('has no title when the only heading is inside a fence', () => {
    const text = '```check\n# check a: b\n```\n\nwords\n'
    expect(titleOf(text)).toBeNull()
    expect(analyzeNotebook(text).title).toBeNull()
  })
  it('prefers the front-matter title, quotes stripped, and falls back to the heading when it is empty', () => {
    expect(titleOf('---\ntitle: "Quay bells"\n---\n\n# Bells\n')).toBe('Quay bells')
    expect(titleOf('---\ntitle:\n---\n\n# Bells\n')).toBe('Bells')
  })
  it('takes a heading of any level, but none inside a quote or a list', () => {
    expect(titleOf('> # quoted\n\n- # listed\n\n### Orchard rows\n')).toBe('Orchard rows')
  })
  it('reads CR, LF and CRLF notebooks alike', () => {
    const lf = '---\ntitle: Harbour lights\n---\n\n```js\n# no\n```\n'
    for (const eol of ['\r', '\r\n']) {
      const text = lf.replace(/\n/g, eol)
      expect(titleOf(text)).toBe('Harbour lights')
      expect(titleOf(text.replace('title: Harbour lights', 'key: x'))).toBeNull()
    }
  })
})

describe('notebookSpans', () => {
  it('gives every fence with its lines and content offsets', () => {
    const s = notebookSpans(fenced)
    expect(s.fences.map((f) => [f.kind, f.openLine, f.lastLine, f.closed, f.nested])).toEqual([['js', 3, 5, true, false], ['protocol', 9, 11, true, false]])
    const p = s.fences[1]
    expect(fenced.slice(p.from, p.contentFrom)).toBe('```protocol\n')
    expect(fenced.slice(p.contentFrom, p.contentTo)).toBe('protocol depot { timing asynchronous }\n')
    expect(fenced.slice(p.contentTo, p.to)).toBe('```\n')
  })
  it('gives the headings outside code only', () => {
    expect(notebookSpans(fenced).headings.map((h) => [h.level, h.line, h.text, fenced.slice(h.from, h.to)])).toEqual([[2, 7, 'Depot watch', '## Depot watch\n']])
  })
  it('runs an unclosed fence to the end, and marks a fence in a quote as nested', () => {
    const text = '> ```check\n> check a: b\n> ```\n\n```check\ncheck a: b\n'
    const s = notebookSpans(text)
    expect(s.fences.map((f) => [f.nested, f.closed])).toEqual([[true, true], [false, false]])
    expect(text.slice(s.fences[1].contentFrom, s.fences[1].contentTo)).toBe('check a: b\n')
    expect(s.fences[1].to).toBe(text.length)
  })
  it('blanks the front matter so that its `---` is neither a rule nor a heading', () => {
    const text = '---\ntitle: x\n---\n# A\n'
    const s = notebookSpans(text)
    expect(s.front).toEqual({ to: 17, closeLine: 3, title: 'x' })
    expect(text.slice(s.front!.to)).toBe('# A\n')
    expect(s.body.length).toBe(text.length)
    expect(s.headings.map((h) => h.text)).toEqual(['A'])
  })
  it('reads no front matter without the closing line, and says so', () => {
    const s = notebookSpans('---\ntitle: x\n\n# body\n')
    expect(s.front).toBeNull()
    expect(s.diagnostics.map((d) => [d.line, d.column])).toEqual([[1, 1]])
    expect(frontMatterSpan('---\ntitle: x\n')).toBeNull()
  })
})
