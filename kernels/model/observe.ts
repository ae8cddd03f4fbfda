// Property atoms on packed states: what the runner and the temporal product read from a state.
import type { ProcRef, Term } from '../language/model'
import { ModelSetupError, PropertyFault } from './errors'
import type { Instance } from './instance'
import { channelIndex, fieldMask, readField } from './layout'

/** A compiled state term: its integer value (booleans 0/1) on the state at words[off..]. */
export type StateTerm = (words: Uint32Array, off: number) => number

function procOf(inst: Instance, r: ProcRef, assignment: number[]): number {
  const p = r.k === 'fixed' ? r.n - 1 : assignment[r.index]
  if (p === undefined || p < 0 || p >= inst.n) {
    const name = r.k === 'fixed' ? `#${r.n}` : `process variable ${r.index + 1}`
    throw new ModelSetupError(`${name} (line ${r.span.line}, column ${r.span.column}) names no process of an instance with ${inst.n}`, r.span)
  }
  return p
}

/**
 * Compiles a property term for one assignment of the property's variables (`assignment[k]` is the
 * 0-based process bound to quantified variable k; `#n` is process n-1). `pending(M, q -> p)` is 1
 * when some value of kind M is in flight on channel q->p. Throws ModelSetupError when a reference
 * names no process, or `p.x[q]` has p = q. Division or remainder by zero while evaluating throws
 * a PropertyFault (a model error at the operator). The checker proved every intermediate value a
 * safe integer (language/bounds.ts), so the arithmetic is exact.
 */
export function compileTerm(inst: Instance, term: Term, assignment: number[]): StateTerm {
  const { layout } = inst
  const t = term
  switch (t.k) {
    case 'lit': {
      const v = t.value
      return () => v
    }
    case 'const': {
      const v = inst.constants[t.index]
      return () => v
    }
    case 'member': {
      const p = procOf(inst, t.proc, assignment)
      const info = layout.vars[t.index]
      const lo = info.lo
      let f
      if (t.peer === null) f = layout.scalar[p][t.index]
      else {
        const q = procOf(inst, t.peer, assignment)
        if (q === p) throw new ModelSetupError(`${info.name}[..] at line ${t.span.line}, column ${t.span.column} names a process's entry for itself`, t.span)
        f = layout.entry[p][t.index][q]
      }
      if (!f) throw new ModelSetupError(`'${info.name}' at line ${t.span.line} is used with the wrong shape`, t.span)
      const field = f
      return (w, off) => readField(w, off, field) + lo
    }
    case 'alive':
    case 'crashed': {
      const f = layout.alive[procOf(inst, t.proc, assignment)]
      const want = t.k === 'alive' ? 1 : 0
      return (w, off) => (readField(w, off, f) === want ? 1 : 0)
    }
    case 'pending': {
      const from = procOf(inst, t.from, assignment)
      const to = procOf(inst, t.to, assignment)
      if (from === to) return () => 0
      const c = channelIndex(inst.n, from, to)
      const m = layout.messages[t.message]
      // The kind's value fields, as (word, mask) pairs merged per word.
      const byWord = new Map<number, number>()
      for (let v = m.base; v < m.base + m.count; v++) {
        const f = layout.channel[c][v]
        byWord.set(f.word, ((byWord.get(f.word) ?? 0) | fieldMask(f)) >>> 0)
      }
      const wordsOf = Int32Array.from(byWord.keys())
      const masks = Uint32Array.from(byWord.values())
      return (w, off) => {
        for (let k = 0; k < wordsOf.length; k++) if ((w[off + wordsOf[k]] & masks[k]) !== 0) return 1
        return 0
      }
    }
    case 'neg': {
      const a = compileTerm(inst, t.arg, assignment)
      return (w, off) => -a(w, off)
    }
    case 'min':
    case 'max': {
      const a = compileTerm(inst, t.left, assignment)
      const b = compileTerm(inst, t.right, assignment)
      return t.k === 'min' ? (w, off) => Math.min(a(w, off), b(w, off)) : (w, off) => Math.max(a(w, off), b(w, off))
    }
    case 'bin': {
      const a = compileTerm(inst, t.left, assignment)
      const b = compileTerm(inst, t.right, assignment)
      const span = t.span
      switch (t.op) {
        case '+': return (w, o) => a(w, o) + b(w, o)
        case '-': return (w, o) => a(w, o) - b(w, o)
        case '*': return (w, o) => a(w, o) * b(w, o)
        case '/':
        case '%': {
          const div = t.op === '/'
          return (w, o) => {
            const x = a(w, o)
            const y = b(w, o)
            if (y === 0) throw new PropertyFault(span, div ? 'division' : 'modulo')
            return div ? Math.trunc(x / y) : x % y
          }
        }
        case '=': return (w, o) => (a(w, o) === b(w, o) ? 1 : 0)
        case '!=': return (w, o) => (a(w, o) !== b(w, o) ? 1 : 0)
        case '<': return (w, o) => (a(w, o) < b(w, o) ? 1 : 0)
        case '<=': return (w, o) => (a(w, o) <= b(w, o) ? 1 : 0)
        case '>': return (w, o) => (a(w, o) > b(w, o) ? 1 : 0)
        case '>=': return (w, o) => (a(w, o) >= b(w, o) ? 1 : 0)
      }
    }
  }
  throw new Error(`unknown term ${(term as Term).k}`)
}

/**
 * Whether evaluating the term can throw a PropertyFault on some state: it divides or takes a
 * remainder by something other than a nonzero literal or constant. A term for which this is false
 * never faults, so its values may be computed only on the states a search asks about.
 */
export function termMayFault(inst: Instance, term: Term): boolean {
  switch (term.k) {
    case 'neg': return termMayFault(inst, term.arg)
    case 'min':
    case 'max': return termMayFault(inst, term.left) || termMayFault(inst, term.right)
    case 'bin': {
      if (termMayFault(inst, term.left) || termMayFault(inst, term.right)) return true
      if (term.op !== '/' && term.op !== '%') return false
      const d = term.right
      return !((d.k === 'lit' && d.value !== 0) || (d.k === 'const' && inst.constants[d.index] !== 0))
    }
    default: return false
  }
}

/** Whether process i (0-based) is crashed in the state. */
export function isCrashed(inst: Instance, i: number): (words: Uint32Array, off: number) => boolean {
  const f = inst.layout.alive[i]
  return (w, off) => readField(w, off, f) === 0
}

/** Whether channel j->i (0-based, j != i) holds no message in the state. */
export function channelEmpty(inst: Instance, j: number, i: number): (words: Uint32Array, off: number) => boolean {
  const c = channelIndex(inst.n, j, i)
  const byWord = new Map<number, number>()
  for (const f of inst.layout.channel[c]) byWord.set(f.word, ((byWord.get(f.word) ?? 0) | fieldMask(f)) >>> 0)
  const wordsOf = Int32Array.from(byWord.keys())
  const masks = Uint32Array.from(byWord.values())
  return (w, off) => {
    for (let k = 0; k < wordsOf.length; k++) if ((w[off + wordsOf[k]] & masks[k]) !== 0) return false
    return true
  }
}

/** Whether the `stable` flag is set (always true for timing models without it: the bound holds or never applies). */
export function isStable(inst: Instance): (words: Uint32Array, off: number) => boolean {
  const f = inst.layout.stable
  if (!f) return () => true
  return (w, off) => readField(w, off, f) === 1
}
