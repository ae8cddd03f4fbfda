// The outcome lists of a tick engine, in one pool of packed words, memoized by a process's local
// configuration: what one alive process can do in a tick depends only on its own fields, its
// incoming channels and the bound setting (tick.ts), so a list computed once serves every state
// that agrees on those.
import { StateStore } from '../base/stateset'
import type { ModelError } from './errors'

/** Outcomes of `stride` words each, appended in lists; lists are remembered by key. */
export class OutcomePool {
  /** The pooled words; replaced when the pool grows, so read it again after appending. */
  data: Uint32Array
  /** Number of outcomes in the pool. */
  length = 0
  private readonly memo: StateStore
  private memoStart: Int32Array
  private memoCount: Int32Array
  private readonly memoError = new Map<number, ModelError>()

  /** A pool of `stride`-word outcomes whose lists are keyed by `keyWords` words. */
  constructor(readonly stride: number, keyWords: number, capacity = 256) {
    this.data = new Uint32Array(stride * capacity)
    this.memo = new StateStore(keyWords, 256)
    this.memoStart = new Int32Array(256)
    this.memoCount = new Int32Array(256)
  }

  /** Makes room for `extra` more outcomes. */
  ensure(extra: number): void {
    const need = (this.length + extra) * this.stride
    if (need <= this.data.length) return
    const next = new Uint32Array(Math.max(need, this.data.length * 2))
    next.set(this.data.subarray(0, this.length * this.stride))
    this.data = next
  }

  /** Appends one outcome (the first `stride` words of `words`). */
  push(words: Uint32Array): void {
    this.ensure(1)
    this.data.set(words, this.length * this.stride)
    this.length++
  }

  /** The remembered list of `key`: its index for `start`, `count` and `error`, or -1. */
  lookup(key: Uint32Array): number {
    return this.memo.lookup(key, 0)
  }

  /** The first outcome of remembered list `idx`. */
  start(idx: number): number { return this.memoStart[idx] }

  /** The number of outcomes of remembered list `idx`. */
  count(idx: number): number { return this.memoCount[idx] }

  /** The model error met while listing `idx`, if any. */
  error(idx: number): ModelError | null { return this.memoError.get(idx) ?? null }

  /** Remembers the list of `count` outcomes from `start` (and its error) under `key`. */
  remember(key: Uint32Array, start: number, count: number, err: ModelError | null): void {
    const idx = this.memo.insert(key, 0)
    if (idx >= this.memoStart.length) {
      const s = new Int32Array(this.memoStart.length * 2)
      s.set(this.memoStart)
      this.memoStart = s
      const c = new Int32Array(this.memoCount.length * 2)
      c.set(this.memoCount)
      this.memoCount = c
    }
    this.memoStart[idx] = start
    this.memoCount[idx] = count
    if (err) this.memoError.set(idx, err)
  }

  /** Forgets every list and empties the pool. */
  reset(): void {
    this.memo.clear()
    this.memoError.clear()
    this.length = 0
  }
}
