// The invariant I of a proof by induction: the conjunction, over the listed properties and every
// assignment of distinct processes to their variables, of the state formula S of `always S`
// (induction.md), as a formula over one copy of the state. A division by zero in a property makes
// its conjunct false (it must hold on every reachable state, and the explorer reports it as an
// error there), which keeps a proof sound.
import type { Arith, Bool } from 'z3-solver'
import { assignmentsOf, isTemporal } from '../language/formula'
import type { Formula, ProcRef, PropertyModel, Span, Term } from '../language/model'
import { ModelSetupError } from '../model/errors'
import type { Instance } from '../model/instance'
import { compileTerm } from '../model/observe'
import { statePredicate } from '../logic/predicate'
import { channelIndex, type Layout } from '../model/layout'
import { toBool, toInt, truncDiv, truncMod } from './encode'
import type { StateVars } from './space'
import type { Z3 } from './solver'

type B = Bool<'twofold'>
type I = Arith<'twofold'>

/** One conjunct of I: a property at one assignment (0-based processes per variable). */
export interface Conjunct {
  property: number
  assignment: number[]
}

/** Why a property cannot be proved by induction, with where; null when it can. */
export function inductionFormError(prop: PropertyModel): { message: string; span: Span } | null {
  const f = prop.formula
  if (f.k !== 'always' || isTemporal(f.arg)) {
    return { message: `\`${prop.name}\` cannot be proved by induction: it must have the form \`always S\` with S free of temporal operators; check it without \`by induction\``, span: f.span }
  }
  return null
}

/** The conjuncts of I at size n, properties in order, then assignments. */
export function conjunctsOf(props: PropertyModel[], n: number): Conjunct[] {
  const out: Conjunct[] = []
  props.forEach((prop, k) => { for (const a of assignmentsOf(n, prop.vars.length)) out.push({ property: k, assignment: a }) })
  return out
}

/** The state formula of one conjunct over copy s. */
export function encodeConjunct(z: Z3, layout: Layout, constants: number[], prop: PropertyModel, a: number[], s: StateVars): B {
  const f = prop.formula
  if (f.k !== 'always') throw new Error('encodeConjunct: not an invariant')
  const defined: B[] = []
  const body = formula(z, layout, constants, f.arg, a, s, defined)
  return defined.length ? z.And(body, ...defined) : body
}

function formula(z: Z3, layout: Layout, constants: number[], f: Formula, a: number[], s: StateVars, defined: B[]): B {
  const sub = (g: Formula) => formula(z, layout, constants, g, a, s, defined)
  switch (f.k) {
    case 'true': return z.Bool.val(true)
    case 'false': return z.Bool.val(false)
    case 'atom': return toBool(z, term(z, layout, constants, f.term, a, s, defined))
    case 'not': return z.Not(sub(f.arg))
    case 'and': return z.And(sub(f.left), sub(f.right))
    case 'or': return z.Or(sub(f.left), sub(f.right))
    case 'implies': return z.Implies(sub(f.left), sub(f.right))
    case 'iff': return z.Iff(sub(f.left), sub(f.right))
  }
  throw new Error('a temporal operator inside an invariant')
}

function proc(n: number, r: ProcRef, a: number[]): number {
  const p = r.k === 'fixed' ? r.n - 1 : a[r.index]
  if (p === undefined || p < 0 || p >= n) {
    const name = r.k === 'fixed' ? `#${r.n}` : `process variable ${r.index + 1}`
    throw new ModelSetupError(`${name} (line ${r.span.line}, column ${r.span.column}) names no process of an instance with ${n}`, r.span)
  }
  return p
}

function term(z: Z3, layout: Layout, constants: number[], t: Term, a: number[], s: StateVars, defined: B[]): B | I {
  const int = (x: Term) => toInt(z, term(z, layout, constants, x, a, s, defined))
  switch (t.k) {
    case 'lit': return z.Int.val(t.value)
    case 'const': return z.Int.val(constants[t.index])
    case 'member': {
      const p = proc(layout.n, t.proc, a)
      if (t.peer === null) {
        const x = s.scalar[p][t.index]
        if (!x) throw new ModelSetupError(`'${layout.vars[t.index].name}' at line ${t.span.line} is used with the wrong shape`, t.span)
        return x
      }
      const q = proc(layout.n, t.peer, a)
      if (q === p) throw new ModelSetupError(`${layout.vars[t.index].name}[..] at line ${t.span.line}, column ${t.span.column} names a process's entry for itself`, t.span)
      const e = s.entry[p][t.index][q]
      if (!e) throw new ModelSetupError(`'${layout.vars[t.index].name}' at line ${t.span.line} is used with the wrong shape`, t.span)
      return e
    }
    case 'alive': return s.alive[proc(layout.n, t.proc, a)]
    case 'crashed': return z.Not(s.alive[proc(layout.n, t.proc, a)])
    case 'pending': {
      const from = proc(layout.n, t.from, a)
      const to = proc(layout.n, t.to, a)
      if (from === to) return z.Bool.val(false)
      const c = channelIndex(layout.n, from, to)
      const m = layout.messages[t.message]
      const any: B[] = []
      for (let v = m.base; v < m.base + m.count; v++) any.push(...s.chan[c][v])
      return any.length ? z.Or(...any) : z.Bool.val(false)
    }
    case 'neg': return int(t.arg).neg()
    case 'min': case 'max': {
      const x = int(t.left), y = int(t.right)
      return z.If(t.k === 'min' ? x.le(y) : x.ge(y), x, y) as I
    }
    case 'bin': {
      const x = int(t.left), y = int(t.right)
      switch (t.op) {
        case '+': return x.add(y)
        case '-': return x.sub(y)
        case '*': return x.mul(y)
        case '/': case '%':
          defined.push(y.neq(z.Int.val(0)))
          return t.op === '/' ? truncDiv(z, x, y) : truncMod(z, x, y)
        case '=': return x.eq(y)
        case '!=': return x.neq(y)
        case '<': return x.lt(y)
        case '<=': return x.le(y)
        case '>': return x.gt(y)
        case '>=': return x.ge(y)
      }
    }
  }
  throw new Error(`unknown term ${(t as Term).k}`)
}

/**
 * The same conjunct evaluated on a packed state by the explicit observer (model/observe.ts), the
 * independent check that a solver's counterexample really satisfies and breaks what it claims.
 */
export function explicitConjunct(inst: Instance, prop: PropertyModel, a: number[]): (w: Uint32Array, off: number) => boolean {
  const f = prop.formula
  if (f.k !== 'always') throw new Error('explicitConjunct: not an invariant')
  const body = statePredicate(f.arg, (t) => compileTerm(inst, t, a))
  // A division by zero anywhere makes the conjunct false, as in the encoding.
  return (w, o) => { try { return body(w, o) !== 0 } catch { return false } }
}
