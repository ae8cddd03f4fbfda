// The two ways an instance can go wrong: before exploration (the constants make no sense for the
// protocol) and during it (a reachable step breaks the model's own rules).
import type { Span } from '../language/model'
import type { MessageEvent } from '../result'

/**
 * The protocol cannot be instantiated with these constants and this process count: a non-positive
 * delay or idle bound, an empty type range, an initial value outside its type. Thrown by
 * `compileInstance`; `span` points at the construct to fix.
 */
export class ModelSetupError extends Error {
  constructor(message: string, readonly span: Span) {
    super(message)
    this.name = 'ModelSetupError'
  }
}

/**
 * A model error met while exploring: an assignment outside the variable's type, a division or
 * modulo by zero, a sent message field outside its type, a choice from an empty range. It ends the
 * branch that raised it. Plain data, so it crosses the worker boundary as is.
 */
export interface ModelError {
  /** One sentence naming what went wrong, the variable, the value, the type and the line. */
  message: string
  span: Span
  line: number
  column: number
  /** The process whose step raised it, 1-based; 0 when a property's term raised it on a state. */
  process: number
  /** `x` or `x[j]` (j 1-based) for an assignment, `kind.field` for a send, null for arithmetic. */
  variable: string | null
  value: number | null
  /** The type as written in the notebook (`1..4`, `bool`, `{a, b}`), null when none applies. */
  type: string | null
  /** The messages the failing step had received, in handling order. */
  received: MessageEvent[]
}

/**
 * A division or remainder by zero while evaluating a property term on a state: a model error at
 * the operator, as in protocols (semantics.md), never a silent value. Thrown by compiled terms.
 */
export class PropertyFault {
  constructor(readonly span: Span, readonly what: 'division' | 'modulo') {}

  /** The model error it stands for. */
  toModelError(): ModelError {
    const s = this.span
    return {
      message: `model error at line ${s.line}, column ${s.column}: ${this.what} by zero in a property, on the state reached`,
      span: s, line: s.line, column: s.column, process: 0, variable: null, value: null, type: null, received: [],
    }
  }
}
