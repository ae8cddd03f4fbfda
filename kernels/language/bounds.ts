// The limits of a model under one constant setting, checked before anything runs: every range,
// constant and `any` within the limits of limits.ts, and every intermediate value of every
// expression provably within the safe integers, by interval analysis over the declared types.
//
// Why intervals suffice for exactness: the kernel computes with doubles, which are exact integers
// up to 2^53 - 1 in magnitude. When the analysis shows every operand and result of `+ - *` within
// that bound, each operation is exact; `%` on doubles is always exact; and for a dividend a with
// |a| < 2^53, Math.trunc(a / b) is the exact truncated quotient (a non-integer quotient is at least
// 1/|b| from every integer, while the rounding error of a / b is below 2^-53 |a| / |b| < 1/|b|).
// So constant folding (sorts.ts) and run-time evaluation (model/exec.ts, model/observe.ts) give
// the same, exact results on every expression the checker lets through.
import {
  isModelValue, MAX_ANY_VALUES, MAX_MESSAGE_VALUES, MAX_PROCESSES, MAX_RANGE_VALUES, MAX_SAFE, MAX_VALUE, MIN_VALUE,
} from './limits'
import type { Expr, ProtocolModel, Span, Stmt, Term, Type } from './model'
import { ConstantError, evalConstant } from './sorts'

/** A construct beyond a limit: where it is and one sentence saying what to do. */
export interface LimitProblem {
  span: Span
  message: string
}

/** An integer interval [lo, hi] (lo <= hi). */
export type Interval = readonly [number, number]

const BOOL: Interval = [0, 1]

/** What the analysis knows: constant values, the bounds of every variable and message field. */
interface Env {
  constants: readonly number[]
  vars: Interval[]
  /** Bounds of the fields of the message being handled, or none outside a handler. */
  fields: Interval[]
}

function magnitude(i: Interval): number {
  return Math.max(Math.abs(i[0]), Math.abs(i[1]))
}

function span4(a: number, b: number, c: number, d: number): Interval {
  return [Math.min(a, b, c, d), Math.max(a, b, c, d)]
}

/** The interval of `op` on two operand intervals; division and remainder by a possible zero are run-time model errors. */
function arith(op: string, a: Interval, b: Interval): Interval {
  switch (op) {
    case '+': return [a[0] + b[0], a[1] + b[1]]
    case '-': return [a[0] - b[1], a[1] - b[0]]
    case '*': return span4(a[0] * b[0], a[0] * b[1], a[1] * b[0], a[1] * b[1])
    case '/': { const m = magnitude(a); return [-m, m] }
    default: {
      // `%` takes the sign of the dividend and is smaller than the divisor in magnitude.
      const m = Math.min(magnitude(a), Math.max(0, magnitude(b) - 1))
      return [a[0] >= 0 ? 0 : -m, a[1] <= 0 ? 0 : m]
    }
  }
}

function unsafe(op: string, r: Interval, span: Span): LimitProblem {
  const worst = Math.abs(r[0]) > Math.abs(r[1]) ? r[0] : r[1]
  // Beyond 2^53 the bound itself is rounded; it only has to show the order of magnitude.
  const shown = Number.isFinite(worst) && Math.abs(worst) < 1e21 ? BigInt(worst).toString() : worst.toExponential(2)
  return {
    span,
    message: `this \`${op}\` can reach ${shown}, beyond the exact integers (at most 2^53 - 1 = ${MAX_SAFE} in magnitude); narrow the types or constants it combines`,
  }
}

/** Interval analysis of a protocol expression; the first unsafe operation goes to `out`. */
function exprRange(e: Expr, env: Env, out: LimitProblem[]): Interval {
  switch (e.k) {
    case 'lit': return [e.value, e.value]
    case 'const': { const v = env.constants[e.index]; return [v, v] }
    case 'scalar': case 'entry': return env.vars[e.index]
    case 'field': return env.fields[e.index] ?? [MIN_VALUE, MAX_VALUE]
    case 'neg': { const a = exprRange(e.arg, env, out); return [-a[1], -a[0]] }
    case 'not': exprRange(e.arg, env, out); return BOOL
    case 'min': case 'max': {
      const a = exprRange(e.left, env, out)
      const b = exprRange(e.right, env, out)
      return e.k === 'min' ? [Math.min(a[0], b[0]), Math.min(a[1], b[1])] : [Math.max(a[0], b[0]), Math.max(a[1], b[1])]
    }
    case 'ite': {
      exprRange(e.cond, env, out)
      const a = exprRange(e.then, env, out)
      const b = exprRange(e.else, env, out)
      return [Math.min(a[0], b[0]), Math.max(a[1], b[1])]
    }
    case 'agg':
      exprRange(e.body, env, out)
      return e.op === 'count' ? [0, MAX_PROCESSES - 1] : BOOL
    case 'bin': {
      const a = exprRange(e.left, env, out)
      const b = exprRange(e.right, env, out)
      if (e.op === '+' || e.op === '-' || e.op === '*' || e.op === '/' || e.op === '%') {
        const r = arith(e.op, a, b)
        if (magnitude(r) > MAX_SAFE && out.length === 0) out.push(unsafe(e.op, r, e.span))
        return r
      }
      return BOOL
    }
  }
}

/** Interval analysis of a property term under the protocol's variable bounds. */
function termRange(t: Term, env: Env, out: LimitProblem[]): Interval {
  switch (t.k) {
    case 'lit':
      if (!Number.isSafeInteger(t.value) && out.length === 0) out.push({ span: t.span, message: `the number ${t.value} is too large for exact arithmetic (at most 2^53 - 1); use a smaller value` })
      return [t.value, t.value]
    case 'const': { const v = env.constants[t.index]; return [v, v] }
    case 'member': return env.vars[t.index]
    case 'alive': case 'crashed': case 'pending': return BOOL
    case 'neg': { const a = termRange(t.arg, env, out); return [-a[1], -a[0]] }
    case 'min': case 'max': {
      const a = termRange(t.left, env, out)
      const b = termRange(t.right, env, out)
      return t.k === 'min' ? [Math.min(a[0], b[0]), Math.min(a[1], b[1])] : [Math.max(a[0], b[0]), Math.max(a[1], b[1])]
    }
    case 'bin': {
      const a = termRange(t.left, env, out)
      const b = termRange(t.right, env, out)
      if (t.op === '+' || t.op === '-' || t.op === '*' || t.op === '/' || t.op === '%') {
        const r = arith(t.op, a, b)
        if (magnitude(r) > MAX_SAFE && out.length === 0) out.push(unsafe(t.op, r, t.span))
        return r
      }
      return BOOL
    }
  }
}

function valueProblem(what: string, span: Span): LimitProblem {
  return { span, message: `${what} is outside the integers a model may hold (${MIN_VALUE}..${MAX_VALUE}); use a smaller value` }
}

/**
 * A constant expression's value, or a problem: an unsafe intermediate, a value outside the model's
 * integers, a division by zero (null value then).
 */
function constantValue(e: Expr, constants: readonly number[], what: string, out: LimitProblem[]): number | null {
  const before = out.length
  exprRange(e, { constants, vars: [], fields: [] }, out)
  if (out.length > before) return null
  let v: number
  try {
    v = evalConstant(e, constants)
  } catch (err) {
    if (err instanceof ConstantError) return null
    throw err
  }
  if (!isModelValue(v)) { out.push(valueProblem(`${what} (${v})`, e.span)); return null }
  return v
}

/** The bounds of a type under these constants, with problems for bounds or widths beyond the limits. */
function typeRange(t: Type, constants: readonly number[], what: string, span: Span, out: LimitProblem[]): Interval {
  if (t.k === 'bool') return BOOL
  if (t.k === 'enum') return [0, t.labels.length - 1]
  const lo = constantValue(t.lo, constants, `the lower bound of ${what}`, out)
  const hi = constantValue(t.hi, constants, `the upper bound of ${what}`, out)
  if (lo === null || hi === null) return [MIN_VALUE, MAX_VALUE]
  if (hi < lo) return [lo, lo] // an empty range is reported where it is declared
  if (hi - lo + 1 > MAX_RANGE_VALUES) {
    out.push({ span, message: `the range ${lo}..${hi} of ${what} holds ${hi - lo + 1} values, more than the ${MAX_RANGE_VALUES} (2^31) a range may hold; narrow it` })
  }
  return [lo, hi]
}

function stmtRanges(stmts: Stmt[], env: Env, out: LimitProblem[]): void {
  for (const s of stmts) {
    const one = (e: Expr) => { const local: LimitProblem[] = []; exprRange(e, env, local); out.push(...local) }
    switch (s.k) {
      case 'assign': one(s.value); break
      case 'choose': s.options.forEach(one); break
      case 'chooseRange': one(s.lo); one(s.hi); break
      case 'if':
        for (const b of s.branches) { one(b.cond); stmtRanges(b.body, env, out) }
        if (s.otherwise) stmtRanges(s.otherwise, env, out)
        break
      case 'for': stmtRanges(s.body, env, out); break
      case 'broadcast': case 'send': s.args.forEach(one); break
      case 'skip': break
    }
  }
}

/** Variable bounds of a protocol under these constants (the widest range when a bound is unusable). */
function varRanges(protocol: ProtocolModel, constants: readonly number[], out: LimitProblem[]): Interval[] {
  return protocol.vars.map((v) => typeRange(v.type, constants, `\`${v.name}\``, v.span, out))
}

/**
 * Every limit a protocol must meet under one constant setting (`constants` by declaration index):
 * constants, type bounds and widths, `any` sizes, message values, the delay bound, and the safety
 * of every expression's intermediate values. Empty when the protocol is within every limit.
 */
export function protocolProblems(protocol: ProtocolModel, constants: readonly number[]): LimitProblem[] {
  const out: LimitProblem[] = []
  protocol.consts.forEach((c, i) => {
    if (!isModelValue(constants[i])) out.push(valueProblem(`constant \`${c.name}\` (${constants[i]})`, c.span))
  })
  if (out.length > 0) return out
  const vars = varRanges(protocol, constants, out)
  protocol.vars.forEach((v, i) => {
    if (v.init === 'any') {
      const count = vars[i][1] - vars[i][0] + 1
      if (count > MAX_ANY_VALUES) {
        out.push({ span: v.span, message: `\`${v.name}\` starts as \`any\` of ${count} values, more than the ${MAX_ANY_VALUES} initial values a variable may branch over; give it an initial value or a narrower type` })
      }
    } else constantValue(v.init, constants, `the initial value of \`${v.name}\``, out)
  })
  const fieldRanges = protocol.messages.map((m) => {
    const before = out.length
    const ranges = m.fields.map((f) => typeRange(f.type, constants, `field \`${f.name}\` of \`${m.name}\``, f.span, out))
    const count = ranges.reduce((n, r) => n * (r[1] - r[0] + 1), 1)
    if (count > MAX_MESSAGE_VALUES && out.length === before) {
      out.push({ span: m.span, message: `message \`${m.name}\` has ${count} values, more than the ${MAX_MESSAGE_VALUES} a channel can track; narrow its field types` })
    }
    return ranges
  })
  const t = protocol.timing
  if (t.kind !== 'asynchronous') {
    const delay = constantValue(t.delay, constants, 'the delay bound', out)
    constantValue(t.idle, constants, 'the idle bound', out)
    if (delay !== null && delay > 31) out.push({ span: t.span, message: `the delay bound is ${delay}, but message ages are tracked for at most 31 ticks; use a delay of 31 or less` })
  }
  for (const h of protocol.handlers) stmtRanges(h.body, { constants, vars, fields: fieldRanges[h.message] ?? [] }, out)
  stmtRanges(protocol.step, { constants, vars, fields: [] }, out)
  return out
}

/** The limits a property's terms must meet against a protocol under one constant setting. */
export function termProblems(protocol: ProtocolModel, terms: readonly Term[], constants: readonly number[]): LimitProblem[] {
  const scratch: LimitProblem[] = []
  const env: Env = { constants, vars: varRanges(protocol, constants, scratch), fields: [] }
  const out: LimitProblem[] = []
  for (const t of terms) {
    const local: LimitProblem[] = []
    termRange(t, env, local)
    out.push(...local)
  }
  return out
}
