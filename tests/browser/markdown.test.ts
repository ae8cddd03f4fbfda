// Prose rendering before sanitizing (the sanitizer itself is exercised in the browser suite, which
// has a DOM). Oracle: what CommonMark and KaTeX must produce for short inputs, read by hand.
import { describe, expect, it } from 'vitest'
import { markdownToHtml } from '../../src/app/markdown'

describe('markdownToHtml', () => {
  it('typesets inline and display math with KaTeX', () => {
    const out = markdownToHtml('The instance $G_N$ and\n\n$$G_2 \\models \\varphi$$\n')
    expect(out.match(/class="katex"/g)?.length).toBeGreaterThanOrEqual(1)
    expect(out).toContain('class="math-display"')
    expect(out).toContain('katex-display')
  })
  it('leaves a lone dollar sign as text', () => {
    expect(markdownToHtml('It costs $5 at the harbour.')).toContain('$5 at the harbour.')
  })
  it('renders MathML alone for the report', () => {
    const out = markdownToHtml('$x_1$', true)
    expect(out).toContain('<math')
    expect(out).not.toContain('katex-html')
  })
  it('refuses trusted KaTeX commands such as \\href', () => {
    expect(markdownToHtml('$\\href{javascript:alert(1)}{x}$')).not.toMatch(/href="javascript/i)
  })
  it('does not turn a javascript: link into a link', () => {
    expect(markdownToHtml('[log](javascript:alert(1))')).not.toMatch(/href="javascript/i)
  })
})
