// Canonical forms of packed states under permutations of process names, for symmetry reduction of
// cross-checks at sizes above the cutoff. In-class protocols cannot tell processes apart, so the
// reachable set of G_N is closed under renaming processes (a test checks this); a property with
// variables bound to fixed processes is invariant under permutations of the others, so exploring one
// representative per orbit of the free processes decides it.
//
// A permutation `perm` (0-based, perm[i] is the new name of process i) moves process i's alive bit,
// idle counter and scalars to perm[i], its entry about j to perm[i]'s entry about perm[j], and
// channel j->i to perm[j]->perm[i]; message values and `stable` stay. The canonical image is the
// lexicographically least image (word 0 most significant) over every permutation of the free
// processes. Enumerating permutations is fine for the sizes we reduce (n <= 5: at most 120).
import type { Instance } from '../model/instance'
import { channelIndex, type Field, type Layout } from '../model/layout'

/**
 * A permutation compiled to field moves: five ints per field (source word, source shift, mask,
 * target word, target shift). Zero-width fields are left out: they always read 0.
 */
type Moves = Int32Array

function compileMoves(layout: Layout, perm: readonly number[]): Moves {
  const out: number[] = []
  const move = (from: Field | null, to: Field | null) => {
    if (!from || !to || from.bits === 0) return
    out.push(from.word, from.shift, (0xffffffff >>> (32 - from.bits)) | 0, to.word, to.shift)
  }
  const n = layout.n
  for (let i = 0; i < n; i++) {
    const pi = perm[i]
    move(layout.alive[i], layout.alive[pi])
    if (layout.idle) move(layout.idle[i], layout.idle[pi])
    for (let v = 0; v < layout.vars.length; v++) {
      if (!layout.vars[v].perPeer) move(layout.scalar[i][v], layout.scalar[pi][v])
      else for (let j = 0; j < n; j++) if (j !== i) move(layout.entry[i][v][j], layout.entry[pi][v][perm[j]])
    }
  }
  for (let c = 0; c < layout.channel.length; c++) {
    const to = channelIndex(n, perm[layout.channelFrom[c]], perm[layout.channelTo[c]])
    for (let m = 0; m < layout.messageValues; m++) move(layout.channel[c][m], layout.channel[to][m])
  }
  move(layout.stable, layout.stable)
  return Int32Array.from(out)
}

function applyMoves(moves: Moves, words: number, src: Uint32Array, off: number, dst: Uint32Array, dstOff: number): void {
  dst.fill(0, dstOff, dstOff + words)
  for (let k = 0; k < moves.length; k += 5) {
    const v = (src[off + moves[k]] >>> moves[k + 1]) & moves[k + 2]
    dst[dstOff + moves[k + 3]] |= v << moves[k + 4]
  }
}

function checkPerm(n: number, perm: readonly number[]): void {
  const seen = new Set(perm)
  if (perm.length !== n || seen.size !== n || perm.some((x) => !Number.isInteger(x) || x < 0 || x >= n)) {
    throw new Error(`not a permutation of 0..${n - 1}: [${perm.join(', ')}]`)
  }
}

/**
 * Writes to dst[0..words) the state at src[off..] with processes renamed by `perm` (0-based:
 * process i becomes perm[i]). Throws when `perm` is not a permutation of 0..n-1. It compiles the
 * permutation on every call; hot loops use `canonicalizer`, which compiles each permutation once.
 */
export function permuteState(inst: Instance, src: Uint32Array, off: number, perm: readonly number[], dst: Uint32Array): void {
  checkPerm(inst.n, perm)
  applyMoves(compileMoves(inst.layout, perm), inst.words, src, off, dst, 0)
}

/** Every permutation of 0..n-1 that keeps the processes in `fixed` in place, identity first. */
export function freePermutations(n: number, fixed: readonly number[]): number[][] {
  const free: number[] = []
  for (let i = 0; i < n; i++) if (!fixed.includes(i)) free.push(i)
  const out: number[][] = []
  // Lexicographic order of the images, so the identity comes first.
  const used = new Array(free.length).fill(false)
  const pick: number[] = []
  const rec = () => {
    if (pick.length === free.length) {
      const perm = Array.from({ length: n }, (_, i) => i)
      free.forEach((p, k) => (perm[p] = free[pick[k]]))
      out.push(perm)
      return
    }
    for (let k = 0; k < free.length; k++) {
      if (used[k]) continue
      used[k] = true
      pick.push(k)
      rec()
      pick.pop()
      used[k] = false
    }
  }
  rec()
  return out
}

/**
 * A canonicalizer for the states of `inst` under the permutations of every process not in `fixed`
 * (0-based processes that keep their names, typically those a property's variables are bound to).
 * The returned function writes to dst[0..words) the lexicographically least image of the state at
 * src[off..]; two states get the same image iff one is a renaming of the other by such a permutation.
 * `dst` must not overlap the source state. Not re-entrant (it owns a scratch state).
 */
export function canonicalizer(inst: Instance, fixed: number[]): (src: Uint32Array, off: number, dst: Uint32Array) => void {
  const n = inst.n
  for (const f of fixed) if (!Number.isInteger(f) || f < 0 || f >= n) throw new Error(`fixed process ${f} is not a process of G_${n} (0-based)`)
  const words = inst.words
  const perms = freePermutations(n, fixed).slice(1) // the identity is the starting candidate
  const moves = perms.map((p) => compileMoves(inst.layout, p))
  const scratch = new Uint32Array(words)
  return (src, off, dst) => {
    for (let w = 0; w < words; w++) dst[w] = src[off + w]
    for (const m of moves) {
      applyMoves(m, words, src, off, scratch, 0)
      for (let w = 0; w < words; w++) {
        if (scratch[w] === dst[w]) continue
        if (scratch[w] < dst[w]) dst.set(scratch)
        break
      }
    }
  }
}
