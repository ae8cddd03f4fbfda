// From a `check` declaration to a `CheckModel`: the protocol and properties it names (defined
// above it), its sizes, its constant sweep and its state limit.
import type { SyntaxNode } from '@lezer/common'
import type { BlockContext } from './context'
import type { CheckModel, ProtocolModel, Span, SweepItem } from './model'
import { DeclaredProperty, resolveProperty } from './property'
import { didYouMean } from './suggest'

/** What a check can see: what is defined above it, and what is defined anywhere (for messages). */
export interface CheckScope {
  protocols: Map<string, { index: number; model: ProtocolModel; broken: boolean; from: number }>
  properties: Map<string, { decl: DeclaredProperty; from: number }>
}

const MAX_SIZE = 12

function signed(node: SyntaxNode, ctx: BlockContext): number {
  return Number(ctx.text(node).replace(/\s+/g, ''))
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
    ctx.error(protoNode, `unknown protocol \`${pname}\`${didYouMean(pname, scope.protocols.keys())}; define it in a protocol block above this check`)
    return null
  }
  if (proto.from > at) {
    ctx.error(protoNode, `protocol \`${pname}\` is defined below this check (line ${proto.model.span.line}); move the check under it`)
    return null
  }
  const protocol = proto.model
  const properties = []
  const seen = new Set<string>()
  for (const n of propNodes) {
    const name = ctx.text(n)
    const p = scope.properties.get(name)
    if (seen.has(name)) { ctx.error(n, `property \`${name}\` is listed twice in this check; list it once`); ok = false; continue }
    seen.add(name)
    if (!p) {
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

  let sizes: number[] | null = null
  const forClause = node.getChild('ForClause')
  if (forClause) {
    const range = forClause.getChild('SizeRange')
    const nums = (range ?? forClause).getChildren('Number').map((n) => Number(ctx.text(n)))
    const [lo, hi] = nums.length === 2 ? nums : [nums[0], nums[0]]
    if (lo < 1) { ctx.error(forClause, 'a check needs at least 1 process; write `for 1 process` or more'); ok = false }
    else if (lo > hi) { ctx.error(forClause, `the size range ${lo}..${hi} is empty; write the smaller size first`); ok = false }
    else if (hi > MAX_SIZE) { ctx.error(forClause, `${hi} processes is beyond what an exhaustive check can explore here (at most ${MAX_SIZE}); check fewer processes`); ok = false }
    else {
      sizes = []
      for (let n = lo; n <= hi; n++) sizes.push(n)
      for (const p of properties) {
        const need = Math.max(p.vars.length, p.maxFixed)
        if (lo < need) {
          ctx.error(forClause, `property \`${p.name}\` speaks of ${need} distinct processes, so it cannot be checked for ${lo} process${lo === 1 ? '' : 'es'}; start the sizes at ${need}`)
          ok = false
        }
      }
    }
  } else {
    for (const p of properties) {
      if (p.vars.length === 0) {
        ctx.error(protoNode, `property \`${p.name}\` names processes as #1, #2, ... without \`forall\`, so it has no cutoff size; give the sizes with \`for N processes\``)
        ok = false
      }
    }
  }

  const sweep: SweepItem[] = []
  for (const item of node.getChild('WithClause')?.getChildren('SweepItem') ?? []) {
    const cid = item.getChild('Identifier')!
    const cname = ctx.text(cid)
    const constIndex = protocol.consts.findIndex((c) => c.name === cname)
    if (constIndex < 0) {
      ctx.error(cid, `protocol \`${pname}\` has no constant \`${cname}\`${didYouMean(cname, protocol.consts.map((c) => c.name))}; sweep one of its constants`)
      ok = false
      continue
    }
    if (sweep.some((s) => s.constIndex === constIndex)) {
      ctx.error(cid, `constant \`${cname}\` is set twice in this check; set it once`)
      ok = false
      continue
    }
    const range = item.getChild('SweepRange')
    let values: number[]
    if (range) {
      const [lo, hi] = range.getChildren('SignedNumber').map((n) => signed(n, ctx))
      if (lo > hi) { ctx.error(range, `the range ${lo}..${hi} for \`${cname}\` is empty; write the smaller value first`); ok = false; continue }
      if (hi - lo >= 1000) { ctx.error(range, `sweeping \`${cname}\` over ${hi - lo + 1} values is too many for one check; narrow the range`); ok = false; continue }
      values = []
      for (let v = lo; v <= hi; v++) values.push(v)
    } else {
      values = [signed(item.getChild('SignedNumber')!, ctx)]
    }
    sweep.push({ constIndex, values, span: ctx.span(item) })
  }

  let limit: number | null = null
  const lim = node.getChild('LimitClause')
  if (lim) {
    limit = Number(ctx.text(lim.getChild('Number')!))
    if (!(limit >= 1) || !Number.isSafeInteger(limit)) { ctx.error(lim, 'the state limit must be a positive whole number; write `limit 1000000 states`'); ok = false }
  }
  if (!ok || proto.broken) return null
  return { protocol: proto.index, properties, sizes, sweep, limit, span, block: ctx.block, source }
}
