// The notebook reader: takes the formal blocks of a CommonMark document from its Markdown spans
// (spans.ts: markdown-it, so that what counts as a fence is exactly what CommonMark says) and maps
// them to notebook offsets, with the title from the one title rule.
import type { BlockRef, Diagnostic } from './model'
import { LineMap } from './positions'
import { notebookSpans, notebookTitle } from './spans'

const FORMAL = new Set(['protocol', 'property', 'check'])

/** What the reader finds in a notebook, before any block is parsed. */
export interface NotebookOutline {
  /** The title rule of spans.ts: the front matter's `title:`, else the first top-level heading. */
  title: string | null
  blocks: BlockRef[]
  diagnostics: Diagnostic[]
  /** The notebook text with a front-matter block blanked out (same length and lines). */
  body: string
}

/** Finds the formal blocks of a notebook and its title. Never throws. */
export function readNotebook(text: string): NotebookOutline {
  const lines = new LineMap(text)
  const spans = notebookSpans(text)
  const diagnostics: Diagnostic[] = [...spans.diagnostics]
  const blocks: BlockRef[] = []
  for (const fence of spans.fences) {
    const kind = fence.kind
    if (!FORMAL.has(kind)) continue
    const fenceLine = fence.openLine
    if (fence.nested) {
      diagnostics.push({
        ...lines.span(lines.lineStart(fenceLine), lines.lineEnd(fenceLine)), severity: 'error',
        message: `a ${kind} block inside a list or a quote is not read; move it to the top level of the notebook`,
      })
      continue
    }
    if (!fence.closed) {
      diagnostics.push({
        ...lines.span(lines.lineStart(fenceLine), lines.lineEnd(fenceLine)), severity: 'error',
        message: `the ${kind} block opened here has no closing ${fence.marker} fence; add one after its last line`,
      })
    }
    const firstContent = fenceLine + 1
    const endLine = fence.closed ? fence.lastLine - 1 : fence.lastLine
    const from = firstContent <= lines.lines ? lines.lineStart(firstContent) : text.length
    const to = endLine >= firstContent ? lines.lineEnd(endLine) : from
    blocks.push({ kind: kind as BlockRef['kind'], from, to, line: firstContent, text: text.slice(from, to) })
  }
  return { title: notebookTitle(spans), blocks, diagnostics, body: spans.body }
}
