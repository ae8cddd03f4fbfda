// What a property's formula is made of, asked by every stage that reads one: whether it is free of
// temporal operators, its atoms, the body of an invariant (`always P`), whether a term divides, and
// the assignments of processes to its variables. The checker asks them (sizes, `by induction`), the
// runner routes rows by them and the induction engine encodes by them, so they live once, here,
// beside the formula's type.
import type { Formula, PropertyModel, Term } from './model'

/** Does the formula contain a temporal operator (`always`, `eventually`, `next`, `until`, `unless`)? */
export function isTemporal(f: Formula): boolean {
  switch (f.k) {
    case 'true': case 'false': case 'atom': return false
    case 'always': case 'eventually': case 'next': case 'until': case 'unless': return true
    case 'not': return isTemporal(f.arg)
    default: return isTemporal(f.left) || isTemporal(f.right)
  }
}

/** The atoms of a formula, each once, in order of first appearance. */
export function atomsOf(f: Formula, out: Term[] = []): Term[] {
  if (f.k === 'atom') { if (!out.includes(f.term)) out.push(f.term) }
  else if ('arg' in f) atomsOf(f.arg, out)
  else if ('left' in f) { atomsOf(f.left, out); atomsOf(f.right, out) }
  return out
}

/**
 * P when the formula is `always P` with P free of temporal operators, else null. Such a property is
 * an invariant: checked on every reachable state, without fairness (a state formula P alone is a
 * condition on the initial states, checked through the product).
 */
export function invariantBody(f: Formula): Formula | null {
  return f.k === 'always' && !isTemporal(f.arg) ? f.arg : null
}

/** Is the property an invariant (`always P` with P free of temporal operators)? */
export function isInvariant(p: PropertyModel): boolean {
  return invariantBody(p.formula) !== null
}

/** Does the term divide (`/` or `%`) anywhere? */
export function divides(t: Term): boolean {
  switch (t.k) {
    case 'bin': return t.op === '/' || t.op === '%' || divides(t.left) || divides(t.right)
    case 'min': case 'max': return divides(t.left) || divides(t.right)
    case 'neg': return divides(t.arg)
    default: return false
  }
}

/**
 * Every assignment of distinct processes (0-based) to k variables among n, in the order rows and
 * proofs list them: the first variable varies slowest.
 */
export function assignmentsOf(n: number, k: number): number[][] {
  if (k === 0) return [[]]
  const out: number[][] = []
  for (const rest of assignmentsOf(n, k - 1)) for (let i = 0; i < n; i++) if (!rest.includes(i)) out.push([...rest, i])
  return out
}
