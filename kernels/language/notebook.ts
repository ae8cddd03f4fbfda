// The notebook reader: finds the formal blocks of a CommonMark document (through markdown-it, so
// that what counts as a fence is exactly what CommonMark says) and maps them to notebook offsets.
import MarkdownIt from 'markdown-it'
import type { BlockRef, Diagnostic } from './model'
import { LineMap } from './positions'

const FORMAL = new Set(['protocol', 'property', 'check'])

/** What the reader finds in a notebook, before any block is parsed. */
export interface NotebookOutline {
  title: string | null
  blocks: BlockRef[]
  diagnostics: Diagnostic[]
  /** The notebook text with a front-matter block blanked out (same length and lines). */
  body: string
}

const markdown = new MarkdownIt('commonmark')

/**
 * Reads the optional front matter (`---` lines at the very top holding `key: value` lines) and
 * blanks it out, so that Markdown sees neither a rule nor a heading there.
 */
function frontMatter(text: string, lines: LineMap, diagnostics: Diagnostic[]): { title: string | null; body: string } {
  if (!/^---[ \t]*(\r\n?|\n)/.test(text)) return { title: null, body: text }
  let title: string | null = null
  const lineErrors: Diagnostic[] = []
  for (let line = 2; line <= lines.lines; line++) {
    const from = lines.lineStart(line)
    const content = text.slice(from, lines.lineEnd(line))
    if (/^---[ \t]*$/.test(content)) {
      const end = lines.lineEnd(line)
      const body = text.slice(0, end).replace(/[^\r\n]/g, ' ') + text.slice(end)
      diagnostics.push(...lineErrors)
      return { title, body }
    }
    const m = /^([A-Za-z_][\w-]*)[ \t]*:[ \t]*(.*)$/.exec(content)
    if (m) {
      if (m[1] === 'title') title = m[2].trim().replace(/^(["'])(.*)\1$/, '$2')
    } else if (content.trim() !== '') {
      lineErrors.push({
        ...lines.span(from, from + content.length), severity: 'error',
        message: 'front matter lines must read `key: value`; write this line as `title: ...` or remove it',
      })
    }
  }
  diagnostics.push({
    ...lines.span(0, 3), severity: 'error',
    message: 'the front matter that starts here has no closing `---` line; add one after the `title:` line',
  })
  return { title, body: text }
}

/** Finds the formal blocks of a notebook and its title. Never throws. */
export function readNotebook(text: string): NotebookOutline {
  const lines = new LineMap(text)
  const diagnostics: Diagnostic[] = []
  const { title, body } = frontMatter(text, lines, diagnostics)
  const blocks: BlockRef[] = []
  const tokens = markdown.parse(body, {})
  for (const token of tokens) {
    if (token.type !== 'fence' || !token.map) continue
    const kind = token.info.trim().split(/\s+/)[0]
    if (!FORMAL.has(kind)) continue
    const [open, next] = token.map // 0-based line of the opening fence, line after the block
    const fenceLine = open + 1
    if (token.level > 0 || /^\s*>/.test(text.slice(lines.lineStart(fenceLine), lines.lineEnd(fenceLine)))) {
      diagnostics.push({
        ...lines.span(lines.lineStart(fenceLine), lines.lineEnd(fenceLine)), severity: 'error',
        message: `a ${kind} block inside a list or a quote is not read; move it to the top level of the notebook`,
      })
      continue
    }
    // The closing fence, when present, is the last line of the token's range.
    const lastLine = next // 1-based number of the last line in the range
    const last = text.slice(lines.lineStart(lastLine), lines.lineEnd(lastLine)).trim()
    const marker = token.markup
    const closed = lastLine > fenceLine && last.startsWith(marker[0].repeat(marker.length)) && /^(`{3,}|~{3,})$/.test(last)
    if (!closed) {
      diagnostics.push({
        ...lines.span(lines.lineStart(fenceLine), lines.lineEnd(fenceLine)), severity: 'error',
        message: `the ${kind} block opened here has no closing ${marker} fence; add one after its last line`,
      })
    }
    const firstContent = fenceLine + 1
    const endLine = closed ? lastLine - 1 : lastLine
    const from = firstContent <= lines.lines ? lines.lineStart(firstContent) : text.length
    const to = endLine >= firstContent ? lines.lineEnd(endLine) : from
    blocks.push({ kind: kind as BlockRef['kind'], from, to, line: firstContent, text: text.slice(from, to) })
  }
  return { title, blocks, diagnostics, body }
}
