// Constant expressions: type bounds, timing bounds and initial values are written over constants,
// and a check may override the constants, so they are evaluated per instance, not by the checker.
import type { Expr, Span, Type } from '../language/model'
import { ModelSetupError } from './errors'

/** Evaluates an expression that may mention only literals and constants (values by declaration index). */
export function evalConst(e: Expr, constants: number[]): number {
  switch (e.k) {
    case 'lit':
      return e.value
    case 'const':
      return constants[e.index]
    case 'neg':
      return -evalConst(e.arg, constants)
    case 'not':
      return evalConst(e.arg, constants) !== 0 ? 0 : 1
    case 'min':
      return Math.min(evalConst(e.left, constants), evalConst(e.right, constants))
    case 'max':
      return Math.max(evalConst(e.left, constants), evalConst(e.right, constants))
    case 'ite':
      return evalConst(e.cond, constants) !== 0 ? evalConst(e.then, constants) : evalConst(e.else, constants)
    case 'bin': {
      const a = evalConst(e.left, constants)
      const b = evalConst(e.right, constants)
      switch (e.op) {
        case '+': return a + b
        case '-': return a - b
        case '*': return a * b
        case '/':
        case '%':
          if (b === 0) throw new ModelSetupError(`division by zero in a constant expression at line ${e.span.line}, column ${e.span.column}`, e.span)
          return e.op === '/' ? Math.trunc(a / b) : a % b
        case '=': return a === b ? 1 : 0
        case '!=': return a !== b ? 1 : 0
        case '<': return a < b ? 1 : 0
        case '<=': return a <= b ? 1 : 0
        case '>': return a > b ? 1 : 0
        case '>=': return a >= b ? 1 : 0
        case 'and': return a !== 0 && b !== 0 ? 1 : 0
        case 'or': return a !== 0 || b !== 0 ? 1 : 0
        case 'implies': return a === 0 || b !== 0 ? 1 : 0
        case 'iff': return (a !== 0) === (b !== 0) ? 1 : 0
      }
    }
  }
  throw new ModelSetupError(`not a constant expression at line ${e.span.line}, column ${e.span.column}`, e.span)
}

/** The integer bounds [lo, hi] of a type under these constants; an empty range is a setup error. */
export function typeBounds(t: Type, constants: number[], span: Span): [number, number] {
  if (t.k === 'bool') return [0, 1]
  if (t.k === 'enum') return [0, t.labels.length - 1]
  const lo = evalConst(t.lo, constants)
  const hi = evalConst(t.hi, constants)
  if (hi < lo) {
    throw new ModelSetupError(`the range ${lo}..${hi} at line ${span.line}, column ${span.column} is empty`, span)
  }
  return [lo, hi]
}

/** A type as people read it: `bool`, `1..4` (bounds evaluated), `{calm, alarm}`. */
export function typeText(t: Type, bounds: [number, number]): string {
  if (t.k === 'bool') return 'bool'
  if (t.k === 'enum') return `{${t.labels.join(', ')}}`
  return `${bounds[0]}..${bounds[1]}`
}
