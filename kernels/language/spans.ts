// The Markdown structure of a notebook, read once and the same way for everyone: the front matter,
// every fenced block and every heading as offsets into the notebook text (CommonMark through
// markdown-it, so what counts as a fence or a heading is exactly what CommonMark says), and the
// title rule. The kernel's reader (notebook.ts) takes the formal blocks from these spans, and the
// workbench cuts its blocks and shows its title from the same spans, so the two cannot disagree
// about, say, a `# heading` inside a fenced block (it is code, not a heading, for both).
import MarkdownIt from 'markdown-it'
import type { Diagnostic } from './model'
import { LineMap } from './positions'

/** The front-matter block: `---` lines at the very top around `key: value` lines. */
export interface FrontMatterSpan {
  /** Offset just past the closing `---` line and its line ending (the start of what follows). */
  to: number
  /** 1-based line of the closing `---`. */
  closeLine: number
  /** The `title:` value (quotes stripped), or null when there is none or it is empty. */
  title: string | null
}

/** A fenced code block at any depth, formal or not. */
export interface FenceSpan {
  /** The first word of the info string (`protocol`, `js`, ...; "" when there is none). */
  kind: string
  /** The opening fence's marker as written (three or more backticks or tildes). */
  marker: string
  /** True when the fence sits inside a list item or a quote. */
  nested: boolean
  /** True when a closing fence ends the block (an unclosed block runs to the end of its container). */
  closed: boolean
  /** 1-based line of the opening fence. */
  openLine: number
  /** 1-based last line of the block: the closing fence when `closed`. */
  lastLine: number
  /** Start of the opening fence's line. */
  from: number
  /** Start of the line after the block (the text's length when the block ends the text). */
  to: number
  /** Start of the first line after the opening fence. */
  contentFrom: number
  /** Start of the closing fence's line, or `to` when the block is unclosed: the content with its line endings. */
  contentTo: number
}

/** A heading (ATX `#` or setext underline) outside code. */
export interface HeadingSpan {
  level: number
  /** True when the heading sits inside a list item or a quote. */
  nested: boolean
  /** 1-based line where the heading starts. */
  line: number
  /** Start of the heading's first line. */
  from: number
  /** Start of the line after the heading. */
  to: number
  /** The heading's text as written (inline Markdown kept, closing `#`s removed). */
  text: string
}

/** Everything the reader finds in the Markdown of a notebook, before any formal block is parsed. */
export interface NotebookSpans {
  front: FrontMatterSpan | null
  fences: FenceSpan[]
  headings: HeadingSpan[]
  /** Problems with the front matter (each a located error). */
  diagnostics: Diagnostic[]
  /** The notebook text with the front matter blanked out (same length and lines), as Markdown read it. */
  body: string
}

const markdown = new MarkdownIt('commonmark')

const OPEN_FRONT = /^---[ \t]*(\r\n?|\n)/

function unquote(value: string): string | null {
  const t = value.trim().replace(/^(["'])(.*)\1$/, '$2').trim()
  return t === '' ? null : t
}

/**
 * Reads the optional front matter. The first `title:` line gives the title. `diagnostics`, when
 * given, receives a located error for every line that does not read `key: value` and for a front
 * matter without its closing line (which is then no front matter at all: Markdown reads the lines).
 */
export function frontMatterSpan(text: string, lines = new LineMap(text), diagnostics: Diagnostic[] = []): FrontMatterSpan | null {
  if (!OPEN_FRONT.test(text)) return null
  let title: string | null | undefined
  const lineErrors: Diagnostic[] = []
  for (let line = 2; line <= lines.lines; line++) {
    const from = lines.lineStart(line)
    const content = text.slice(from, lines.lineEnd(line))
    if (/^---[ \t]*$/.test(content)) {
      diagnostics.push(...lineErrors)
      return { to: line < lines.lines ? lines.lineStart(line + 1) : text.length, closeLine: line, title: title ?? null }
    }
    const m = /^([A-Za-z_][\w-]*)[ \t]*:[ \t]*(.*)$/.exec(content)
    if (m) {
      if (m[1] === 'title' && title === undefined) title = unquote(m[2])
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
  return null
}

/** The start of the line after 1-based `line` (the text's length after the last line). */
function after(lines: LineMap, line: number): number {
  return line < lines.lines ? lines.lineStart(line + 1) : lines.text.length
}

function fenceSpan(text: string, lines: LineMap, token: { info: string; markup: string; level: number; map: [number, number] }): FenceSpan {
  const [open, next] = token.map // 0-based line of the opening fence, 0-based line after the block
  const openLine = open + 1
  const lastLine = Math.max(openLine, next) // 1-based number of the block's last line
  const opening = text.slice(lines.lineStart(openLine), lines.lineEnd(openLine))
  const nested = token.level > 0 || /^\s*>/.test(opening)
  // A quote's markers are not part of the closing fence.
  const last = text.slice(lines.lineStart(lastLine), lines.lineEnd(lastLine)).replace(nested ? /^[\s>]*/ : /^/, '').trim()
  const marker = token.markup
  const closed = lastLine > openLine && last.startsWith(marker[0].repeat(marker.length)) && /^(`{3,}|~{3,})$/.test(last)
  const to = after(lines, lastLine)
  const contentFrom = after(lines, openLine)
  return {
    kind: token.info.trim().split(/\s+/)[0] ?? '',
    marker,
    nested,
    closed,
    openLine,
    lastLine,
    from: lines.lineStart(openLine),
    to,
    contentFrom,
    contentTo: Math.max(contentFrom, closed ? lines.lineStart(lastLine) : to),
  }
}

/** Reads the front matter, the fences and the headings of a notebook. Never throws. */
export function notebookSpans(text: string): NotebookSpans {
  const lines = new LineMap(text)
  const diagnostics: Diagnostic[] = []
  const front = frontMatterSpan(text, lines, diagnostics)
  // Blank out the front matter (same length and lines), so Markdown sees neither a rule nor a heading there.
  const end = front ? lines.lineEnd(front.closeLine) : 0
  const body = front ? text.slice(0, end).replace(/[^\r\n]/g, ' ') + text.slice(end) : text
  const fences: FenceSpan[] = []
  const headings: HeadingSpan[] = []
  const tokens = markdown.parse(body, {})
  for (let i = 0; i < tokens.length; i++) {
    const token = tokens[i]
    if (!token.map) continue
    const map = token.map as [number, number]
    if (token.type === 'fence') fences.push(fenceSpan(text, lines, { info: token.info, markup: token.markup, level: token.level, map }))
    else if (token.type === 'heading_open') {
      const line = map[0] + 1
      headings.push({
        level: Number(token.tag.slice(1)), nested: token.level > 0, line,
        from: lines.lineStart(line), to: after(lines, map[1]), text: tokens[i + 1]?.type === 'inline' ? tokens[i + 1].content : '',
      })
    }
  }
  return { front, fences, headings, diagnostics, body }
}

/**
 * The title rule: the front matter's `title:` when it has one, else the text of the first heading
 * at the top level of the notebook (any level, outside code, lists and quotes), else null.
 */
export function notebookTitle(spans: NotebookSpans): string | null {
  if (spans.front?.title) return spans.front.title
  for (const h of spans.headings) if (!h.nested && h.text.trim() !== '') return h.text.trim()
  return null
}

/** The title of a notebook text (the title rule of `notebookTitle`). */
export function titleOf(text: string): string | null {
  return notebookTitle(notebookSpans(text))
}
