// A set of packed states: an arena of words (state k at k*words) and an open-addressing hash table
// of state indices with linear probing. No object per state: the arena and the table are typed
// arrays that grow, and a state's identity is its index, in insertion order. Other stages (the
// temporal product, symmetry reduction) use indices as state ids.

/** Murmur3-style hash of `words` words at `off` (32-bit). */
export function hashWords(src: Uint32Array, off: number, words: number): number {
  let h = 0x811c9dc5 ^ words
  for (let k = 0; k < words; k++) {
    let x = Math.imul(src[off + k], 0xcc9e2d51)
    x = (x << 15) | (x >>> 17)
    x = Math.imul(x, 0x1b873593)
    h ^= x
    h = (h << 13) | (h >>> 19)
    h = (Math.imul(h, 5) + 0xe6546b64) | 0
  }
  h ^= h >>> 16
  h = Math.imul(h, 0x85ebca6b)
  h ^= h >>> 13
  h = Math.imul(h, 0xc2b2ae35)
  h ^= h >>> 16
  return h >>> 0
}

/** Thrown by a `StateStore` that would grow past its memory budget (nothing is changed then). */
export class MemoryExhausted extends Error {
  constructor(readonly bytes: number, readonly budget: number) {
    super(`the state store would need ${bytes} bytes, more than its budget of ${budget}`)
  }
}

/**
 * True for a failure to allocate memory: a budget reached, or the runtime refusing a typed array
 * or an array ("Array buffer allocation failed", "Invalid typed array length", "Invalid array
 * length"). Other RangeErrors (a deep recursion, a bug) are not memory and are not caught as such.
 */
export function isOutOfMemory(e: unknown): boolean {
  if (e instanceof MemoryExhausted) return true
  return e instanceof RangeError && /allocation failed|invalid (typed )?array( buffer)? length|out of memory/i.test(e.message)
}

/**
 * An insertion-ordered set of fixed-width packed states. `insert` returns the state's index (new
 * states get `size` before the call, so `idx === sizeBefore` tells a new one); `lookup` returns -1
 * for an absent state. The arena is reallocated as it grows: read `data` again after inserting.
 */
export class StateStore {
  /** Number of states held. */
  size = 0
  private arena: Uint32Array
  /** index + 1 of the state in each slot, 0 for an empty slot. */
  private table: Int32Array
  private mask: number
  /**
   * Bytes the arena and the table may take together; growing past it throws `MemoryExhausted`
   * before anything is allocated or changed.
   */
  budget = Infinity

  constructor(readonly words: number, capacity = 1024) {
    const cap = Math.max(16, capacity)
    this.arena = new Uint32Array(cap * words)
    let t = 16
    while (t < cap * 2) t *= 2
    this.table = new Int32Array(t)
    this.mask = t - 1
  }

  /**
   * A set over states already laid out: `arena` holds `size` states, `table` (a power-of-two
   * length, at most 3/4 full) their slots as this class places them (index + 1, linear probing
   * from `hashWords & (length - 1)`), for instance as the parallel explorer leaves them.
   */
  static adopt(words: number, arena: Uint32Array, table: Int32Array, size: number): StateStore {
    const s = new StateStore(words, 16)
    s.arena = arena
    s.table = table
    s.mask = table.length - 1
    s.size = size
    return s
  }

  /** The arena: state k occupies data[k*words .. (k+1)*words). */
  get data(): Uint32Array {
    return this.arena
  }

  /** Bytes allocated for the arena and the table. */
  get bytes(): number {
    return this.arena.byteLength + this.table.byteLength
  }

  /** Index of the state at src[off..off+words), or -1. */
  lookup(src: Uint32Array, off: number): number {
    const w = this.words
    const a = this.arena
    let slot = hashWords(src, off, w) & this.mask
    for (;;) {
      const e = this.table[slot]
      if (e === 0) return -1
      const base = (e - 1) * w
      let k = 0
      while (k < w && a[base + k] === src[off + k]) k++
      if (k === w) return e - 1
      slot = (slot + 1) & this.mask
    }
  }

  /** Adds the state if absent; returns its index either way. */
  insert(src: Uint32Array, off: number): number {
    const w = this.words
    let a = this.arena
    let slot = hashWords(src, off, w) & this.mask
    for (;;) {
      const e = this.table[slot]
      if (e === 0) break
      const base = (e - 1) * w
      let k = 0
      while (k < w && a[base + k] === src[off + k]) k++
      if (k === w) return e - 1
      slot = (slot + 1) & this.mask
    }
    const idx = this.size
    // The table doubles when this state takes it past three quarters: the budget must allow it.
    const rehashing = (idx + 1) * 4 > this.table.length * 3
    if ((idx + 1) * w > a.length) {
      // Growth by half keeps the unused tail of the arena small (memory is a stated target).
      const cells = Math.max(a.length + w, Math.ceil((a.length / w) * 1.5) * w)
      const need = this.bytes + (cells - a.length) * 4 + (rehashing ? this.table.byteLength * 2 : 0)
      if (need > this.budget) throw new MemoryExhausted(need, this.budget)
      const next = new Uint32Array(cells)
      next.set(a)
      this.arena = a = next
    }
    else if (rehashing && this.bytes + this.table.byteLength * 2 > this.budget) {
      throw new MemoryExhausted(this.bytes + this.table.byteLength * 2, this.budget)
    }
    // The larger table is allocated before the state is added, so that a refused allocation
    // leaves the set as it was.
    const bigger = rehashing ? new Int32Array(this.table.length * 2) : null
    const base = idx * w
    for (let k = 0; k < w; k++) a[base + k] = src[off + k]
    this.table[slot] = idx + 1
    this.size = idx + 1
    if (bigger) this.rehash(bigger)
    return idx
  }

  /** Copies state `index` into dst at dstOff. */
  get(index: number, dst: Uint32Array, dstOff = 0): void {
    const w = this.words
    const a = this.arena
    for (let k = 0; k < w; k++) dst[dstOff + k] = a[index * w + k]
  }

  /** Offset of state `index` in `data`. */
  offset(index: number): number {
    return index * this.words
  }

  /** Empties the set, keeping its allocation. */
  clear(): void {
    this.table.fill(0)
    this.size = 0
  }

  private rehash(t: Int32Array): void {
    const mask = t.length - 1
    const w = this.words
    const a = this.arena
    for (let idx = 0; idx < this.size; idx++) {
      let slot = hashWords(a, idx * w, w) & mask
      while (t[slot] !== 0) slot = (slot + 1) & mask
      t[slot] = idx + 1
    }
    this.table = t
    this.mask = mask
  }
}
