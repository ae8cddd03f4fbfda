// From a `check` declaration to a `CheckModel`: the protocol and properties it names (defined
// above it), its sizes (`at N = ...`), its constant sweep (`with`), its bound on states (`within`)
// and its method (`by induction`). The clause words are contextual keywords (syntax.ts); the
// earlier spellings parse so that the error can give the current one at the same place.
import type { SyntaxNode } from '@lezer/common'
import type { BlockContext } from './context'
import { protocolProblems, termProblems } from './bounds'
import { isModelValue, MAX_PROCESSES, MAX_SWEEP_ROWS, MAX_SWEEP_VALUES, MAX_TEMPORAL_PROCESSES } from './limits'
import type { CheckModel, Formula, PropertyModel, ProtocolModel, Span, SweepItem, Term } from './model'
import { atomsOf, isInvariant } from './formula'
import { DeclaredProperty, resolveProperty } from './property'
import { didYouMean, namesOf } from './suggest'

/** What a check can see: what is defined above it, and what is defined anywhere (for messages). */
export interface CheckScope {
  protocols: Map<string, { index: number; model: ProtocolModel; broken: boolean; from: number }>
  properties: Map<string, { decl: DeclaredProperty; from: number }>
  /** Names declared in blocks that could not be read (nested too deeply): their error says enough. */
  unreadable?: Set<string>
}

function signed(node: SyntaxNode, ctx: BlockContext): number {
  return Number(ctx.text(node).replace(/\s+/g, ''))
}

/** The clauses of a check line in the order the contract writes them, by the word that starts each. */
const ORDER: Record<string, { slot: number; word: string }> = {
  SizeClause: { slot: 0, word: 'at' },
  ForClause: { slot: 0, word: 'at' },
  WithClause: { slot: 1, word: 'with' },
  BoundClause: { slot: 2, word: 'within' },
  LimitClause: { slot: 2, word: 'within' },
  MethodClause: { slot: 3, word: 'by' },
}

interface Clauses {
  at: SyntaxNode | null
  with: SyntaxNode | null
  within: SyntaxNode | null
  by: SyntaxNode | null
  /** An earlier `for N processes` clause was given (its error is reported). */
  legacySizes: boolean
  ok: boolean
}

/**
 * The clauses of a check, each at most once and in the contract's order. The earlier spellings
 * are errors whose message gives the current spelling of the same clause.
 */
function readClauses(node: SyntaxNode, ctx: BlockContext): Clauses {
  const out: Clauses = { at: null, with: null, within: null, by: null, legacySizes: false, ok: true }
  const seen: (SyntaxNode | null)[] = [null, null, null, null]
  let latest = -1
  for (let c = node.firstChild; c; c = c.nextSibling) {
    const place = ORDER[c.name]
    if (!place) continue
    const oneLine = (n: SyntaxNode) => ctx.text(n).replace(/\s+/g, ' ')
    if (c.name === 'ForClause') {
      const size = c.getChild('SizeRange') ?? c.getChild('Number')!
      ctx.error(c, `write \`at N = ${oneLine(size)}\` instead of \`${oneLine(c)}\``)
      out.ok = false
      out.legacySizes = true
    } else if (c.name === 'LimitClause') {
      ctx.error(c, `write \`within ${ctx.text(c.getChild('Number')!)} states\` instead of \`${oneLine(c)}\``)
      out.ok = false
    }
    const first = seen[place.slot]
    if (first) {
      ctx.error(c, `this check has a second \`${place.word}\` clause (the first is at column ${ctx.span(first).column}); keep one`)
      out.ok = false
      continue
    }
    seen[place.slot] = c
    if (place.slot < latest && c.name !== 'ForClause' && c.name !== 'LimitClause') {
      const after = Object.values(ORDER).find((o) => o.slot === latest)!.word
      ctx.error(c, `the \`${place.word}\` clause goes before the \`${after}\` clause; write the clauses in the order \`at N = ...\`, \`with ...\`, \`within K states\`, \`by induction\``)
      out.ok = false
    }
    latest = Math.max(latest, place.slot)
    if (c.name === 'SizeClause') out.at = c
    else if (c.name === 'WithClause') out.with = c
    else if (c.name === 'BoundClause') out.within = c
    else if (c.name === 'MethodClause') out.by = c
  }
  return out
}

/** The sizes of an `at N = K` or `at N = A..B` clause, or null after reporting why they are wrong. */
function sizesOf(clause: SyntaxNode, ctx: BlockContext, properties: PropertyModel[]): number[] | null {
  const nameNode = clause.getChild('Identifier')!
  const range = clause.getChild('SizeRange')
  const sizeNode = range ?? clause.getChild('Number')!
  const written = ctx.text(sizeNode).replace(/\s+/g, '')
  if (ctx.text(nameNode) !== 'N') {
    ctx.error(nameNode, `the number of processes is called \`N\` (an instance is G_N); write \`at N = ${written}\``)
    return null
  }
  const nums = (range ?? clause).getChildren('Number').map((n) => Number(ctx.text(n)))
  const [lo, hi] = nums.length === 2 ? nums : [nums[0], nums[0]]
  if (lo < 1) { ctx.error(clause, 'a check needs at least 1 process; write `at N = 1` or more'); return null }
  if (lo > hi) { ctx.error(clause, `the size range ${lo}..${hi} is empty; write the smaller size first, as in \`at N = ${hi}..${lo}\``); return null }
  if (hi > MAX_PROCESSES) { ctx.error(clause, `${hi} processes is beyond what an exhaustive check can explore here (at most ${MAX_PROCESSES}); check fewer processes`); return null }
  const temporalProp = properties.find((x) => !isInvariant(x))
  if (hi > MAX_TEMPORAL_PROCESSES && temporalProp) {
    ctx.error(clause, `property \`${temporalProp.name}\` is temporal (not \`always\` of a state condition), and temporal properties are checked on at most ${MAX_TEMPORAL_PROCESSES} processes (their fairness conditions must fit the temporal product's 31 marks); write \`at N = ${lo < MAX_TEMPORAL_PROCESSES ? `${lo}..` : ''}${MAX_TEMPORAL_PROCESSES}\` or fewer`)
    return null
  }
  let ok = true
  for (const p of properties) {
    const need = Math.max(p.vars.length, p.maxFixed)
    if (lo < need) {
      ctx.error(clause, `property \`${p.name}\` speaks of ${need} distinct processes, so it cannot be checked for ${lo} process${lo === 1 ? '' : 'es'}; start the sizes at ${need}`)
      ok = false
    }
  }
  if (!ok) return null
  const sizes: number[] = []
  for (let n = lo; n <= hi; n++) sizes.push(n)
  return sizes
}

/** The settings a sweep gives, one constant vector each (the same order as the runner's plan). */
function sweepSettings(protocol: ProtocolModel, sweep: SweepItem[]): number[][] {
  let out: number[][] = [protocol.consts.map((c) => c.value)]
  for (const item of sweep) out = out.flatMap((base) => item.values.map((v) => { const s = base.slice(); s[item.constIndex] = v; return s }))
  return out
}

/**
 * The limits (limits.ts) under every constant setting of the check: the protocol's under swept
 * settings (its declared setting was checked with the protocol), the properties' under all.
 * Reports the first problem of a swept setting at the sweep, naming the setting and the construct.
 */
function checkSettings(protocol: ProtocolModel, properties: PropertyModel[], sweep: SweepItem[], at: SyntaxNode, ctx: BlockContext): boolean {
  if (sweep.length === 0) {
    const defaults = protocol.consts.map((c) => c.value)
    let ok = true
    for (const p of properties) {
      for (const problem of termProblems(protocol, atomsOf(p.formula), defaults)) { ctx.error(problem.span, problem.message); ok = false }
    }
    return ok
  }
  for (const setting of sweepSettings(protocol, sweep)) {
    const problem = protocolProblems(protocol, setting)[0] ?? properties.map((p) => termProblems(protocol, atomsOf(p.formula), setting)[0]).find((x) => x)
    if (!problem) continue
    const named = sweep.map((s) => `${protocol.consts[s.constIndex].name} = ${setting[s.constIndex]}`).join(', ')
    ctx.error(at, `with ${named}, ${problem.message} (line ${problem.span.line}, column ${problem.span.column}); narrow the sweep`)
    return false
  }
  return true
}

/** The sweep items of a `with` clause that read well, and whether all did (the errors are reported). */
function readSweep(clause: SyntaxNode | null | undefined, protocol: ProtocolModel, pname: string, ctx: BlockContext): { sweep: SweepItem[]; ok: boolean } {
  const sweep: SweepItem[] = []
  let ok = true
  for (const item of clause?.getChildren('SweepItem') ?? []) {
    const cid = item.getChild('Identifier')!
    const cname = ctx.text(cid)
    const constIndex = protocol.consts.findIndex((c) => c.name === cname)
    if (constIndex < 0) {
      ctx.error(cid, `protocol \`${pname}\` has no constant \`${cname}\`${didYouMean(cname, namesOf(protocol.consts))}; sweep one of its constants`)
      ok = false
      continue
    }
    if (sweep.some((s) => s.constIndex === constIndex)) {
      ctx.error(cid, `constant \`${cname}\` is set twice in this check; set it once`)
      ok = false
      continue
    }
    const range = item.getChild('SweepRange')
    const numbers = range ? range.getChildren('SignedNumber') : [item.getChild('SignedNumber')!]
    const bad = numbers.find((n) => !isModelValue(signed(n, ctx)))
    if (bad) {
      ctx.error(bad, `the value ${ctx.text(bad)} for \`${cname}\` is outside the integers a model may hold (${-(2 ** 31)}..${2 ** 31 - 1}); use a smaller value`)
      ok = false
      continue
    }
    let values: number[]
    if (range) {
      const [lo, hi] = numbers.map((n) => signed(n, ctx))
      if (lo > hi) { ctx.error(range, `the range ${lo}..${hi} for \`${cname}\` is empty; write the smaller value first`); ok = false; continue }
      if (hi - lo + 1 > MAX_SWEEP_VALUES) { ctx.error(range, `sweeping \`${cname}\` over ${hi - lo + 1} values is more than the ${MAX_SWEEP_VALUES} one sweep item may list; narrow the range`); ok = false; continue }
      values = []
      for (let v = lo; v <= hi; v++) values.push(v)
    } else {
      values = [signed(numbers[0], ctx)]
    }
    sweep.push({ constIndex, values, span: ctx.span(item) })
  }
  return { sweep, ok }
}

/** Resolves one check; null when it cannot run (its errors are reported). */
export function resolveCheck(node: SyntaxNode, ctx: BlockContext, scope: CheckScope, at: number): CheckModel | null {
  const ids = node.getChildren('Identifier')
  const [protoNode, ...propNodes] = ids
  const span: Span = ctx.span(node)
  const source = ctx.text(node).replace(/\s+/g, ' ').trim()
  let ok = true
  const pname = ctx.text(protoNode)
  const proto = scope.protocols.get(pname)
  if (!proto) {
    if (scope.unreadable?.has(pname)) return null
    ctx.error(protoNode, `unknown protocol \`${pname}\`${didYouMean(pname, scope.protocols.keys())}; define it in a protocol block above this check`)
    return null
  }
  if (proto.from > at) {
    ctx.error(protoNode, `protocol \`${pname}\` is defined below this check (line ${proto.model.span.line}); move the check under it`)
    return null
  }
  const protocol = proto.model
  const properties: PropertyModel[] = []
  const seen = new Set<string>()
  for (const n of propNodes) {
    const name = ctx.text(n)
    const p = scope.properties.get(name)
    if (seen.has(name)) { ctx.error(n, `property \`${name}\` is listed twice in this check; list it once`); ok = false; continue }
    seen.add(name)
    if (!p) {
      if (scope.unreadable?.has(name)) { ok = false; continue }
      ctx.error(n, `unknown property \`${name}\`${didYouMean(name, scope.properties.keys())}; define it in a property block above this check`)
      ok = false
      continue
    }
    if (p.from > at) {
      ctx.error(n, `property \`${name}\` is defined below this check (line ${p.decl.span.line}); move the check under it`)
      ok = false
      continue
    }
    if (proto.broken) continue
    const resolved = resolveProperty(p.decl, protocol, span.line)
    if (!resolved) { ok = false; continue }
    properties.push(resolved)
  }

  const clauses = readClauses(node, ctx)
  if (!clauses.ok) ok = false
  let sizes: number[] | null = null
  const sizeClause = clauses.at
  if (sizeClause) {
    const r = sizesOf(sizeClause, ctx, properties)
    if (r) sizes = r
    else ok = false
  } else if (!clauses.legacySizes) {
    for (const p of properties) {
      if (p.vars.length === 0) {
        ctx.error(protoNode, `property \`${p.name}\` names processes as #1, #2, ... without \`forall\`, so it has no cutoff size; give the sizes with \`at N = K\``)
        ok = false
      }
    }
  }

  const { sweep, ok: sweepOk } = readSweep(clauses.with, protocol, pname, ctx)
  if (!sweepOk) ok = false
  const withClause = node.getChild('WithClause')
  const rows = sweep.reduce((n, s) => n * s.values.length, 1)
  if (withClause && rows > MAX_SWEEP_ROWS) {
    ctx.error(withClause, `this sweep gives ${rows} constant settings, more than the ${MAX_SWEEP_ROWS} one check may run; narrow its ranges or split the check`)
    ok = false
  } else if (withClause && ok && !proto.broken && !checkSettings(protocol, properties, sweep, withClause, ctx)) ok = false
  else if (!withClause && ok && !proto.broken && !checkSettings(protocol, properties, [], protoNode, ctx)) ok = false

  let limit: number | null = null
  const bound = clauses.within
  if (bound) {
    const numNode = bound.getChild('Number')!
    limit = Number(ctx.text(numNode))
    if (limit < 1) { ctx.error(bound, `a check explores at least 1 state, so \`within ${ctx.text(numNode)} states\` cannot run; write a positive bound, as in \`within 1000000 states\``); ok = false }
    else if (!Number.isSafeInteger(limit)) { ctx.error(bound, `the bound ${ctx.text(numNode)} is too large to count states exactly; write at most \`within ${Number.MAX_SAFE_INTEGER} states\``); ok = false }
  }
  const method = clauses.by ? 'induction' : 'exploration'
  if (clauses.by) {
    for (let i = 0; i < properties.length; i++) {
      if (isInvariant(properties[i])) continue
      const at = propNodes.find((n) => ctx.text(n) === properties[i].name)!
      ctx.error(at, `property \`${properties[i].name}\` is not \`always P\` with P free of temporal operators, so it cannot be proved by induction; check it in a line without \`by induction\``)
      ok = false
    }
  }
  if (!ok || proto.broken) return null
  return { protocol: proto.index, properties, sizes, sweep, limit, method, span, block: ctx.block, source }
}
