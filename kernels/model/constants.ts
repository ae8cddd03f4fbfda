// Constant expressions: type bounds, timing bounds and initial values are written over constants,
// and a check may override the constants, so they are evaluated per instance, not by the checker.
import type { Expr, Span, Type } from '../language/model'
import { ConstantError, evalConstant } from '../language/sorts'
import { ModelSetupError } from './errors'

/**
 * Evaluates an expression that may mention only literals and constants (values by declaration
 * index), with the checker's evaluator; a failure becomes a setup error at the expression.
 */
export function evalConst(e: Expr, constants: number[]): number {
  try {
    return evalConstant(e, constants)
  } catch (err) {
    if (!(err instanceof ConstantError)) throw err
    throw new ModelSetupError(`${err.message} in a constant expression at line ${e.span.line}, column ${e.span.column}`, e.span)
  }
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
