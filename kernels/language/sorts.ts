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

/**
 * Work done on enum labels (comparisons and index entries), counted so that a test can check that
 * analysis stays linear in the number of labels without timing anything.
 */
export const labelWork = { steps: 0 }

export function sameSort(a: Sort, b: Sort): boolean {
  if (a.k !== b.k) return false
  if (a.k === 'enum' && b.k === 'enum') {
    // The checker shares one labels array per distinct enum (see `internLabels`), so this is
    // nearly always decided by identity; otherwise the first differing label decides.
    if (a.labels === b.labels) return true
    if (a.labels.length !== b.labels.length) return false
    for (let i = 0; i < a.labels.length; i++) {
      labelWork.steps++
      if (a.labels[i] !== b.labels[i]) return false
    }
  }
  return true
}

const indexes = new WeakMap<readonly string[], Map<string, number>>()

/** Position of a label in an enum's labels (first occurrence), or -1; one map per labels array. */
export function labelIndex(labels: readonly string[], label: string): number {
  let map = indexes.get(labels)
  if (!map) {
    map = new Map()
    for (let i = 0; i < labels.length; i++) if (!map.has(labels[i])) map.set(labels[i], i)
    labelWork.steps += labels.length
    indexes.set(labels, map)
  }
  return map.get(label) ?? -1
}

/**
 * One shared array per distinct list of labels (per `pool`, one per protocol), so that equal
 * enums compare by identity and each has one label index.
 */
export function internLabels(pool: Map<string, readonly string[]>, labels: readonly string[]): readonly string[] {
  labelWork.steps += labels.length
  // Labels are identifiers, so a comma cannot occur in one and the key is unambiguous.
  const key = labels.join(',')
  const prior = pool.get(key)
  if (prior) return prior
  pool.set(key, labels)
  return labels
}

const byName = new WeakMap<readonly { name: string }[], { map: Map<string, number>; seen: number }>()

/**
 * `list.findIndex((x) => x.name === name)` in constant time: a name index per list, extended as
 * the list grows (the checker's lists of constants, variables and messages only ever grow by push).
 */
export function indexByName(list: readonly { name: string }[], name: string): number {
  let c = byName.get(list)
  if (!c) {
    c = { map: new Map(), seen: 0 }
    byName.set(list, c)
  }
  for (; c.seen < list.length; c.seen++) if (!c.map.has(list[c.seen].name)) c.map.set(list[c.seen].name, c.seen)
  return c.map.get(name) ?? -1
}

/** Labels shown when an enum is named in a message; longer enums are abbreviated. */
const SHOWN_LABELS = 8

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
  if (s.k === 'int') return 'an integer'
  if (s.k === 'bool') return 'a boolean'
  if (s.labels.length <= SHOWN_LABELS) return `one of {${s.labels.join(', ')}}`
  return `one of {${s.labels.slice(0, SHOWN_LABELS - 2).join(', ')}, ..., ${s.labels[s.labels.length - 1]}} (${s.labels.length} labels)`
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
