// The group of permutations of the free processes (those a property does not name) as a table:
// elements are indices into `freePermutations(n, fixed)` (0 is the identity), with composition,
// inverses and the action on the fairness marks of semantics.md (fairgraph.ts `fairMarks`: bit i
// for process i, then one bit per channel j->i, last `stable`). The temporal route under symmetry
// reduction (logic/quotient.ts) reads permutations only through this table.
import type { Symmetries } from '../logic/quotient'
import { freePermutations } from './canon'

export type { Symmetries }

/**
 * The permutations of 0..n-1 that keep `fixed` in place, acting on the fairness marks of an
 * instance with n processes (`fairnessSets` bits: n process bits, n(n-1) channel bits, and one
 * `stable` bit when there are n + n(n-1) + 1 of them, which no permutation moves).
 */
export function symmetries(n: number, fixed: readonly number[], fairnessSets: number): Symmetries {
  const perms = freePermutations(n, fixed)
  const size = perms.length
  const key = (p: readonly number[]) => p.join(',')
  const index = new Map(perms.map((p, k) => [key(p), k]))
  const compose = new Int32Array(size * size)
  const inverse = new Int32Array(size)
  for (let a = 0; a < size; a++) {
    const pa = perms[a]
    const inv = new Array<number>(n)
    for (let i = 0; i < n; i++) inv[pa[i]] = i
    inverse[a] = index.get(key(inv))!
    for (let b = 0; b < size; b++) compose[a * size + b] = index.get(key(perms[b].map((x) => pa[x])))!
  }
  // Channel j->i is fairness bit n + j * (n - 1) + (i < j ? i : i - 1) (fairgraph.ts).
  const channelBit = (j: number, i: number) => n + j * (n - 1) + (i < j ? i : i - 1)
  const f = fairnessSets
  const image = new Int32Array(size * Math.max(1, f))
  for (let a = 0; a < size; a++) {
    const p = perms[a]
    for (let b = 0; b < f; b++) image[a * f + b] = b
    for (let i = 0; i < n && i < f; i++) image[a * f + i] = p[i]
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < n; i++) {
        if (i === j) continue
        const b = channelBit(j, i)
        if (b < f) image[a * f + b] = channelBit(p[j], p[i])
      }
    }
  }
  const fairMask = f === 0 ? 0 : f >= 31 ? 0x7fffffff : (1 << f) - 1
  return {
    size,
    compose: (a, b) => compose[a * size + b],
    inverse: (a) => inverse[a],
    mapBit: (a, bit) => image[a * f + bit],
    mapMarks(a, marks) {
      if (a === 0) return marks
      let out = marks & ~fairMask
      for (let rest = marks & fairMask; rest !== 0; rest &= rest - 1) out |= 1 << image[a * f + (31 - Math.clz32(rest & -rest))]
      return out
    },
    perm: (a) => perms[a],
  }
}
