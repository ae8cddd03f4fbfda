// Oracle: a JavaScript Set of the keys' text, fed the same random keys.
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { StateStore } from '../../kernels/base/stateset'

describe('state store', () => {
  it('agrees with a Set of strings on random keys, indices in insertion order', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 4 }), fc.array(fc.array(fc.integer({ min: 0, max: 7 }), { minLength: 4, maxLength: 4 }), { maxLength: 400 }), (words, keys) => {
        const store = new StateStore(words, 4)
        const oracle = new Map<string, number>()
        const buf = new Uint32Array(words)
        for (const k of keys) {
          // Small values make repeats common; high bits exercise the full word.
          for (let w = 0; w < words; w++) buf[w] = (k[w] * 0x10000001) >>> 0
          const text = Array.from(buf).join(',')
          const before = store.size
          const idx = store.insert(buf, 0)
          if (oracle.has(text)) expect(idx).toBe(oracle.get(text))
          else {
            expect(idx).toBe(before)
            oracle.set(text, idx)
          }
          expect(store.lookup(buf, 0)).toBe(idx)
        }
        expect(store.size).toBe(oracle.size)
        const out = new Uint32Array(words)
        for (const [text, idx] of oracle) {
          store.get(idx, out)
          expect(Array.from(out).join(',')).toBe(text)
        }
      }),
      { numRuns: 200 },
    )
  })

  it('returns -1 for an absent key', () => {
    const store = new StateStore(2)
    store.insert(Uint32Array.of(1, 2), 0)
    expect(store.lookup(Uint32Array.of(2, 1), 0)).toBe(-1)
  })

  it('keeps every key across many growths', () => {
    const store = new StateStore(1, 16)
    const buf = new Uint32Array(1)
    for (let k = 0; k < 50_000; k++) {
      buf[0] = Math.imul(k, 2654435761) >>> 0
      expect(store.insert(buf, 0)).toBe(k)
    }
    for (let k = 0; k < 50_000; k += 97) {
      buf[0] = Math.imul(k, 2654435761) >>> 0
      expect(store.lookup(buf, 0)).toBe(k)
    }
  })

  it('reads keys at an offset inside a larger array', () => {
    const store = new StateStore(2)
    const big = Uint32Array.of(9, 9, 3, 4, 9)
    const idx = store.insert(big, 2)
    expect(store.lookup(Uint32Array.of(3, 4), 0)).toBe(idx)
    expect(Array.from(store.data.subarray(store.offset(idx), store.offset(idx) + 2))).toEqual([3, 4])
  })

  it('empties on clear', () => {
    const store = new StateStore(1)
    store.insert(Uint32Array.of(5), 0)
    store.clear()
    expect(store.size).toBe(0)
    expect(store.lookup(Uint32Array.of(5), 0)).toBe(-1)
  })
})
