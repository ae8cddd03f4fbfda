// Test helper: the independent oracle of the logic tests. It evaluates LTL directly on an
// ultimately periodic word u·v^ω from the textbook semantics (the definitions of each operator
// over the suffixes of an infinite word), without normal forms, rewriting or automata. The word
// has positions 0..n-1 for the letters of u·v, and position n-1 is followed by position |u|; so
// the suffix at any later index of the infinite word is the suffix at one of these positions,
// and a walk of n steps from a position meets every position that any later index can be.
//
// Also here: a seeded random source, random formulas, random systems, and the lasso word as a
// tiny System for the product.
import type { Ltl } from '../../kernels/logic/ltl'
import type { System } from '../../kernels/logic/product'

/**
 * An ultimately periodic word: letters are masks of the atoms that hold (a number for atoms 0..31,
 * a BigInt for any number of atoms); `loop` is non-empty.
 */
export interface LassoWord {
  prefix: (number | bigint)[]
  loop: (number | bigint)[]
}

/** Whether atom a holds in a letter. */
export function letterHas(letter: number | bigint, a: number): boolean {
  return typeof letter === 'bigint' ? ((letter >> BigInt(a)) & 1n) === 1n : a < 32 && ((letter >>> a) & 1) === 1
}

/** Word w (atoms 32w..32w+31) of a letter, as a 32-bit integer. */
export function letterWord(letter: number | bigint, w: number): number {
  return typeof letter === 'bigint' ? Number((letter >> BigInt(32 * w)) & 0xffffffffn) | 0 : w === 0 ? letter : 0
}

/** Whether the word satisfies the formula at its first position, by the textbook semantics. */
export function holdsOn(f: Ltl, w: LassoWord): boolean {
  return evaluate(f, w)[0]
}

/** The truth value of the formula at each of the word's n positions. */
export function evaluate(f: Ltl, w: LassoWord): boolean[] {
  const letters = [...w.prefix, ...w.loop]
  const n = letters.length
  const succ = (i: number) => (i + 1 < n ? i + 1 : w.prefix.length)
  const all = (g: (i: number) => boolean) => letters.map((_, i) => g(i))
  const go = (f: Ltl): boolean[] => {
    switch (f.op) {
      case 'true': return all(() => true)
      case 'false': return all(() => false)
      case 'atom': return all((i) => letterHas(letters[i], f.atom))
      case 'not': { const a = go(f.arg); return all((i) => !a[i]) }
      case 'next': { const a = go(f.arg); return all((i) => a[succ(i)]) }
      // w^i |= always a iff w^j |= a for every j >= i
      case 'always': { const a = go(f.arg); return all((i) => walk(i, (j) => (a[j] ? undefined : false), true)) }
      // w^i |= eventually a iff w^j |= a for some j >= i
      case 'eventually': { const a = go(f.arg); return all((i) => walk(i, (j) => (a[j] ? true : undefined), false)) }
      default: {
        const a = go(f.left), b = go(f.right)
        switch (f.op) {
          case 'and': return all((i) => a[i] && b[i])
          case 'or': return all((i) => a[i] || b[i])
          case 'implies': return all((i) => !a[i] || b[i])
          case 'iff': return all((i) => a[i] === b[i])
          // some j >= i has b, and every k in i..j-1 has a
          case 'until': return all((i) => walk(i, (j) => (b[j] ? true : a[j] ? undefined : false), false))
          // as until, or a at every j >= i
          case 'unless': return all((i) => walk(i, (j) => (b[j] ? true : a[j] ? undefined : false), true))
          // every j >= i has b, unless some k in i..j-1 has a
          case 'release': return all((i) => walk(i, (j) => (!b[j] ? false : a[j] ? true : undefined), true))
        }
      }
    }
  }
  // Visits positions i, succ(i), ... (n of them cover every position reachable from i) and
  // returns the first decision of `step`, or `otherwise` when the walk never decides.
  const walk = (i: number, step: (j: number) => boolean | undefined, otherwise: boolean): boolean => {
    for (let k = 0, j = i; k <= n; k++, j = succ(j)) {
      const d = step(j)
      if (d !== undefined) return d
    }
    return otherwise
  }
  return go(f)
}

/** The word as a System with one run: states are its positions, no fairness sets. */
export function wordSystem(w: LassoWord): System {
  const letters = [...w.prefix, ...w.loop]
  const n = letters.length
  return {
    fairnessSets: 0,
    initial: () => [0],
    successors: (s, to, fair) => { to.push(s + 1 < n ? s + 1 : w.prefix.length); fair.push(0) },
    atoms: (s, word = 0) => letterWord(letters[s], word),
    atomWords: 8,
  }
}

/** A small seeded random source (mulberry32), so that generated cases repeat run after run. */
export class Random {
  private s: number
  constructor(seed: number) { this.s = seed >>> 0 }
  /** Uniform in [0, 1). */
  next(): number {
    let t = (this.s = (this.s + 0x6d2b79f5) >>> 0)
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  /** Uniform integer in [0, n). */
  int(n: number): number { return Math.floor(this.next() * n) }
  pick<T>(xs: readonly T[]): T { return xs[this.int(xs.length)] }
}

const UNARY = ['not', 'next', 'always', 'eventually'] as const
const BINARY = ['and', 'or', 'implies', 'iff', 'until', 'release', 'unless'] as const

/** A random formula of depth at most `depth` over atoms 0..atoms-1, using every operator. */
export function randomLtl(r: Random, depth: number, atoms: number): Ltl {
  const x = r.next()
  if (depth === 0 || x < 0.2) {
    const y = r.next()
    if (y < 0.06) return { op: 'true' }
    if (y < 0.12) return { op: 'false' }
    return { op: 'atom', atom: r.int(atoms) }
  }
  if (x < 0.5) return { op: r.pick(UNARY), arg: randomLtl(r, depth - 1, atoms) }
  return { op: r.pick(BINARY), left: randomLtl(r, depth - 1, atoms), right: randomLtl(r, depth - 1, atoms) }
}

/** A random lasso word over atoms 0..atoms-1 with |u| < maxPrefix and 1 <= |v| <= maxLoop. */
export function randomWord(r: Random, atoms: number, maxPrefix = 4, maxLoop = 4): LassoWord {
  const letter = () => r.int(1 << atoms)
  return {
    prefix: Array.from({ length: r.int(maxPrefix) }, letter),
    loop: Array.from({ length: 1 + r.int(maxLoop) }, letter),
  }
}

/** A random lasso word over atoms 0..atoms-1 (any number), letters as BigInt masks, each atom holding with probability `density`. */
export function randomWideWord(r: Random, atoms: number, maxPrefix = 4, maxLoop = 4, density = 0.5): LassoWord {
  const letter = () => {
    let m = 0n
    for (let a = 0; a < atoms; a++) if (r.next() < density) m |= 1n << BigInt(a)
    return m
  }
  return {
    prefix: Array.from({ length: r.int(maxPrefix) }, letter),
    loop: Array.from({ length: 1 + r.int(maxLoop) }, letter),
  }
}

/** An explicit system: edges with fairness marks, atom masks per state. */
export interface ExplicitSystem extends System {
  states: number
  labels: number[]
  edges: { from: number; to: number; fair: number }[]
  starts: number[]
}

/** A random system on 1..maxStates states: every state has 1..3 successors, random labels and fairness marks. */
export function randomSystem(r: Random, atoms: number, maxStates: number, fairnessSets = 0): ExplicitSystem {
  const n = 1 + r.int(maxStates)
  const labels = Array.from({ length: n }, () => r.int(1 << atoms))
  const edges: { from: number; to: number; fair: number }[] = []
  for (let s = 0; s < n; s++) {
    const k = 1 + r.int(3)
    for (let i = 0; i < k; i++) edges.push({ from: s, to: r.int(n), fair: r.int(1 << fairnessSets) })
  }
  const starts = [...new Set(Array.from({ length: 1 + r.int(2) }, () => r.int(n)))]
  return explicitSystem(n, labels, edges, starts, fairnessSets)
}

/** A System over explicit edges. */
export function explicitSystem(states: number, labels: number[], edges: { from: number; to: number; fair: number }[],
                               starts: number[], fairnessSets = 0): ExplicitSystem {
  const out: { to: number; fair: number }[][] = Array.from({ length: states }, () => [])
  for (const e of edges) out[e.from].push(e)
  return {
    states, labels, edges, starts, fairnessSets,
    initial: () => starts,
    successors: (s, to, fair) => { for (const e of out[s]) { to.push(e.to); fair.push(e.fair) } },
    atoms: (s) => labels[s],
  }
}

/**
 * Every lasso of the system whose prefix and cycle have at most `maxLength` states together, as
 * (state path, loop start, fairness marks of the cycle's edges). Brute force, for small systems.
 */
export function* lassosOf(sys: ExplicitSystem, maxLength: number): Generator<{ states: number[]; loopStart: number; cycleFair: number }> {
  const out: { to: number; fair: number }[][] = Array.from({ length: sys.states }, () => [])
  for (const e of sys.edges) out[e.from].push(e)
  const path: number[] = [], fairs: number[] = []
  function* extend(): Generator<{ states: number[]; loopStart: number; cycleFair: number }> {
    const last = path[path.length - 1]
    for (const e of out[last]) {
      // Close the loop back to any earlier occurrence of e.to ...
      for (let j = 0; j < path.length; j++) {
        if (path[j] !== e.to) continue
        let cycleFair = e.fair
        for (let k = j; k < path.length - 1; k++) cycleFair |= fairs[k]
        yield { states: [...path], loopStart: j, cycleFair }
      }
      // ... or go on.
      if (path.length < maxLength) {
        path.push(e.to); fairs.push(e.fair)
        yield* extend()
        path.pop(); fairs.pop()
      }
    }
  }
  for (const s of sys.starts) {
    path.push(s)
    yield* extend()
    path.pop()
  }
}

/** The word a run of states spells. */
export function wordOf(sys: { atoms(s: number, word?: number): number }, prefix: number[], cycle: number[]): LassoWord {
  return { prefix: prefix.map((s) => sys.atoms(s)), loop: cycle.map((s) => sys.atoms(s)) }
}
