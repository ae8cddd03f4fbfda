// The state a block's resolver carries (where the block sits, and the diagnostics found so far),
// and the syntax-tree helpers every resolver (protocol, property, check) reads nodes with.
import type { SyntaxNode } from '@lezer/common'
import type { BlockRef, Diagnostic, Span } from './model'
import { MAX_DIAGNOSTICS } from './limits'
import type { LineMap } from './positions'
import { budgetSuggestions } from './suggest'

/** Resolution context of one formal block: maps tree nodes to notebook spans and collects diagnostics. */
export class BlockContext {
  constructor(
    readonly lines: LineMap,
    readonly block: BlockRef,
    readonly diagnostics: Diagnostic[],
  ) {}

  /** Source text of a node. */
  text(node: SyntaxNode): string {
    return this.block.text.slice(node.from, node.to)
  }

  /** Notebook span of a node (block offsets shifted to notebook offsets). */
  span(node: SyntaxNode | { from: number; to: number }): Span {
    return this.lines.span(this.block.from + node.from, this.block.from + node.to)
  }

  error(at: SyntaxNode | Span | { from: number; to: number }, message: string): void {
    this.report('error', at, message)
  }

  warn(at: SyntaxNode | Span | { from: number; to: number }, message: string): void {
    this.report('warning', at, message)
  }

  private report(severity: Diagnostic['severity'], at: SyntaxNode | Span | { from: number; to: number }, message: string): void {
    const span = 'line' in at ? at : this.span(at)
    if (this.diagnostics.length >= MAX_DIAGNOSTICS) {
      // Nothing more is listed: suggestions for it would be wasted work.
      budgetSuggestions(0)
      const o = overflow.get(this.diagnostics)
      if (o) o.count++
      else overflow.set(this.diagnostics, { count: 1, first: span })
      return
    }
    // Messages quote source text; a diagnostic is one line, so quoted line breaks are folded.
    this.diagnostics.push({ ...span, severity, message: message.replace(/\s*\n\s*/g, ' ') })
  }
}

/** The named children of a node, skipping anonymous tokens (punctuation). */
export function children(node: SyntaxNode): SyntaxNode[] {
  const out: SyntaxNode[] = []
  for (let c = node.firstChild; c; c = c.nextSibling) out.push(c)
  return out
}

const overflow = new WeakMap<Diagnostic[], { count: number; first: Span }>()

/**
 * Diagnostics not kept in a list because it reached MAX_DIAGNOSTICS: how many, and where the first
 * of them was; null when none was dropped.
 */
export function droppedDiagnostics(list: Diagnostic[]): { count: number; first: Span } | null {
  return overflow.get(list) ?? null
}
/** Node names that are expressions in the grammar. */
export const EXPRESSION_NODES = new Set([
  'Number', 'Boolean', 'VarRef', 'IndexRef', 'ProcNumber', 'Member', 'ParenExpression', 'CallExpression',
  'Pending', 'Negation', 'PrefixExpression', 'BinaryExpression', 'IfExpression', 'Aggregate', 'Forall',
  'BoundNegation', 'BoundArithmetic',
])

/** True when a node or anything inside it is a syntax error. */
export function hasError(node: SyntaxNode): boolean {
  let found = false
  node.toTree().iterate({ enter: (n) => { if (n.type.isError) found = true; return !found } })
  return found
}

/** The expression children of a node, in order. */
export function expressionChildren(node: SyntaxNode): SyntaxNode[] {
  return children(node).filter((c) => EXPRESSION_NODES.has(c.name))
}

/** The operator of a binary expression: the source text between its operands. */
export function binaryOperator(node: SyntaxNode, ctx: BlockContext): string {
  const [l, r] = expressionChildren(node)
  return ctx.block.text.slice(l.to, r.from).replace(/\/\/[^\r\n]*/g, '').trim()
}

/** The arithmetic operators of a binary expression. */
export const ARITH = new Set(['+', '-', '*', '/', '%'])

/** The comparison operators of a binary expression (typed by `comparisonProblem`, sorts.ts). */
export const COMPARE = new Set(['=', '!=', '<', '<=', '>', '>='])
