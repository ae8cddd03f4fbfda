// The cutoff decision and its certificate: whether a small instance G_k stands for every G_N, for
// one protocol and one property, and the theorem instance it stands for.
//
// The theorem applied (cutoff.md): for symmetric point-to-point protocols, a next-free property
// `forall p: phi(p)` holds in every G_N (N >= 1) iff it holds in G_1, and `forall p, q: psi(p, q)`
// holds in every G_N (N >= 2) iff `psi(1, 2)` holds in G_2. Sources: "Cutoffs for Symmetric
// Point-to-Point Distributed Algorithms", NETYS 2020, LNCS 12129; and "A case study on parametric
// verification of failure detectors", Logical Methods in Computer Science 19(1), 2023. The
// conditions of the theorem are checked here as rules 1-6 of the class check (classcheck.ts): rules
// 1-5 keep every per-peer module of a process (its entries about q and the channel from q) and its
// scalar part free of information about other peers, which is what the papers' symmetric
// point-to-point form guarantees by construction; rule 6 is the papers' property fragment. Rule 4
// also admits a reply `send M to q` under `on ... from q`, beyond the papers' send-to-all form: the
// reply lies inside q's module, so removing or adding a process still leaves every other module as
// it was, and the projection argument of cutoff.md goes through unchanged.
import type { PropertyModel, ProtocolModel } from '../language/model'
import type { CutoffInfo } from '../result'
import { classCheck } from './classcheck'
import { ruleLabel } from './rules'
import { theoremStatement } from './statement'

/** What each rule guarantees, said once it has passed. */
const PASSED: Record<number, string> = {
  1: 'peer-entries (rule 1): every per-peer entry x[q] is written only from the process\'s own state and from q',
  2: 'mixed-silent (rule 2): no scalar carrying information from peers feeds an entry, a send or the property',
  3: 'own-broadcast (rule 3): every broadcast depends only on the process\'s own state, with own fields',
  4: 'peer-reply (rule 4): every send to q depends only on own state and on q (a reply to the handled peer included)',
  5: 'no-aggregate (rule 5): no aggregate feeds an entry, a send or the property',
  6: 'property-form (rule 6): the property is next-free, quantified with forall, and each atom speaks of one process or of one process\'s view of the other',
}

function ruleList(rules: number[]): string {
  const labels = rules.map((r) => ruleLabel(r))
  if (labels.length === 1) return `${labels[0]} fails`
  return `${labels.slice(0, -1).join(', ')} and ${labels[labels.length - 1]} fail`
}

/**
 * Decides whether the cutoff applies to `property` (resolved against `protocol`). When it applies,
 * `processes` is k (1 for `forall p`, 2 for `forall p, q`), `statement`/`tex` give the theorem
 * instance and `passed` one sentence per rule. When it does not, `reasons` holds every violation
 * (rule, line, column, message), `statement` says which rules fail and that explicit sizes are
 * needed, `tex` is empty and `passed` is empty.
 */
export function decideCutoff(protocol: ProtocolModel, property: PropertyModel): CutoffInfo {
  const check = classCheck(protocol, property)
  if (check.reasons.length > 0) {
    const rules = [...new Set(check.reasons.map((r) => r.rule))].sort((a, b) => a - b)
    return {
      applies: false,
      processes: null,
      statement: `${ruleList(rules)}; give explicit sizes, as in \`at N = 2..3\``,
      tex: '',
      passed: [],
      reasons: check.reasons,
    }
  }
  const { statement, tex } = theoremStatement(protocol, property)
  return {
    applies: true,
    processes: property.vars.length,
    statement,
    tex,
    passed: check.passed.map((r) => PASSED[r]),
    reasons: [],
  }
}
