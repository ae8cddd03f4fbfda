// Translation of short temporal properties that used to explode (issue 10, item 13): the whole
// pipeline of `ltlToAutomaton` (state predicates, simplification, splits, tableau, reductions)
// against an in-process baseline, the tableau alone on the negation normal form
// (`buildAutomaton(nnf(...))`: this tableau without predicates and splits; the earlier GPVW
// tableau is gone), under the same budget, so the
// baseline ends too (as "over budget" when it would explode). Both run in the same process.
import { buildAutomaton, ltlToAutomaton, TRANSLATION_BUDGET, TranslationAborted, type TranslationWork } from '../kernels/logic/automaton'
import { always as G, and, atom, eventually as F, iff, type Ltl, nnf, not, or } from '../kernels/logic/ltl'

/** One formula: sizes and seconds of the pipeline and of the baseline (null states: over budget). */
export interface TranslationCase {
  name: string
  states: number | null
  transitions: number | null
  work: number
  seconds: number
  baselineStates: number | null
  baselineWork: number
  baselineSeconds: number
}

const a = (i: number) => atom(i)
const nested = (k: number, i = 0): Ltl => (k === 0 ? a(i) : F(and(a(i), G(or(a(i + 1), nested(k - 1, i + 2))))))
const chain = (n: number, t: (i: number) => Ltl) => Array.from({ length: n }, (_, i) => t(i)).reduce((x, y) => iff(x, y))

function measure(translate: (f: Ltl, work: TranslationWork) => { states: number; succ: Int32Array }, f: Ltl) {
  const work = {} as TranslationWork
  const t0 = performance.now()
  let states: number | null = null, transitions: number | null = null
  try {
    const aut = translate(f, work)
    states = aut.states
    transitions = aut.succ.length
  } catch (e) {
    if (!(e instanceof TranslationAborted)) throw e
  }
  return { states, transitions, work: work.created, seconds: (performance.now() - t0) / 1000 }
}

export function translationCases(): TranslationCase[] {
  const formulas: [string, Ltl][] = [
    ['six nested eventually (a and always (b or ...))', nested(6)],
    ['ten disjuncts of eventually always', Array.from({ length: 10 }, (_, i) => F(G(a(i)))).reduce((x, y) => or(x, y))],
    ['always of an eight-term iff chain', G(chain(8, a))],
    ['eight-term iff chain of eventually', chain(8, (i) => F(a(i)))],
  ]
  return formulas.map(([name, f]) => {
    const g = not(f)
    const run = measure((x, work) => ltlToAutomaton(x, { work }), g)
    const base = measure((x, work) => buildAutomaton(nnf(x), { work, budget: TRANSLATION_BUDGET }), g)
    return {
      name, states: run.states, transitions: run.transitions, work: run.work, seconds: run.seconds,
      baselineStates: base.states, baselineWork: base.work, baselineSeconds: base.seconds,
    }
  })
}
