// Prose rendering: CommonMark through markdown-it, `$..$` and `$$..$$` through KaTeX, and the
// result through DOMPurify before it reaches the page. Notebook text is untrusted: raw HTML in
// prose is allowed only as far as the sanitizer lets it through, links may not use script URLs.
import DOMPurify from 'dompurify'
import MarkdownIt, { type StateBlock, type StateInline } from 'markdown-it'
import { texToHtml } from './tex'

function mathInline(state: StateInline, silent: boolean): boolean {
  const src = state.src
  const start = state.pos
  if (src.charCodeAt(start) !== 0x24 /* $ */) return false
  const display = src.charCodeAt(start + 1) === 0x24
  const open = display ? 2 : 1
  let end = start + open
  // Find the closing delimiter that is not escaped.
  for (;;) {
    end = src.indexOf(display ? '$$' : '$', end)
    if (end < 0) return false
    if (src.charCodeAt(end - 1) !== 0x5c /* \ */) break
    end++
  }
  const content = src.slice(start + open, end)
  if (!content.trim() || (!display && /^\s|\s$/.test(content))) return false
  if (!silent) {
    const token = state.push('math_inline', 'math', 0)
    token.content = content
    token.markup = display ? '$$' : '$'
  }
  state.pos = end + open
  return true
}

function mathBlock(state: StateBlock, startLine: number, endLine: number, silent: boolean): boolean {
  const first = state.src.slice(state.bMarks[startLine] + state.tShift[startLine], state.eMarks[startLine])
  if (!first.startsWith('$$')) return false
  let content: string
  let line = startLine
  const rest = first.slice(2)
  if (rest.trim().endsWith('$$') && rest.trim().length >= 2) {
    content = rest.trim().slice(0, -2)
  } else {
    const lines = [rest]
    let closed = false
    while (++line < endLine) {
      const text = state.src.slice(state.bMarks[line] + state.tShift[line], state.eMarks[line])
      if (text.trimEnd().endsWith('$$')) { lines.push(text.trimEnd().slice(0, -2)); closed = true; break }
      lines.push(text)
    }
    if (!closed) return false
    content = lines.join('\n')
  }
  if (silent) return true
  const token = state.push('math_block', 'math', 0)
  token.content = content
  token.block = true
  token.map = [startLine, line + 1]
  state.line = line + 1
  return true
}

const md = new MarkdownIt('commonmark', { html: true, linkify: false })
md.inline.ruler.after('escape', 'math_inline', mathInline)
md.block.ruler.before('fence', 'math_block', mathBlock, { alt: ['paragraph', 'reference', 'blockquote', 'list'] })
md.renderer.rules.math_inline = (tokens, i, _o, env) => texToHtml(tokens[i].content, tokens[i].markup === '$$', !!env?.mathmlOnly)
md.renderer.rules.math_block = (tokens, i, _o, env) => `<div class="math-display">${texToHtml(tokens[i].content, true, !!env?.mathmlOnly)}</div>`

/**
 * Markdown to HTML, before sanitizing. `mathmlOnly` renders math as MathML alone (for the
 * exported report, which carries no fonts). Exposed for tests; the page uses `renderProse`.
 */
export function markdownToHtml(src: string, mathmlOnly = false): string {
  return md.render(src, { mathmlOnly })
}

let hooked = false

/** The sanitizer settings: no scripts, no forms or frames, no event handlers, no script URLs. */
export function sanitize(htmlText: string): string {
  if (!hooked) {
    // Links from a notebook open elsewhere and never hand this page to the target.
    DOMPurify.addHook('afterSanitizeAttributes', (node) => {
      if (node.tagName === 'A' && node.hasAttribute('href')) {
        node.setAttribute('rel', 'noopener noreferrer')
        if (!node.getAttribute('href')!.startsWith('#')) node.setAttribute('target', '_blank')
      }
    })
    hooked = true
  }
  return DOMPurify.sanitize(htmlText, {
    USE_PROFILES: { html: true, svg: true, mathMl: true },
    FORBID_TAGS: ['style', 'form', 'input', 'button', 'textarea', 'select', 'iframe', 'object', 'embed', 'base', 'meta', 'link'],
    FORBID_ATTR: ['srcset', 'formaction', 'action'],
    ALLOW_UNKNOWN_PROTOCOLS: false,
  })
}

/** Renders prose for the page: Markdown with math, sanitized. Needs a DOM (DOMPurify). */
export function renderProse(src: string, mathmlOnly = false): string {
  return sanitize(markdownToHtml(src, mathmlOnly))
}

/** Parses sanitized markup into nodes without passing it through innerHTML of a live element. */
export function toFragment(htmlText: string): DocumentFragment {
  return DOMPurify.sanitize(htmlText, {
    USE_PROFILES: { html: true, svg: true, svgFilters: false, mathMl: true },
    ADD_ATTR: ['data-tick', 'data-row', 'data-line', 'data-column', 'aria-label', 'role'],
    RETURN_DOM_FRAGMENT: true,
  }) as unknown as DocumentFragment
}
