// The annotated quotient graph of a symmetry-reduced exploration, for the temporal route: one row
// per representative, holding every edge of the full graph out of that representative (its
// successors are distinct raw states, in the representative's own process names), each stored as
// the store index of its target's representative, the permutation the canonicalizer applied to
// the target (an index of symmetry/group.ts), and the fairness marks read on the raw edge
// (fairgraph.ts `fairMarks`). This is the annotated quotient of E. A. Emerson and A. P. Sistla,
// "Utilizing symmetry when model-checking under fairness assumptions: an automata-theoretic
// approach", ACM TOPLAS 19(4), 1997; logic/quotient.ts reads it.
import type { QuotientSystem } from '../logic/quotient'
import type { Instance } from '../model/instance'
import type { StateTerm } from '../model/observe'
import type { Symmetries } from '../logic/quotient'
import { ChunkedInt32 } from '../base/chunked'
import { fairMarks, type FairMarks } from './fairgraph'
import type { EdgeRecorder, ExploreResult } from './reach'
import { StateStore } from '../base/stateset'

/** Distinct (target, perm, marks) triples of one row; slots invalidated by a stamp. */
class TripleSet {
  private a = new Int32Array(64)
  private b = new Int32Array(64)
  private c = new Int32Array(64)
  private stamps = new Int32Array(64)
  private stamp = 1
  private size = 0

  reset(): void {
    this.stamp++
    this.size = 0
  }

  /** True when (x, y, z) is new in this row. */
  add(x: number, y: number, z: number): boolean {
    if ((this.size + 1) * 2 > this.a.length) this.grow()
    const mask = this.a.length - 1
    let slot = (Math.imul(x, 0x9e3779b1) ^ Math.imul(y, 0x85ebca6b) ^ Math.imul(z, 0xc2b2ae35)) >>> 7 & mask
    while (this.stamps[slot] === this.stamp) {
      if (this.a[slot] === x && this.b[slot] === y && this.c[slot] === z) return false
      slot = (slot + 1) & mask
    }
    this.a[slot] = x
    this.b[slot] = y
    this.c[slot] = z
    this.stamps[slot] = this.stamp
    this.size++
    return true
  }

  private grow(): void {
    const { a, b, c, stamps, stamp } = this
    const cap = a.length * 2
    this.a = new Int32Array(cap)
    this.b = new Int32Array(cap)
    this.c = new Int32Array(cap)
    this.stamps = new Int32Array(cap)
    this.stamp = 1
    this.size = 0
    for (let k = 0; k < a.length; k++) if (stamps[k] === stamp) this.add(a[k], b[k], c[k])
  }
}

/** The recorded quotient: row s is cells start[s] .. start[s+1]) of `target`, `perm` and `marks`. */
export interface QuotientGraph {
  start: ChunkedInt32
  target: ChunkedInt32
  perm: ChunkedInt32
  marks: ChunkedInt32
  fairnessSets: number
  bytes: number
}

/** Quotient edges recorded before the recorder gives up and rows are recomputed instead (12 bytes each). */
export const QUOTIENT_EDGE_BUDGET = 32_000_000

/**
 * Records the annotated quotient while a reduced `explore` runs (pass it as `edges` together with
 * `canonicalize`). A representative keeps every edge of the full graph out of it, so the quotient
 * has fewer rows but rows as long as the full graph's: above `budget` edges nothing is kept and
 * `quotientSystemOf` recomputes each row on demand.
 */
export class QuotientRecorder implements EdgeRecorder {
  readonly reduced = true
  private readonly fm: FairMarks
  private start: ChunkedInt32 | null = new ChunkedInt32()
  private target = new ChunkedInt32()
  private perm = new ChunkedInt32()
  private marks = new ChunkedInt32()
  private readonly row = new TripleSet()
  private base = 0

  /** `budget`: edges kept at most; 0 records nothing. */
  constructor(inst: Instance, private readonly budget = QUOTIENT_EDGE_BUDGET) {
    this.fm = fairMarks(inst)
    if (budget <= 0) this.abandon()
  }

  /** Whether the budget was exceeded (nothing is kept then). */
  get abandoned(): boolean {
    return this.start === null
  }

  private abandon(): void {
    this.start = null
    this.target = new ChunkedInt32()
    this.perm = new ChunkedInt32()
    this.marks = new ChunkedInt32()
  }

  beginSource(index: number, src: Uint32Array): void {
    if (!this.start) return
    if (index !== this.start.length) throw new Error(`internal error: quotient row ${index} out of order`)
    if (this.target.length > this.budget) { this.abandon(); return }
    this.start.push(this.target.length)
    this.base = this.fm.sourceMarks(src, 0)
    this.row.reset()
  }

  edge(target: number, dst: Uint32Array, stepped: number, receivedFrom: number, perm: number): void {
    if (!this.start) return
    // dst is the raw successor, in the source's names: the marks are the source's.
    const m = this.fm.edgeMarks(this.base, dst, 0, stepped, receivedFrom)
    if (!this.row.add(target, perm, m)) return
    this.target.push(target)
    this.perm.push(perm)
    this.marks.push(m)
  }

  /** The graph of a complete reduced exploration with `states` representatives, or null when abandoned. */
  graph(states: number): QuotientGraph | null {
    const start = this.start
    if (!start) return null
    if (start.length !== states) throw new Error(`internal error: quotient has ${start.length} rows for ${states} representatives`)
    start.push(this.target.length)
    return {
      start, target: this.target, perm: this.perm, marks: this.marks, fairnessSets: this.fm.fairnessSets,
      bytes: start.bytes + this.target.bytes + this.perm.bytes + this.marks.bytes,
    }
  }
}

/** Store indices of the (canonical) initial states, each once. */
function initialReps(inst: Instance, store: StateStore, canon: (src: Uint32Array, off: number, dst: Uint32Array) => unknown): number[] {
  const W = inst.words
  const out: number[] = []
  const init = inst.initialStates()
  const rep = new Uint32Array(W)
  for (let off = 0; off < init.length; off += W) {
    canon(init, off, rep)
    const k = store.lookup(rep, 0)
    if (k >= 0 && !out.includes(k)) out.push(k)
  }
  return out
}

/**
 * The quotient system the reduced temporal search reads, for one assignment's compiled atoms
 * (which name only fixed processes, so they hold alike on a whole orbit). Atoms are computed now
 * on every representative: a fault throws here (PropertyFault), before the search.
 */
export function quotientSystemOf(inst: Instance, r: ExploreResult, g: QuotientGraph | null, atoms: StateTerm[], group: Symmetries,
  canon: (src: Uint32Array, off: number, dst: Uint32Array) => number): QuotientSystem {
  const W = inst.words
  const data = r.store.data
  const states = r.store.size
  // Atom rows of any width: atom k is bit k % 32 of word k / 32 (as the plain product reads them).
  const AW = Math.max(1, Math.ceil(atoms.length / 32))
  const masks = new Int32Array(states * AW)
  for (let s = 0; s < states; s++) {
    for (let k = 0; k < atoms.length; k++) if (atoms[k](data, s * W)) masks[s * AW + (k >>> 5)] |= 1 << (k & 31)
  }
  const initial = initialReps(inst, r.store, canon)
  const fm = fairMarks(inst)
  const base = { fairnessSets: fm.fairnessSets, states, group, initial: () => initial, atomWords: AW, atoms: (s: number, w = 0) => (w < AW ? masks[s * AW + w] : 0) }
  if (g) {
    const { start, target, perm, marks } = g
    return {
      ...base,
      successors(s, to, p, fair) {
        for (let k = start.get(s), e = start.get(s + 1); k < e; k++) {
          to.push(target.get(k))
          p.push(perm.get(k))
          fair.push(marks.get(k))
        }
      },
    }
  }
  // Recomputed rows: the same edges as the recorder keeps, in the same order (a repeated raw
  // successor reuses its representative and permutation, as in `explore`).
  const store = r.store
  const src = new Uint32Array(W), rep = new Uint32Array(W)
  const row = new TripleSet()
  const raw = new StateStore(W, 64)
  let rawRep = new Int32Array(64), rawPerm = new Int32Array(64)
  return {
    ...base,
    successors(s, to, p, fair) {
      store.get(s, src, 0)
      const sm = fm.sourceMarks(src, 0)
      row.reset()
      raw.clear()
      inst.successors(src, 0, (dst, stepped, receivedFrom) => {
        const before = raw.size
        const k = raw.insert(dst, 0)
        let t: number, perm: number
        if (k < before) { t = rawRep[k]; perm = rawPerm[k] } else {
          perm = canon(dst, 0, rep)
          t = store.lookup(rep, 0)
          if (k >= rawRep.length) {
            const a = new Int32Array(rawRep.length * 2); a.set(rawRep); rawRep = a
            const b = new Int32Array(rawPerm.length * 2); b.set(rawPerm); rawPerm = b
          }
          rawRep[k] = t
          rawPerm[k] = perm
        }
        if (t < 0) return false
        const m = fm.edgeMarks(sm, dst, 0, stepped, receivedFrom)
        if (row.add(t, perm, m)) { to.push(t); p.push(perm); fair.push(m) }
        return false
      })
    },
  }
}
