// The distinct targets of one source during a search: an open-addressing set of integers whose
// slots are invalidated by bumping a stamp, so starting the next source costs nothing. Both the
// one-thread explorer (reach.ts) and the parallel workers (parallel.ts) keep one.

/** A set of int32 keys, emptied in O(1) by `reset`. */
export class TargetSet {
  private keys = new Int32Array(64)
  private stamps = new Int32Array(64)
  private stamp = 1
  private size = 0

  reset(): void {
    this.stamp++
    this.size = 0
  }

  /** True when `key` was not yet in the set since the last reset. */
  add(key: number): boolean {
    const mask = this.keys.length - 1
    let slot = Math.imul(key, 0x9e3779b1) >>> 7 & mask
    while (this.stamps[slot] === this.stamp) {
      if (this.keys[slot] === key) return false
      slot = (slot + 1) & mask
    }
    this.keys[slot] = key
    this.stamps[slot] = this.stamp
    if (++this.size * 2 > this.keys.length) this.grow()
    return true
  }

  /** Doubles the table, keeping the current keys (stamp restarts at 1 in fresh arrays). */
  private grow(): void {
    const { keys, stamps, stamp } = this
    this.keys = new Int32Array(keys.length * 2)
    this.stamps = new Int32Array(keys.length * 2)
    this.stamp = 1
    const mask = this.keys.length - 1
    for (let k = 0; k < keys.length; k++) {
      if (stamps[k] !== stamp) continue
      let slot = Math.imul(keys[k], 0x9e3779b1) >>> 7 & mask
      while (this.stamps[slot] === 1) slot = (slot + 1) & mask
      this.keys[slot] = keys[k]
      this.stamps[slot] = 1
    }
  }
}
