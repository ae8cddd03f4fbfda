// The typed model: what the checker hands to every later stage (class check, instance compiler,
// reference interpreter, runner). Plain, immutable, serialisable data; names are resolved to
// indices so that later stages never look anything up by string.
//
// Value encoding, shared by every stage: every runtime value is an integer. `bool` is 0/1, an
// integer range `lo..hi` holds the integer itself, an enum holds the index of its label in
// declaration order.

/** A position in the notebook: 1-based line and column, plus 0-based offsets into the notebook text. */
export interface Span {
  line: number
  column: number
  endLine: number
  endColumn: number
  from: number
  to: number
}

/** One diagnostic: an error stops checks from running, a warning does not. */
export interface Diagnostic extends Span {
  severity: 'error' | 'warning'
  message: string
}

/** A variable or field type. Range bounds are constant expressions: a check may override constants. */
export type Type =
  | { k: 'bool' }
  | { k: 'range'; lo: Expr; hi: Expr }
  | { k: 'enum'; labels: string[] }

/** Binary operators of protocol expressions. */
export type BinOp =
  | '+' | '-' | '*' | '/' | '%'
  | '=' | '!=' | '<' | '<=' | '>' | '>='
  | 'and' | 'or' | 'implies' | 'iff'

/**
 * A resolved protocol expression. `binder` numbers refer to `ProtocolModel.binders`: the peer
 * variables bound by `on ... from q`, `for q` and aggregates. At run time each binder holds a peer
 * (a process other than the running one).
 */
export type Expr =
  | { k: 'lit'; value: number; span: Span }
  | { k: 'const'; index: number; span: Span }
  | { k: 'scalar'; index: number; span: Span } // ProtocolModel.vars[index], perPeer false
  | { k: 'entry'; index: number; binder: number; span: Span } // vars[index][q], perPeer true
  | { k: 'field'; index: number; span: Span } // field `index` of the message being handled
  | { k: 'neg'; arg: Expr; span: Span }
  | { k: 'not'; arg: Expr; span: Span }
  | { k: 'bin'; op: BinOp; left: Expr; right: Expr; span: Span }
  | { k: 'min' | 'max'; left: Expr; right: Expr; span: Span }
  | { k: 'ite'; cond: Expr; then: Expr; else: Expr; span: Span }
  | { k: 'agg'; op: 'count' | 'some' | 'every'; binder: number; body: Expr; span: Span }

/** The target of an assignment: a scalar, or a per-peer entry at a bound peer. */
export interface Target {
  index: number // ProtocolModel.vars index
  binder: number | null // null for scalars
  span: Span
}

/** A resolved statement. */
export type Stmt =
  | { k: 'assign'; target: Target; value: Expr; span: Span }
  | { k: 'choose'; target: Target; options: Expr[]; span: Span } // x := one of {E, ...}
  | { k: 'chooseRange'; target: Target; lo: Expr; hi: Expr; span: Span } // x := one of A..B
  | { k: 'if'; branches: { cond: Expr; body: Stmt[] }[]; otherwise: Stmt[] | null; span: Span }
  | { k: 'for'; binder: number; body: Stmt[]; span: Span }
  | { k: 'broadcast'; message: number; args: Expr[]; span: Span }
  | { k: 'send'; message: number; args: Expr[]; to: number; span: Span } // `to` is a binder
  | { k: 'skip'; span: Span }

export interface ConstDecl { name: string; value: number; span: Span }
export interface FieldDecl { name: string; type: Type; span: Span }
export interface MessageDecl { name: string; fields: FieldDecl[]; span: Span }
export interface VarDecl {
  name: string
  perPeer: boolean
  type: Type
  /** A constant expression, or 'any': every value of the type, chosen independently. */
  init: Expr | 'any'
  span: Span
}
export interface Handler {
  message: number // MessageDecl index
  binder: number // the `from q` binder
  /** Names of the bound fields, by position (one per field of the message, or none at all). */
  fieldNames: string[]
  body: Stmt[]
  span: Span
}
/** The timing kinds, as written after `timing` (semantics.md). */
export type TimingKind = 'synchronous' | 'eventually synchronous' | 'asynchronous'
export type Timing =
  | { kind: 'synchronous' | 'eventually synchronous'; delay: Expr; idle: Expr; span: Span }
  | { kind: 'asynchronous'; span: Span }

/** A binder: a peer variable introduced by `from q`, `for q` or an aggregate. */
export interface Binder { name: string; span: Span }

export interface ProtocolModel {
  name: string
  span: Span
  consts: ConstDecl[]
  timing: Timing
  faults: 'none' | 'crash'
  messages: MessageDecl[]
  vars: VarDecl[]
  handlers: Handler[] // in source order
  step: Stmt[] // empty when there is no step block
  binders: Binder[]
  /** The protocol block's source text and where it starts, for hashing and highlighting. */
  block: BlockRef
}

/** A process reference in a property: a quantified variable (0 = first, 1 = second) or `#n`. */
export type ProcRef = { k: 'var'; index: number; span: Span } | { k: 'fixed'; n: number; span: Span }

/** A state term of a property (integer-valued or boolean-valued; booleans are 0/1). */
export type Term =
  | { k: 'lit'; value: number; span: Span }
  | { k: 'const'; index: number; span: Span }
  | { k: 'member'; proc: ProcRef; index: number; peer: ProcRef | null; span: Span } // p.x, p.x[q]
  | { k: 'alive' | 'crashed'; proc: ProcRef; span: Span }
  | { k: 'pending'; message: number; from: ProcRef; to: ProcRef; span: Span }
  | { k: 'neg'; arg: Term; span: Span }
  | { k: 'bin'; op: '+' | '-' | '*' | '/' | '%' | '=' | '!=' | '<' | '<=' | '>' | '>='; left: Term; right: Term; span: Span }
  | { k: 'min' | 'max'; left: Term; right: Term; span: Span }

/**
 * A resolved temporal formula. Atoms are boolean state terms; boolean connectives and temporal
 * operators are formula nodes. `correct(p)` and `faulty(p)` are already expanded to
 * `always alive(p)` and `eventually crashed(p)`.
 */
export type Formula =
  | { k: 'true' | 'false'; span: Span }
  | { k: 'atom'; term: Term; span: Span }
  | { k: 'not' | 'always' | 'eventually' | 'next'; arg: Formula; span: Span }
  | { k: 'and' | 'or' | 'implies' | 'iff' | 'until' | 'unless'; left: Formula; right: Formula; span: Span }

/** A property resolved against the protocol of one check. */
export interface PropertyModel {
  name: string
  /** Quantified process variables: [] (no forall, uses #n), ['p'] or ['p', 'q']. */
  vars: string[]
  formula: Formula
  /** The highest `#n` used, 0 when none. */
  maxFixed: number
  /** The aggregates, if any, that the property text used (reported by the form check). */
  aggregates: Span[]
  span: Span
  block: BlockRef
  /** The property's source text, as written (for display and typesetting). */
  source: string
}

export interface SweepItem { constIndex: number; values: number[]; span: Span }

export interface CheckModel {
  protocol: number // NotebookModel.protocols index
  /** Properties resolved against that protocol, in the order listed. */
  properties: PropertyModel[]
  /** Explicit sizes (`at N = 2`, `at N = 2..4`), or null for the cutoff default. */
  sizes: number[] | null
  sweep: SweepItem[]
  /** The bound of `within K states`, or null when the check gives none. */
  limit: number | null
  /** `by induction` proves the properties together by induction (induction.md); otherwise they are explored. */
  method: 'exploration' | 'induction'
  span: Span
  block: BlockRef
  /** The check's source text, one line. */
  source: string
}

/** Where a formal block sits in the notebook. */
export interface BlockRef {
  kind: 'protocol' | 'property' | 'check'
  /** Offset of the block's first content character in the notebook text. */
  from: number
  to: number
  /** 1-based notebook line of the block's first content line. */
  line: number
  text: string
}

/** A property as declared (before it is resolved against the protocol of a check). */
export interface PropertyDecl { name: string; source: string; span: Span; block: BlockRef }

export interface NotebookModel {
  title: string | null
  blocks: BlockRef[]
  protocols: ProtocolModel[]
  properties: PropertyDecl[]
  checks: CheckModel[]
  diagnostics: Diagnostic[]
}
