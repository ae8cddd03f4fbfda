// Dense numbering of pairs of non-negative integers: the product's node ids. An open-addressing
// hash table over packed Int32 arrays; ids are handed out 0, 1, 2, ... in order of first lookup,
// and each id's pair is kept for decoding.
import { Int32Buffer } from './buffer'

/** Numbers (a, b) pairs densely from 0 and decodes ids back to their pairs. */
export class PairMap {
  /** The first component of each id's pair. */
  readonly first = new Int32Buffer()
  /** The second component of each id's pair. */
  readonly second = new Int32Buffer()
  // slots[i] = id + 1, or 0 for an empty slot. The capacity is a power of two, kept at most half full.
  private slots = new Int32Array(1 << 12)
  private mask = (1 << 12) - 1

  /** Number of pairs numbered so far. */
  get size(): number {
    return this.first.length
  }

  /** The id of (a, b), numbering the pair if it is new. */
  id(a: number, b: number): number {
    let i = hash(a, b) & this.mask
    for (;;) {
      const s = this.slots[i]
      if (s === 0) break
      const id = s - 1
      if (this.first.data[id] === a && this.second.data[id] === b) return id
      i = (i + 1) & this.mask
    }
    const id = this.first.length
    this.first.push(a)
    this.second.push(b)
    this.slots[i] = id + 1
    if (2 * (id + 1) > this.slots.length) this.grow()
    return id
  }

  /** The id of (a, b), or -1 when the pair has not been numbered. */
  find(a: number, b: number): number {
    let i = hash(a, b) & this.mask
    for (;;) {
      const s = this.slots[i]
      if (s === 0) return -1
      if (this.first.data[s - 1] === a && this.second.data[s - 1] === b) return s - 1
      i = (i + 1) & this.mask
    }
  }

  private grow(): void {
    const slots = new Int32Array(this.slots.length * 2)
    const mask = slots.length - 1
    for (let id = 0; id < this.first.length; id++) {
      let i = hash(this.first.data[id], this.second.data[id]) & mask
      while (slots[i] !== 0) i = (i + 1) & mask
      slots[i] = id + 1
    }
    this.slots = slots
    this.mask = mask
  }
}

// A multiplicative mix of both halves (constants from the 32-bit MurmurHash3 finalizer).
function hash(a: number, b: number): number {
  let h = Math.imul(a, 0x9e3779b1) ^ b
  h ^= h >>> 16
  h = Math.imul(h, 0x85ebca6b)
  h ^= h >>> 13
  h = Math.imul(h, 0xc2b2ae35)
  h ^= h >>> 16
  return h
}
