// A growable packed buffer of 32-bit integers: the stacks, queues and per-node tables of the
// product and of the emptiness check live in these, never in one object per node.

/** A growable Int32Array: `data[0..length)` is in use; grows by doubling, new cells read 0. */
export class Int32Buffer {
  /** The backing array; replaced when the buffer grows, so do not keep a reference across pushes. */
  data: Int32Array
  /** Number of cells in use. */
  length = 0

  constructor(capacity = 1024) {
    this.data = new Int32Array(Math.max(16, capacity))
  }

  /** Appends a value. */
  push(v: number): void {
    if (this.length === this.data.length) this.grow(this.length + 1)
    this.data[this.length++] = v
  }

  /** Removes and returns the last value. */
  pop(): number {
    return this.data[--this.length]
  }

  /** The last value. */
  top(): number {
    return this.data[this.length - 1]
  }

  /** Makes cells `0..n-1` addressable (cells never written read 0; use it on tables that never pop) and sets `length` to at least n. */
  ensure(n: number): void {
    if (n > this.data.length) this.grow(n)
    if (n > this.length) this.length = n
  }

  private grow(n: number): void {
    let cap = this.data.length * 2
    while (cap < n) cap *= 2
    const d = new Int32Array(cap)
    d.set(this.data.subarray(0, this.length))
    this.data = d
  }
}
