import type { Span } from './model'

/**
 * Maps offsets in a text to 1-based lines and columns (columns count UTF-16 code units). A line
 * ends at LF, CR or CRLF alike (CommonMark's line endings), so notebooks saved with any of them
 * get the same lines.
 */
export class LineMap {
  private readonly starts: number[]
  /** Offset just past the last character of each line (before its line ending). */
  private readonly ends: number[]

  constructor(readonly text: string) {
    const starts = [0], ends: number[] = []
    for (let i = 0; i < text.length; i++) {
      const c = text.charCodeAt(i)
      if (c === 10 || c === 13) {
        ends.push(i)
        if (c === 13 && text.charCodeAt(i + 1) === 10) i++
        starts.push(i + 1)
      }
    }
    ends.push(text.length)
    this.starts = starts
    this.ends = ends
  }

  /** Number of lines in the text. */
  get lines(): number { return this.starts.length }

  /** Offset of the first character of a 1-based line. */
  lineStart(line: number): number {
    return this.starts[Math.max(0, Math.min(line - 1, this.starts.length - 1))]
  }

  /** Offset just past the last character of a 1-based line (before its newline). */
  lineEnd(line: number): number {
    return this.ends[Math.max(0, Math.min(line - 1, this.ends.length - 1))]
  }

  /** The 1-based line and column of an offset (clamped into the text). */
  position(offset: number): { line: number; column: number } {
    const pos = Math.max(0, Math.min(offset, this.text.length))
    let lo = 0, hi = this.starts.length - 1
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1
      if (this.starts[mid] <= pos) lo = mid
      else hi = mid - 1
    }
    return { line: lo + 1, column: pos - this.starts[lo] + 1 }
  }

  /** A span for the offsets [from, to) of the text. */
  span(from: number, to: number): Span {
    const a = this.position(from)
    const b = this.position(Math.max(from, to))
    return { line: a.line, column: a.column, endLine: b.line, endColumn: b.column, from, to: Math.max(from, to) }
  }
}
