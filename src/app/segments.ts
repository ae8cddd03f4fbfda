// The notebook as a tiling of spans. The text is the single source of truth: a segment is only a
// pair of offsets into it, recomputed from the text after every structural edit, and every edit
// of a block is a replacement of its content span. Formal blocks are the fences whose info string
// starts with `protocol`, `property` or `check` (language.md); prose is split at headings so that
// sections can be moved as blocks. The fences, headings and front matter are the kernel reader's
// spans (kernels/language/spans.ts), so the page and the kernel read one notebook the same way.
import { LineMap, notebookSpans, type FenceSpan } from '../../kernels/api'
import { parser } from '../../kernels/language/parser.js'

/** What a segment holds. `front` is the front-matter block between `---` lines. */
export type SegmentKind = 'front' | 'prose' | 'protocol' | 'property' | 'check'

/** A span of the notebook text. Segments tile the text: each starts where the previous ends. */
export interface Segment {
  kind: SegmentKind
  /** Start of the segment's first line. */
  from: number
  /** End of the segment (exclusive), trailing blank lines included. */
  to: number
  /** The editable part: a formal block's lines between its fences; all of a prose segment. */
  contentFrom: number
  contentTo: number
}

const FORMAL = new Set(['protocol', 'property', 'check'])

/** Converts a 1-based line and column to an offset, clamped to the text (lines end at LF, CR or CRLF, as the kernel reads them). */
export function offsetOf(text: string, line: number, column: number): number {
  const lines = new LineMap(text)
  return Math.min(lines.lineStart(Math.max(line, 1)) + Math.max(column, 1) - 1, text.length)
}

function isBlank(text: string, from: number, to: number): boolean {
  return /^\s*$/.test(text.slice(from, to))
}

/** A place where a new segment starts: a formal block (with its spans) or a heading (prose). */
type Cut = { from: number; fence: FenceSpan | null }

/** Splits the notebook text into segments. Pure; the same text always gives the same segments. */
export function segment(text: string): Segment[] {
  const spans = notebookSpans(text)
  const cuts: Cut[] = [
    ...spans.fences.filter((f) => !f.nested && FORMAL.has(f.kind)).map((f) => ({ from: f.from, fence: f })),
    ...spans.headings.filter((h) => !h.nested).map((h) => ({ from: h.from, fence: null })),
  ].sort((a, b) => a.from - b.from)
  const front = spans.front?.to ?? 0
  const segs: Segment[] = []
  if (front) segs.push({ kind: 'front', from: 0, to: front, contentFrom: 0, contentTo: front })
  let pos = front
  const pushProse = (to: number) => {
    if (to <= pos) return
    if (isBlank(text, pos, to) && segs.length) {
      // Blank lines between blocks belong to the block above, so no empty prose block appears.
      const last = segs[segs.length - 1]
      last.to = to
      if (last.kind === 'prose') last.contentTo = to
    } else {
      segs.push({ kind: 'prose', from: pos, to, contentFrom: pos, contentTo: to })
    }
    pos = to
  }
  for (const { from, fence } of cuts) {
    if (from < pos) continue
    pushProse(from)
    if (!fence) continue
    segs.push({ kind: fence.kind as SegmentKind, from, to: fence.to, contentFrom: fence.contentFrom, contentTo: fence.contentTo })
    pos = fence.to
  }
  pushProse(text.length)
  if (!segs.length) segs.push({ kind: 'prose', from: 0, to: text.length, contentFrom: 0, contentTo: text.length })
  return segs
}

/** The text of a segment's editable part. */
export function contentOf(text: string, seg: Segment): string {
  return text.slice(seg.contentFrom, seg.contentTo)
}

/** Replaces a segment's editable part. */
export function replaceContent(text: string, seg: Segment, content: string): string {
  return text.slice(0, seg.contentFrom) + content + text.slice(seg.contentTo)
}

const DECL = { protocol: 'ProtocolDecl', property: 'PropertyDecl' }

/** The first name a `protocol` or `property` block of the notebook declares, read with the kernel's parser. */
function firstDeclared(text: string, kind: 'protocol' | 'property'): string | null {
  for (const f of notebookSpans(text).fences) {
    if (f.nested || f.kind !== kind) continue
    const content = text.slice(f.contentFrom, f.contentTo)
    for (let d = parser.parse(content).topNode.firstChild; d; d = d.nextSibling) {
      const id = d.name === DECL[kind] ? d.getChild('Identifier') : null
      if (id) return content.slice(id.from, id.to)
    }
  }
  return null
}

/** The short template a new block of each kind starts with; a check names the notebook's first protocol and property. */
export function newBlockText(kind: Exclude<SegmentKind, 'front'>, text = ''): string {
  if (kind === 'prose') return '## New section\n\nWrite the argument here.\n\n'
  const fence = (body: string) => '```' + kind + '\n' + body + '```\n\n'
  if (kind === 'protocol') {
    return fence('protocol lighthouse {\n  timing synchronous(delay: 1, idle: 1)\n  faults crash\n  message flash\n' +
      '  state seen[peer]: bool = false\n  on flash from q { seen[q] := true }\n  step { broadcast flash }\n}\n')
  }
  // Properties and checks start from the names the notebook already has, so they read at once.
  const protocol = firstDeclared(text, 'protocol') ?? 'lighthouse'
  if (kind === 'property') return fence('property steady = forall p: always (alive(p) or crashed(p))\n')
  const property = firstDeclared(text, 'property') ?? 'steady'
  return fence(`check ${protocol}: ${property}\n`)
}

function withNewline(s: string): string {
  return s.endsWith('\n') ? s : s + '\n'
}

/** Inserts a new block (a short template of its kind) before segment `index` (or at the end when index equals the count). */
export function insertBlock(text: string, index: number, kind: Exclude<SegmentKind, 'front'>): string {
  const segs = segment(text)
  let i = Math.min(Math.max(index, 0), segs.length)
  if (i === 0 && segs[0]?.kind === 'front') i = 1
  const block = newBlockText(kind, text)
  if (i >= segs.length) {
    const base = text.length === 0 ? '' : text.endsWith('\n\n') ? text : withNewline(text) + '\n'
    return base + block
  }
  const at = segs[i].from
  return text.slice(0, at) + block + text.slice(at)
}

/** Removes segment `index` with its trailing blank lines. */
export function deleteBlock(text: string, index: number): string {
  const seg = segment(text)[index]
  if (!seg) return text
  return text.slice(0, seg.from) + text.slice(seg.to)
}

/** Swaps segment `index` with its neighbour (`-1` up, `+1` down). The front matter stays first. */
export function moveBlock(text: string, index: number, direction: -1 | 1): string {
  const segs = segment(text)
  const j = index + direction
  if (!segs[index] || !segs[j] || segs[index].kind === 'front' || segs[j].kind === 'front') return text
  const [a, b] = index < j ? [segs[index], segs[j]] : [segs[j], segs[index]]
  // Each moved piece must end with a blank line, or it would run into its new neighbour.
  const pad = (s: string) => (s.endsWith('\n\n') ? s : withNewline(s) + '\n')
  return text.slice(0, a.from) + pad(text.slice(b.from, b.to)) + pad(text.slice(a.from, a.to)) + text.slice(b.to)
}

/** The 1-based line number of an offset in `text`. */
export function lineAt(text: string, offset: number): number {
  return new LineMap(text).position(offset).line
}
