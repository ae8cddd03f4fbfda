// Sorts: the checker's view of a value's type (an integer, a boolean, or one enum), and the
// evaluation of constant expressions with given constant values.
import type { Expr, Type } from './model'

export type Sort = { k: 'int' } | { k: 'bool' } | { k: 'enum'; labels: readonly string[] }

export const INT: Sort = { k: 'int' }
export const BOOL: Sort = { k: 'bool' }

/** The sort of values of a declared type. */
export function sortOf(type: Type): Sort {
  return type.k === 'range' ? INT : type.k === 'bool' ? BOOL : { k: 'enum', labels: type.labels }
}

export function sameSort(a: Sort, b: Sort): boolean {
  if (a.k !== b.k) return false
  if (a.k === 'enum' && b.k === 'enum') return a.labels.length === b.labels.length && a.labels.every((l, i) => l === b.labels[i])
  return true
}

/**
 * Why `l op r` (op one of `=`, `!=`, `<`, `<=`, `>`, `>=`) is ill-typed, in one sentence, or null
 * when it is well typed: an order compares integers, an equality values of one sort. Protocols and
 * properties type their comparisons by this one rule.
 */
export function comparisonProblem(op: string, l: Sort, r: Sort): string | null {
  if (op !== '=' && op !== '!=' && (l.k !== 'int' || r.k !== 'int')) {
    return `\`${op}\` compares integers, but this compares ${sortName(l)} with ${sortName(r)}; use \`=\` or \`!=\` for other values`
  }
  if (!sameSort(l, r)) return `this compares ${sortName(l)} with ${sortName(r)}; compare values of the same type`
  return null
}

/**
 * The value of an integer literal as written, or the sentence saying it is too large to be exact
 * (not a safe integer). Protocols and properties read their numbers by this one rule.
 */
export function integerLiteral(text: string): { value: number } | { problem: string } {
  const value = Number(text)
  return Number.isSafeInteger(value) ? { value } : { problem: `the number ${text} is too large for exact arithmetic (at most 2^53 - 1); use a smaller value` }
}

/** How a sort is named in messages. */
export function sortName(s: Sort): string {
  return s.k === 'int' ? 'an integer' : s.k === 'bool' ? 'a boolean' : `one of {${s.labels.join(', ')}}`
}

/** Thrown by `evalConstant` when a constant expression cannot be evaluated (division by zero). */
export class ConstantError extends Error {}

/**
 * Evaluates an expression that uses only literals and constants (type bounds, initial values,
 * timing parameters). Integer division truncates toward zero, as everywhere in the kernel.
 */
export function evalConstant(e: Expr, constants: readonly number[]): number {
  switch (e.k) {
    case 'lit': return e.value
    case 'const': return constants[e.index]
    case 'neg': return -evalConstant(e.arg, constants)
    case 'not': return evalConstant(e.arg, constants) ? 0 : 1
    case 'min': return Math.min(evalConstant(e.left, constants), evalConstant(e.right, constants))
    case 'max': return Math.max(evalConstant(e.left, constants), evalConstant(e.right, constants))
    case 'ite': return evalConstant(e.cond, constants) ? evalConstant(e.then, constants) : evalConstant(e.else, constants)
    case 'bin': {
      const a = evalConstant(e.left, constants)
      const b = evalConstant(e.right, constants)
      switch (e.op) {
        case '+': return a + b
        case '-': return a - b
        case '*': return a * b
        case '/': if (b === 0) throw new ConstantError('division by zero'); return Math.trunc(a / b)
        case '%': if (b === 0) throw new ConstantError('modulo by zero'); return a % b
        case '=': return a === b ? 1 : 0
        case '!=': return a !== b ? 1 : 0
        case '<': return a < b ? 1 : 0
        case '<=': return a <= b ? 1 : 0
        case '>': return a > b ? 1 : 0
        case '>=': return a >= b ? 1 : 0
        case 'and': return a && b ? 1 : 0
        case 'or': return a || b ? 1 : 0
        case 'implies': return !a || b ? 1 : 0
        case 'iff': return !a === !b ? 1 : 0
      }
    }
  }
  throw new ConstantError('not a constant expression')
}
