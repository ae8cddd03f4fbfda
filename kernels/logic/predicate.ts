// A state formula as a test on packed states: the connectives of a formula free of temporal
// operators over atoms the instance has compiled. The invariant route evaluates it on every
// reachable state; the logic stays independent of how an atom reads a state.
import type { Formula, Term } from '../language/model'

/** A test on the state at words[off..]: nonzero when it holds (the shape of a compiled term). */
export type StateTest = (words: Uint32Array, off: number) => number

/** The test of a formula free of temporal operators, each atom compiled by `atom`. Throws on a temporal operator. */
export function statePredicate(f: Formula, atom: (t: Term) => StateTest): StateTest {
  switch (f.k) {
    case 'true': return () => 1
    case 'false': return () => 0
    case 'atom': { const t = atom(f.term); return (w, o) => (t(w, o) ? 1 : 0) }
    case 'not': { const a = statePredicate(f.arg, atom); return (w, o) => (a(w, o) ? 0 : 1) }
    case 'and': { const a = statePredicate(f.left, atom), b = statePredicate(f.right, atom); return (w, o) => (a(w, o) && b(w, o) ? 1 : 0) }
    case 'or': { const a = statePredicate(f.left, atom), b = statePredicate(f.right, atom); return (w, o) => (a(w, o) || b(w, o) ? 1 : 0) }
    case 'implies': { const a = statePredicate(f.left, atom), b = statePredicate(f.right, atom); return (w, o) => (!a(w, o) || b(w, o) ? 1 : 0) }
    case 'iff': { const a = statePredicate(f.left, atom), b = statePredicate(f.right, atom); return (w, o) => (!a(w, o) === !b(w, o) ? 1 : 0) }
  }
  throw new Error('a temporal operator inside a state predicate')
}
