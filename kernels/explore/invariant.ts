// The invariant an `always P` row explores with: P over every chosen assignment of processes, as
// one test on packed states. The runner and the parallel explorer's workers (which rebuild it from
// plain data, parallel-worker.ts) build it here, so both test the same thing.
import { divides } from '../language/formula'
import type { Formula, Term } from '../language/model'
import { statePredicate } from '../logic/predicate'
import type { Instance } from '../model/instance'
import { compileTerm } from '../model/observe'

/**
 * The test of `inv` on a state for every assignment in `chosen` (0-based processes for the
 * property's variables), and which assignment broke it last (`failed`, -1 while none).
 */
export function rowInvariant(inst: Instance, inv: Formula, terms: Term[], chosen: number[][]): { invariant: (w: Uint32Array, o: number) => boolean; failed: () => number } {
  const predicates = chosen.map((a) => statePredicate(inv, (t) => compileTerm(inst, t, a)))
  // A division in the property is evaluated in every atom on every state, whatever the connectives
  // around it, so that a division by zero is a model error (as in protocols) however it is guarded.
  const dividing = terms.some(divides) ? chosen.map((a) => terms.map((t) => compileTerm(inst, t, a))) : null
  let failed = -1
  const invariant = (w: Uint32Array, o: number): boolean => {
    if (dividing) for (const atoms of dividing) for (const t of atoms) t(w, o)
    for (let k = 0; k < predicates.length; k++) if (!predicates[k](w, o)) { failed = k; return false }
    return true
  }
  return { invariant, failed: () => failed }
}
