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
 * A permutation compiled to field moves, grouped by the word they write: the moves that build
 * image word w are `moves[start[w] .. start[w+1])`, four ints each (source word, source shift,
 * mask, target shift). Zero-width fields are left out: they always read 0. Building the image one
 * word at a time, most significant first, lets a comparison stop at the first word that differs.
 */
interface Moves {
  moves: Int32Array
  start: Int32Array
}

function compileMoves(layout: Layout, perm: readonly number[]): Moves {
  const byWord: number[][] = Array.from({ length: layout.words }, () => [])
  const move = (from: Field | null, to: Field | null) => {
    if (!from || !to || from.bits === 0) return
    byWord[to.word].push(from.word, from.shift, (0xffffffff >>> (32 - from.bits)) | 0, to.shift)
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
  // Within a word, the most significant field first: the image's top bits are then final after
  // each move (fields never overlap), so a comparison can stop after the first few moves.
  const sorted = byWord.map((ms) => {
    const quads: number[][] = []
    for (let k = 0; k < ms.length; k += 4) quads.push(ms.slice(k, k + 4))
    return quads.sort((a, b) => b[3] - a[3]).flat()
  })
  const start = new Int32Array(layout.words + 1)
  for (let w = 0; w < layout.words; w++) start[w + 1] = start[w] + sorted[w].length
  return { moves: Int32Array.from(sorted.flat()), start }
}

/** Word w of the image of the state at src[off..] under compiled moves (unsigned). */
function imageWord(m: Moves, w: number, src: Uint32Array, off: number): number {
  const moves = m.moves
  let v = 0
  for (let k = m.start[w], e = m.start[w + 1]; k < e; k += 4) v |= ((src[off + moves[k]] >>> moves[k + 1]) & moves[k + 2]) << moves[k + 3]
  return v >>> 0
}

function applyMoves(m: Moves, words: number, src: Uint32Array, off: number, dst: Uint32Array, dstOff: number): void {
  for (let w = 0; w < words; w++) dst[dstOff + w] = imageWord(m, w, src, off)
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
 * It returns which permutation gave the image: its index in `freePermutations(n, fixed)` (0, the
 * identity, when the state is its own representative); the temporal route records it on edges.
 */
export function canonicalizer(inst: Instance, fixed: number[]): (src: Uint32Array, off: number, dst: Uint32Array) => number {
  const n = inst.n
  for (const f of fixed) if (!Number.isInteger(f) || f < 0 || f >= n) throw new Error(`fixed process ${f} is not a process of G_${n} (0-based)`)
  const words = inst.words
  // Every permutation but the identity (the starting candidate), flattened into one table: the
  // moves of permutation p's image word w are moves[start[p * words + w] .. start[p * words + w + 1]).
  const { moves, start, count } = flatten(freePermutations(n, fixed).slice(1).map((p) => compileMoves(inst.layout, p)), words)
  const scratch = new Uint32Array(words)
  return (src, off, dst) => {
    for (let w = 0; w < words; w++) dst[w] = src[off + w]
    let chosen = 0
    perm: for (let p = 0, row = 0; p < count; p++, row += words) {
      // Most significant bits first: give up on this image as soon as its top bits exceed the best.
      let less = false
      for (let w = 0; w < words; w++) {
        let v = 0
        const best = dst[w]
        for (let k = start[row + w], e = start[row + w + 1]; k < e; k += 4) {
          const sh = moves[k + 3]
          v |= ((src[off + moves[k]] >>> moves[k + 1]) & moves[k + 2]) << sh
          if (less) continue
          const a = v >>> sh, b = best >>> sh
          if (a > b) continue perm
          if (a < b) less = true
        }
        scratch[w] = v >>> 0
      }
      if (less) { for (let k = 0; k < words; k++) dst[k] = scratch[k]; chosen = p + 1 }
    }
    return chosen
  }
}

/** Compiled permutations in one table (see `canonicalizer`): no object is touched in the hot loop. */
function flatten(perms: Moves[], words: number): { moves: Int32Array; start: Int32Array; count: number } {
  const start = new Int32Array(perms.length * words + 1)
  let total = 0
  perms.forEach((m, p) => { for (let w = 0; w < words; w++) { start[p * words + w] = total + m.start[w]; } total += m.moves.length })
  start[perms.length * words] = total
  const moves = new Int32Array(total)
  let at = 0
  for (const m of perms) { moves.set(m.moves, at); at += m.moves.length }
  return { moves, start, count: perms.length }
}

/**
 * The number of states a reduced exploration stands for: each of the first `states`
 * representatives in `data` (`words` each) counts for the size of its orbit under the permutations
 * of the processes not in `fixed`, that is their number divided by the number that fix it. Each
 * permutation is compiled once; a permutation is rejected at the first image word that differs.
 */
export function orbitTotal(inst: Instance, data: Uint32Array, states: number, fixed: number[]): number {
  const W = inst.words
  const perms = freePermutations(inst.n, fixed)
  const moves = perms.slice(1).map((p) => compileMoves(inst.layout, p))
  let total = 0
  for (let s = 0, off = 0; s < states; s++, off += W) {
    let stabilizer = 1 // the identity
    for (const m of moves) {
      let w = 0
      while (w < W && imageWord(m, w, data, off) === data[off + w]) w++
      if (w === W) stabilizer++
    }
    total += perms.length / stabilizer
  }
  return total
}
