// The front end in one call: notebook text to a `NotebookModel` with every diagnostic. Never
// throws, whatever the input: an internal failure becomes a diagnostic, not a stack trace.
import { errorText } from '../base/error-text'
import { BlockContext, children, droppedDiagnostics, hasError } from './context'
import { CheckScope, resolveCheck } from './check'
import type { BlockRef, CheckModel, Diagnostic, NotebookModel, PropertyDecl, ProtocolModel } from './model'
import { readNotebook } from './notebook'
import { MAX_DIAGNOSTICS, MAX_NESTING, MAX_NOTEBOOK_CHARS } from './limits'
import { LineMap } from './positions'
import { titleOf } from './spans'
import { declareProperty } from './property'
import { resolveProtocol } from './protocol'
import { budgetSuggestions } from './suggest'
import { parseBlock, reportSyntaxErrors, tooDeep } from './syntax'

const KIND_OF: Record<string, BlockRef['kind']> = { ProtocolDecl: 'protocol', PropertyDecl: 'property', CheckDecl: 'check' }

/** Reads, parses, resolves and type-checks a notebook. */
export function analyzeNotebook(text: string): NotebookModel {
  try {
    return analyze(text)
  } catch (e) {
    return {
      title: null, blocks: [], protocols: [], properties: [], checks: [],
      diagnostics: [{
        line: 1, column: 1, endLine: 1, endColumn: 1, from: 0, to: 0, severity: 'error',
        message: `the notebook could not be read (${errorText(e)}); please report this notebook to the twofold developers`,
      }],
    }
  }
}

/** Candidate names that "did you mean" suggestions may examine in one analysis. */
const SUGGESTION_BUDGET = 2_000_000

function analyze(text: string): NotebookModel {
  if (text.length > MAX_NOTEBOOK_CHARS) return tooLong(text)
  budgetSuggestions(SUGGESTION_BUDGET)
  const outline = readNotebook(text)
  const lines = new LineMap(text)
  const diagnostics: Diagnostic[] = [...outline.diagnostics]
  const protocols: ProtocolModel[] = []
  const properties: PropertyDecl[] = []
  const checks: CheckModel[] = []
  const scope: CheckScope = { protocols: new Map(), properties: new Map(), unreadable: new Set() }
  const pendingChecks: { node: import('@lezer/common').SyntaxNode; ctx: BlockContext; at: number }[] = []

  for (const block of outline.blocks) {
    const ctx = new BlockContext(lines, block, diagnostics)
    const tree = parseBlock(block.text)
    const deep = tooDeep(tree)
    if (deep) {
      // Past the limit the parser's recovery reports nonsense: the syntax errors before it, then
      // one error for the nesting, and the block is not read.
      reportSyntaxErrors(tree, ctx, deep.from)
      for (const decl of children(tree.topNode)) {
        const id = KIND_OF[decl.name] ? decl.getChild('Identifier') : null
        if (id) scope.unreadable!.add(ctx.text(id))
      }
      ctx.error(deep, `the ${block.kind} block nests more than ${MAX_NESTING} levels deep here (parentheses, operators, \`if\` and \`for\`), the most a block may; split the expression or the statements, e.g. with helper variables or separate properties`)
      continue
    }
    reportSyntaxErrors(tree, ctx)
    for (const decl of children(tree.topNode)) {
      if (decl.type.isError) continue
      const kind = KIND_OF[decl.name]
      if (!kind) continue
      const at = block.from + decl.from
      if (kind !== block.kind) {
        ctx.error(decl.firstChild ?? decl, `a ${kind} declaration inside a ${block.kind} block is not read; move it into a \`\`\`${kind} block`)
        continue
      }
      if (kind === 'protocol') {
        const r = resolveProtocol(decl, ctx)
        if (!r) continue
        if (scope.protocols.has(r.model.name)) {
          ctx.error(decl.getChild('Identifier')!, `protocol \`${r.model.name}\` is already defined at line ${scope.protocols.get(r.model.name)!.model.span.line}; give this one another name`)
          continue
        }
        scope.protocols.set(r.model.name, { index: protocols.length, model: r.model, broken: r.broken, from: at })
        protocols.push(r.model)
      } else if (kind === 'property') {
        if (hasError(decl)) {
          const id = decl.getChild('Identifier')
          if (id) scope.properties.set(ctx.text(id), { decl: { name: ctx.text(id), node: decl, ctx, vars: [], body: null, span: ctx.span(id), source: '' }, from: at })
          continue
        }
        const d = declareProperty(decl, ctx)
        if (!d) continue
        if (scope.properties.has(d.name)) {
          ctx.error(decl.getChild('Identifier')!, `property \`${d.name}\` is already defined at line ${scope.properties.get(d.name)!.decl.span.line}; give this one another name`)
          continue
        }
        scope.properties.set(d.name, { decl: d, from: at })
        properties.push({ name: d.name, source: d.source, span: d.span, block })
      } else {
        if (hasError(decl)) continue
        pendingChecks.push({ node: decl, ctx, at })
      }
    }
  }
  // Checks are resolved once everything is declared, so that a name defined below a check gets
  // "defined below" rather than "unknown".
  for (const { node, ctx, at } of pendingChecks) {
    const c = resolveCheck(node, ctx, scope, at)
    if (c) checks.push(c)
  }
  const dropped = droppedDiagnostics(diagnostics)
  const shown = tidy(diagnostics)
  if (dropped) {
    shown.push({
      ...dropped.first, severity: 'error',
      message: `${dropped.count} more problem${dropped.count === 1 ? '' : 's'} from here on ${dropped.count === 1 ? 'is' : 'are'} not listed (a notebook lists at most ${MAX_DIAGNOSTICS}); fix the ones above and check again`,
    })
  }
  return { title: outline.title, blocks: outline.blocks, protocols, properties, checks, diagnostics: shown }
}

/** A notebook over MAX_NOTEBOOK_CHARS: one error where it passes the limit, nothing else read. */
function tooLong(text: string): NotebookModel {
  const lines = new LineMap(text)
  return {
    title: titleOf(text.slice(0, MAX_NOTEBOOK_CHARS)), blocks: [], protocols: [], properties: [], checks: [],
    diagnostics: [{
      ...lines.span(MAX_NOTEBOOK_CHARS, MAX_NOTEBOOK_CHARS + 1), severity: 'error',
      message: `the notebook is longer than ${MAX_NOTEBOOK_CHARS} characters (4 MiB), the most twofold reads, and passes that here; split it into smaller notebooks`,
    }],
  }
}

/** Sorted by position; the same message at the same place (a property checked twice) once. */
function tidy(ds: Diagnostic[]): Diagnostic[] {
  const seen = new Set<string>()
  const out: Diagnostic[] = []
  for (const d of [...ds].sort((a, b) => a.from - b.from || a.to - b.to)) {
    const key = `${d.from}:${d.to}:${d.message}`
    if (seen.has(key)) continue
    seen.add(key)
    out.push(d)
  }
  return out
}
