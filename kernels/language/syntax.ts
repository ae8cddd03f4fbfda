// Parsing one formal block with the Lezer grammar, and turning Lezer's error nodes into
// diagnostics a person can act on. Lezer recovers from errors by itself, so every independent
// mistake in a block is reported, not just the first.
import type { SyntaxNode, Tree } from '@lezer/common'
import { parser } from './parser.js'
import type { BlockContext } from './context'
import { MAX_NESTING } from './limits'

/** What a construct is called in messages. */
const THING: Record<string, string> = {
  Program: 'block',
  ProtocolDecl: 'protocol declaration',
  ProtocolBody: 'protocol body',
  ConstDecl: 'constant declaration',
  TimingDecl: 'timing declaration',
  ParamList: 'timing parameters',
  Param: 'timing parameter',
  FaultsDecl: 'faults declaration',
  MessageDecl: 'message declaration',
  FieldList: 'message fields',
  FieldDecl: 'message field',
  StateDecl: 'state declaration',
  PeerMark: 'state declaration',
  RangeType: 'range type',
  EnumType: 'enum type',
  Handler: 'handler',
  BindList: 'handler fields',
  StepBlock: 'step block',
  Block: 'statement block',
  Assign: 'assignment',
  Choose: 'choice',
  ChoiceSet: 'choice',
  ChoiceRange: 'choice',
  IfStatement: '`if` statement',
  ElseIf: '`else if` branch',
  Else: '`else` branch',
  ForStatement: '`for` statement',
  Broadcast: '`broadcast` statement',
  Send: '`send` statement',
  ArgList: 'argument list',
  ParenExpression: 'parenthesized expression',
  CallExpression: 'call',
  Pending: '`pending` atom',
  IndexRef: 'indexed variable',
  Member: 'process variable',
  BinaryExpression: 'expression',
  PrefixExpression: 'expression',
  Negation: 'expression',
  IfExpression: '`if ... then ... else` expression',
  Aggregate: 'aggregate',
  Forall: '`forall`',
  PropertyDecl: 'property declaration',
  CheckDecl: 'check',
  SizeClause: '`at` clause of the check',
  SizeRange: '`at` clause of the check',
  WithClause: '`with` clause of the check',
  SweepItem: '`with` clause of the check',
  SweepRange: '`with` clause of the check',
  BoundClause: '`within` clause of the check',
  MethodClause: '`by` clause of the check',
  ForClause: 'earlier `for` clause of the check',
  LimitClause: 'earlier `limit` clause of the check',
}

/** What may come next, by the construct the error sits in. */
const EXPECT: Record<string, string> = {
  Program: 'a block holds `protocol NAME { ... }`, `property NAME = ...` or `check NAME: ...` declarations',
  ProtocolDecl: 'write `protocol NAME { ... }`',
  ProtocolBody: 'a protocol body holds `const`, `timing`, `faults`, `message`, `state`, `on` and `step` declarations',
  ConstDecl: 'write `const NAME = INTEGER`',
  TimingDecl: 'write `timing synchronous(delay: D, idle: I)`, `timing eventually synchronous(delay: D, idle: I)` or `timing asynchronous`',
  ParamList: 'write `(delay: D, idle: I)`',
  Param: 'write `delay: D` or `idle: I`',
  FaultsDecl: 'write `faults none` or `faults crash`',
  MessageDecl: 'write `message NAME` or `message NAME(FIELD: TYPE, ...)`',
  FieldList: 'write fields as `(FIELD: TYPE, ...)`',
  FieldDecl: 'write a field as `FIELD: TYPE`',
  StateDecl: 'write `state NAME: TYPE = INIT` or `state NAME[peer]: TYPE = INIT`',
  PeerMark: 'write `[peer]` after the variable name',
  RangeType: 'write a range as `LOW..HIGH`',
  EnumType: 'write an enum as `{label, label, ...}`',
  Handler: 'write `on MESSAGE from q { ... }` or `on MESSAGE(x, y) from q { ... }`',
  BindList: 'write the bound fields as `(x, y)`',
  StepBlock: 'write `step { ... }`',
  Block: 'a block holds statements: `x := E`, `x[q] := E`, `if`, `for q`, `broadcast`, `send`, `x := one of ...`, `skip`',
  Assign: 'write `x := E`',
  Choose: 'write `x := one of {E, ...}` or `x := one of A..B`',
  ChoiceSet: 'write `one of {E, E, ...}`',
  ChoiceRange: 'write `one of A..B`',
  IfStatement: 'write `if CONDITION { ... }`',
  ElseIf: 'write `else if CONDITION { ... }`',
  Else: 'write `else { ... }`',
  ForStatement: 'write `for q { ... }`',
  Broadcast: 'write `broadcast MESSAGE` or `broadcast MESSAGE(E, ...)`',
  Send: 'write `send MESSAGE to q` or `send MESSAGE(E, ...) to q`',
  ArgList: 'write arguments as `(E, E, ...)`',
  ParenExpression: 'close the parenthesis',
  CallExpression: 'write a call as `min(a, b)`',
  Pending: 'write `pending(MESSAGE, q -> p)`',
  IndexRef: 'write an entry as `x[q]`',
  Member: 'write a process variable as `p.x` or `p.x[q]`',
  BinaryExpression: 'complete the expression',
  PrefixExpression: 'complete the expression',
  Negation: 'complete the expression',
  IfExpression: 'write `if C then A else B`',
  Aggregate: 'write `count q: E`, `some q: E` or `every q: E`',
  Forall: 'write `forall p: ...` or `forall p, q: ...`',
  PropertyDecl: 'write `property NAME = FORMULA`',
  CheckDecl: 'write `check PROTOCOL: PROPERTY, ... [at N = K] [with C = V, ...] [within K states] [by induction]`',
  SizeClause: 'write `at N = K` or `at N = A..B`',
  SizeRange: 'write `at N = A..B`',
  WithClause: 'write `with C = V` or `with C in A..B`, separated by commas',
  SweepItem: 'write `C = V` or `C in A..B`',
  SweepRange: 'write `C in A..B`',
  BoundClause: 'write `within K states`',
  MethodClause: 'write `by induction`',
  ForClause: 'write the sizes as `at N = K` or `at N = A..B`',
  LimitClause: 'write the bound as `within K states`',
}

// The words of the protocol and property languages (`kw<...>` in the grammar). A test compares
// this list with the grammar and with the guide's section on reserved words.
const RESERVED = new Set([
  'protocol', 'const', 'timing', 'faults', 'none', 'crash',
  'message', 'state', 'peer', 'any', 'bool', 'on', 'from', 'step', 'one', 'of', 'if', 'else', 'for',
  'broadcast', 'send', 'to', 'skip', 'true', 'false', 'pending', 'not', 'always', 'eventually', 'next',
  'until', 'unless', 'and', 'or', 'implies', 'iff', 'then', 'count', 'some', 'every', 'forall',
  'property', 'check',
])

/** The reserved words of the language (they cannot name anything). */
export const reservedWords: ReadonlySet<string> = RESERVED

/**
 * The contextual keywords (`ckw<...>` in the grammar): keywords only where a check line or a
 * timing line expects them, ordinary names everywhere else. `stabilizing`, `limit`, `processes`
 * and `process` are read only to point at the current spelling.
 */
export const contextualWords: ReadonlySet<string> = new Set([
  'synchronous', 'asynchronous', 'stabilizing',
  'at', 'with', 'in', 'within', 'states', 'by', 'induction', 'processes', 'process', 'limit',
])

/**
 * Parses a block's text. A lone CR ends a line as LF does (CommonMark), so it is read as LF: the
 * same length, so every node keeps its offsets, and a line comment stops at it.
 */
export function parseBlock(text: string): Tree {
  return parser.parse(text.includes('\r') ? text.replace(/\r(?!\n)/g, '\n') : text)
}

function enclosing(node: SyntaxNode): SyntaxNode | null {
  for (let p = node.parent; p; p = p.parent) if (THING[p.name]) return p
  return null
}

function firstToken(text: string): string {
  const m = /^\s*(\/\/[^\r\n]*|[A-Za-z_]\w*|#\d+|\d+|:=|\.\.|->|!=|<=|>=|\S)/.exec(text)
  return m ? m[1] : ''
}

/**
 * Reports every error node of a block's tree (that starts before `before`). Errors at the same
 * offset are reported once, and an error directly after another (Lezer's recovery often leaves a
 * trail) is folded into it.
 */
export function reportSyntaxErrors(tree: Tree, ctx: BlockContext, before = Infinity): number {
  let count = 0
  let lastEnd = -1
  const text = ctx.block.text
  tree.iterate({
    enter(ref) {
      if (ref.from >= before) return false
      if (!ref.type.isError) return
      const node = ref.node
      if (node.from <= lastEnd) { lastEnd = Math.max(lastEnd, node.to); return false }
      lastEnd = Math.max(node.to, node.from)
      const owner = enclosing(node)
      const name = owner ? owner.name : 'Program'
      const thing = THING[name] ?? 'block'
      const expect = EXPECT[name] ?? EXPECT.Program
      if (node.from === node.to) {
        const next = firstToken(text.slice(node.from))
        const at = next ? `before \`${next}\`` : 'at the end of the block'
        // At the end of the block, the place is right after the last word (not the closing fence).
        const start = next ? text.slice(node.from).search(/\S|$/) + node.from : text.slice(0, node.from).trimEnd().length
        ctx.error({ from: start, to: start + Math.max(next.length, 0) }, `the ${thing} is incomplete ${at}; ${expect}`)
      } else {
        const token = firstToken(text.slice(node.from, node.to)) || text.slice(node.from, node.to).trim()
        const start = text.slice(node.from).search(/\S|$/) + node.from
        const reserved = RESERVED.has(token) ? ` (\`${token}\` is a reserved word and cannot be used as a name)` : ''
        ctx.error({ from: start, to: Math.max(start + token.length, start) },
          `unexpected \`${token}\` in the ${thing}${reserved}; ${expect}`)
      }
      count++
      return false
    },
  })
  return count
}

/**
 * The constructs that count as one level of nesting (limits.ts, MAX_NESTING). Between two of them
 * a tree path has at most one other node (a `Block`, an `ArgList`, a statement), so a block
 * within the limit is a tree well inside the parser's own depth guards.
 */
const LEVEL = new Set([
  'ParenExpression', 'CallExpression', 'Negation', 'PrefixExpression', 'BinaryExpression', 'IfExpression',
  'Aggregate', 'Forall', 'IfStatement', 'ElseIf', 'Else', 'ForStatement', 'BoundNegation', 'BoundArithmetic',
  'ChoiceSet', 'ChoiceRange',
])

/** Declarations: an error in one says nothing about the nesting of the next. */
const DECLARATION = new Set([
  'ConstDecl', 'TimingDecl', 'FaultsDecl', 'MessageDecl', 'StateDecl', 'Handler', 'StepBlock', 'PropertyDecl', 'CheckDecl',
])

/**
 * The first construct (in text order) at which a block nests more than MAX_NESTING levels, or
 * null. Input nested far deeper than that is broken by the parser into spurious errors, but up to
 * the break the tree is the text's own, so the construct past the limit is found either way. Only
 * nesting with no syntax error before it in its declaration counts: the parser's repair of broken
 * input can build deep trees of its own (`x := := x := := ...` becomes a chain of comparisons),
 * and there the syntax errors are the right report.
 */
export function tooDeep(tree: Tree): { from: number; to: number } | null {
  let depth = 0
  let errorBefore = false
  let found: { from: number; to: number } | null = null
  tree.iterate({
    enter(ref) {
      if (found) return false
      if (ref.type.isError) { errorBefore = true; return }
      if (DECLARATION.has(ref.name)) errorBefore = false
      if (!LEVEL.has(ref.name)) return
      if (++depth > MAX_NESTING && !errorBefore) {
        found = { from: ref.from, to: ref.from + 1 }
        return false
      }
    },
    leave(ref) {
      if (LEVEL.has(ref.name)) depth--
    },
  })
  return found
}
