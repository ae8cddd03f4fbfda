// The theorem instance a cutoff stands for, as plain text and as TeX: "for every N >= 2:
// G_N |= forall p != q. phi(p, q)  iff  G_2 |= phi(1, 2)". The formula is printed from the resolved
// model (not from the source text) by the one formula printer, language/formula-print.ts, with the
// precedence table of language.md deciding parentheses, so the quantified form and the instantiated
// form (processes `#1`, `#2`) come from one printer.
//
// TeX safety: the TeX holds only fixed macros, digits and names; every name taken from the notebook
// is reduced to [A-Za-z0-9_], printed as \mathit{...} with `_` escaped (single letters stay bare).
import { printShown, showFormula, texName, type Shown } from '../language/formula-print'
import type { ProcRef, PropertyModel, ProtocolModel } from '../language/model'

export { texName }

/** Formulas printed longer than this are named instead (`settles(p, q)`). */
const SHORT = 56

/** The plain-text and TeX theorem instance for a property with a cutoff of `k` (its variable count). */
export function theoremStatement(protocol: ProtocolModel, property: PropertyModel): { statement: string; tex: string } {
  const vars = property.vars
  const k = vars.length
  const byName = (r: ProcRef): Shown => (r.k === 'var' ? { k: 'name', name: vars[r.index] ?? '?' } : { k: 'fixed', n: r.n })
  const fixed = (r: ProcRef): Shown => ({ k: 'fixed', n: r.k === 'var' ? r.index + 1 : r.n })
  const quantifiedShown = showFormula(protocol, property.formula, byName)
  const instanceShown = showFormula(protocol, property.formula, fixed)
  const body = printShown(quantifiedShown, 'text')
  const short = body.length <= SHORT

  const bound = k === 2 ? `${vars[0]} != ${vars[1]}` : vars[0]
  const texBound = k === 2 ? `${texName(vars[0])} \\neq ${texName(vars[1])}` : texName(vars[0])
  const ones = k === 2 ? '1, 2' : '1'
  let quantified: string
  let instance: string
  let texQuantified: string
  let texInstance: string
  if (short) {
    quantified = body
    instance = printShown(instanceShown, 'text')
    texQuantified = `(${printShown(quantifiedShown, 'tex')})`
    texInstance = printShown(instanceShown, 'tex')
  } else {
    quantified = `${property.name}(${vars.join(', ')})`
    instance = `${property.name}(${ones})`
    texQuantified = `${texName(property.name)}(${vars.map(texName).join(', ')})`
    texInstance = `${texName(property.name)}(${ones})`
  }
  return {
    statement: `for every N >= ${k}: G_N |= forall ${bound}. ${quantified}  iff  G_${k} |= ${instance}`,
    tex: `G_N \\models \\forall ${texBound}.\\ ${texQuantified} \\iff G_${k} \\models ${texInstance}\\quad\\text{for every } N \\ge ${k}`,
  }
}
