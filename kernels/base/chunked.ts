// A growable array of 32-bit integers in fixed-size chunks: growing never copies what is stored
// and never asks for one huge contiguous allocation, so a graph of tens of millions of edges
// costs its 4 bytes per cell and no more (a doubling buffer briefly needs three times that).

const SHIFT = 20
const CHUNK = 1 << SHIFT
const MASK = CHUNK - 1

/** An append-only Int32 array in chunks of 2^20 cells. */
export class ChunkedInt32 {
  /** The chunks; chunk k holds cells k * 2^20 .. (k+1) * 2^20 - 1. */
  private chunks: Int32Array[] = []
  private last: Int32Array = new Int32Array(0)
  private fill = CHUNK
  /** Number of cells in use. */
  length = 0

  /** Appends a value. */
  push(v: number): void {
    if (this.fill === CHUNK) {
      // The first chunk starts small so that small graphs stay small.
      const size = this.chunks.length === 0 ? 1 << 12 : CHUNK
      this.last = new Int32Array(size)
      this.chunks.push(this.last)
      this.fill = 0
    } else if (this.fill === this.last.length) {
      const grown = new Int32Array(Math.min(CHUNK, this.last.length * 4))
      grown.set(this.last)
      this.chunks[this.chunks.length - 1] = this.last = grown
    }
    this.last[this.fill++] = v
    this.length++
  }

  /** The value of cell k (k < length). */
  get(k: number): number {
    return this.chunks[k >>> SHIFT][k & MASK]
  }

  /** Bytes allocated. */
  get bytes(): number {
    let b = 0
    for (const c of this.chunks) b += c.byteLength
    return b
  }
}
