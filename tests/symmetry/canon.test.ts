// Canonical forms under process permutations. Oracle: the canonical JSON text (oracle.ts), renamed
// as plain objects, which shares no code with the packed permutation in kernels/symmetry/canon.ts.
import { describe, expect, it } from 'vitest'
import { canonicalState } from '../../kernels/model/decode'
import { compileInstance, type Instance } from '../../kernels/model/instance'
import { canonicalizer, freePermutations, permuteState } from '../../kernels/symmetry/canon'
import { notebook, PUMPS } from './fixtures'
import { permutations, reachable, renameText } from './oracle'

// A yard protocol with every kind of field: idle counters and ages (synchronous, idle 2), scalars,
// two per-peer variables, a message with a field, crashes.
const DEPOT = `protocol yard {
  timing synchronous(delay: 1, idle: 2)
  faults crash
  message crate(v: 0..1)
  state got[peer]: 0..1 = 0
  state late[peer]: bool = false
  state shift: 0..1 = 0
  on crate(v) from q { got[q] := v
    if v = 1 { send crate(0) to q } }
  step {
    shift := 1 - shift
    broadcast crate(shift)
    for q { late[q] := got[q] = 0 }
  }
}`

function setup(n: number): { inst: Instance; words: Uint32Array; count: number; texts: string[] } {
  const c = notebook(DEPOT, ['property fine = forall p, q: always (p.got[q] <= 1)'])
  const inst = compileInstance(c.protocol, n, [])
  const r = reachable(inst, 200000)!
  const texts: string[] = []
  for (let k = 0; k < r.count; k++) texts.push(canonicalState(inst, r.words, k * inst.words))
  return { inst, words: r.words, count: r.count, texts }
}

describe('permuteState', () => {
  const { inst, words, count, texts } = setup(3)
  it('moves every field as renaming the canonical text does', () => {
    const dst = new Uint32Array(inst.words)
    const wrong: string[] = []
    // A spread sample of the reachable states keeps the text oracle's cost down.
    const stride = Math.max(1, Math.floor(count / 1500))
    for (const perm of permutations(3)) {
      for (let k = 0; k < count; k += stride) {
        permuteState(inst, words, k * inst.words, perm, dst)
        if (canonicalState(inst, dst, 0) !== renameText(texts[k], perm)) wrong.push(`[${perm}] ${texts[k]}`)
      }
    }
    expect(wrong).toEqual([])
  })
  it('refuses something that is not a permutation', () => {
    expect(() => permuteState(inst, words, 0, [0, 0, 1], new Uint32Array(inst.words))).toThrow(/not a permutation/)
  })
})

describe('freePermutations', () => {
  it('permutes only the free processes, identity first', () => {
    expect(freePermutations(3, [1])).toEqual([[0, 1, 2], [2, 1, 0]])
    expect(freePermutations(4, []).length).toBe(24)
    expect(freePermutations(3, [0, 1, 2])).toEqual([[0, 1, 2]])
  })
})

describe('canonicalizer', () => {
  const { inst, words, count, texts } = setup(3)
  const W = inst.words
  const key = (w: Uint32Array) => Array.from(w.subarray(0, W)).join(',')

  it('gives every renaming of a state the same image', () => {
    const canon = canonicalizer(inst, [])
    const a = new Uint32Array(W)
    const b = new Uint32Array(W)
    const moved = new Uint32Array(W)
    const wrong: number[] = []
    for (let k = 0; k < count; k++) {
      canon(words, k * W, a)
      for (const perm of permutations(3)) {
        permuteState(inst, words, k * W, perm, moved)
        canon(moved, 0, b)
        if (key(a) !== key(b)) wrong.push(k)
      }
    }
    expect(wrong).toEqual([])
  })

  it('writes the least image over all renamings', () => {
    const canon = canonicalizer(inst, [])
    const out = new Uint32Array(W)
    const moved = new Uint32Array(W)
    for (let k = 0; k < Math.min(count, 300); k++) {
      canon(words, k * W, out)
      let least: number[] | null = null
      for (const perm of permutations(3)) {
        permuteState(inst, words, k * W, perm, moved)
        const m = Array.from(moved)
        const d = least ? m.findIndex((x, i) => x !== least![i]) : 0
        if (!least || (d >= 0 && m[d] < least[d])) least = m
      }
      expect(Array.from(out)).toEqual(least)
    }
  })

  it('counts as many distinct images in G_3 as there are orbits (brute force over renamed texts)', () => {
    const canon = canonicalizer(inst, [])
    const images = new Set<string>()
    const out = new Uint32Array(W)
    for (let k = 0; k < count; k++) {
      canon(words, k * W, out)
      images.add(key(out))
    }
    // Orbit of a state: its renamings under every permutation; one orbit per least text.
    const orbits = new Set(texts.map((t) => permutations(3).map((p) => renameText(t, p)).sort()[0]))
    expect(images.size).toBe(orbits.size)
    expect(images.size).toBeLessThan(count)
  })

  it('keeps fixed processes in place and counts orbits of the others', () => {
    const canon = canonicalizer(inst, [0])
    const images = new Set<string>()
    const out = new Uint32Array(W)
    for (let k = 0; k < count; k++) {
      canon(words, k * W, out)
      images.add(key(out))
    }
    const swaps = [[0, 1, 2], [0, 2, 1]]
    const orbits = new Set(texts.map((t) => swaps.map((p) => renameText(t, p)).sort()[0]))
    expect(images.size).toBe(orbits.size)
  })

  it('works on a four-process instance of the pumps', () => {
    const c = notebook(PUMPS, ['property calm = forall p, q: always (correct(q) implies not p.suspect[q])'])
    const inst4 = compileInstance(c.protocol, 4, [1, 1, 2])
    const init = inst4.initialStates()
    const canon = canonicalizer(inst4, [0, 1])
    const out = new Uint32Array(inst4.words)
    canon(init, 0, out)
    expect(Array.from(out)).toEqual(Array.from(init.subarray(0, inst4.words)))
  })
})
