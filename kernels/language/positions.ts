import type { Span } from './model'

/** Maps offsets in a text to 1-based lines and columns (columns count UTF-16 code units). */
export class LineMap {
  private readonly starts: number[]

  constructor(readonly text: string) {
    const starts = [0]
    for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) === 10) starts.push(i + 1)
    this.starts = starts
  }

  /** Number of lines in the text. */
  get lines(): number { return this.starts.length }

  /** Offset of the first character of a 1-based line. */
  lineStart(line: number): number {
    return this.starts[Math.max(0, Math.min(line - 1, this.starts.length - 1))]
  }

  /** Offset just past the last character of a 1-based line (before its newline). */
  lineEnd(line: number): number {
    const next = line < this.starts.length ? this.starts[line] - 1 : this.text.length
    return next
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
