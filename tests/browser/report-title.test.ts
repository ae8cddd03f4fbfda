// The HTML report names the notebook once: the first heading of the first prose block gives way to
// the report's own heading when it reads the title, found by the kernel's spans (so a heading of
// any level, and never a `#` line inside a fence). Oracle: hand-read fixtures.
import { describe, expect, it } from 'vitest'
import { buildReport } from '../../src/app/report'
import { segment } from '../../src/app/segments'
import { titleOf } from '../../src/app/title'

function report(text: string): string {
  return buildReport({
    title: titleOf(text) ?? 'Untitled notebook', text, segments: segment(text), checks: new Map(),
    prose: (src) => `<div class="prose-src">${src.replace(/</g, '&lt;')}</div>`, sha256: '0'.repeat(64), created: new Date('2026-03-01T08:00:00Z'),
  })
}

describe('the report title', () => {
  it('drops the heading that gives the title, whatever its level, and keeps the other headings', () => {
    const html = report('```js\n# not this\n```\n\n## Depot watch\n\nWords.\n\n# Depot watch later\n')
    expect(html).toContain('<h1>Depot watch</h1>')
    expect(html).not.toContain('## Depot watch\n')
    expect(html).toContain('# not this')
    expect(html).toContain('# Depot watch later')
  })
  it('keeps the first heading when the front matter gives another title', () => {
    const html = report('---\ntitle: Quay bells\n---\n\n# Bells\n\nWords.\n')
    expect(html).toContain('<h1>Quay bells</h1>')
    expect(html).toContain('# Bells')
  })
})
