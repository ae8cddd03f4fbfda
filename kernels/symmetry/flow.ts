// Information-flow labels over a protocol template (cutoff.md): where the information in every
// value comes from. A value is `own` (constants, choices, own scalars that are themselves own),
// `peer(q)` (about the one peer bound to binder q: `x[q]`, a field of a message from q, being
// inside `on ... from q`) or `mixed` (about several peers, or about how many there are).
//
// The analysis is flow-insensitive on purpose: state persists across steps, so a scalar's label is
// the join of everything ever assigned to it, anywhere in the template. A scalar is never `peer(q)`:
// a binder means nothing outside its scope, and a scalar written from a peer's information is
// written from whichever peer ran last (the handler runs once per received message, a loop once per
// peer), so it is `mixed`. For the same reason an assignment inside `for r` whose target is not
// indexed by r runs once per peer and depends on how many peers there are: the loop itself is a
// source of that assignment (`x := x + 1` inside `for q` counts the peers).
//
// Every contribution to a label is kept as a `Source` with a phrase that says where it comes from,
// so that the class check can explain a refused label in a sentence instead of a lattice value.
import type { Expr, Handler, ProtocolModel, Span, Stmt } from '../language/model'

/** An information label. Peers are named by binder index (`ProtocolModel.binders`). */
export type Label = { k: 'own' } | { k: 'peer'; binder: number } | { k: 'mixed' }

export const OWN: Label = { k: 'own' }
export const MIXED: Label = { k: 'mixed' }

/** The least upper bound: own below every peer(q), distinct peers join to mixed. */
export function join(a: Label, b: Label): Label {
  if (a.k === 'own') return b
  if (b.k === 'own') return a
  if (a.k === 'peer' && b.k === 'peer' && a.binder === b.binder) return a
  return MIXED
}

/** What kind of thing contributed information to a value. */
export type SourceKind =
  | 'entry' // reading x[q]: peer(q)
  | 'field' // reading a field of the message being handled: peer(q) of the handler
  | 'handler' // being inside `on ... from q`: peer(q)
  | 'loop' // an assignment inside `for r` not indexed by r: peer(r), once per peer
  | 'scalar' // reading a scalar: its label
  | 'aggregate' // `count`, `some`, `every`: mixed

/** One contribution to the label of a value, with the phrase that explains it. */
export interface Source {
  kind: SourceKind
  label: Label
  /** Where the contribution is read (the `x[q]`, the field, the aggregate, the handler, the loop). */
  span: Span
  /** The scalar read, for kind 'scalar'. */
  scalar?: number
  /** The `if` condition it reaches the value through (an implicit flow), or null. */
  via: Span | null
  /** Explains the contribution, e.g. "reads `suspect[q]` at line 15". */
  why: string
}

/** Why a scalar is mixed: the first assignment found that made it so, and the source that did. */
export interface ScalarCause {
  /** The assignment statement. */
  at: Span
  /** Its contributions that are not own (at least one). */
  sources: Source[]
}

/** A construct the class check guards: a write to an entry, a broadcast, a send. */
export interface Sink {
  kind: 'entry' | 'broadcast' | 'send'
  /** The statement. */
  span: Span
  /** For 'entry' the written variable, else the message. */
  index: number
  /** The peer the construct is about: the entry's binder or the send's target; null for broadcast. */
  binder: number | null
  /** Every contribution to its label: enclosing conditions and handler, the values written or sent. */
  sources: Source[]
}

/** The result of the analysis. Plain data. */
export interface Flow {
  /** Per `ProtocolModel.vars` index: the label of a scalar (own or mixed); own for per-peer vars. */
  scalar: Label[]
  /** Per var: why the scalar is mixed, or null. */
  cause: (ScalarCause | null)[]
  /** Per var: the aggregates that feed the scalar, directly or through other scalars. */
  aggregates: Span[][]
  sinks: Sink[]
}

interface Ctx {
  /** Sources from enclosing conditions and the enclosing handler. */
  pc: Source[]
  /** Enclosing `for` loops, innermost last: binder and the loop statement. */
  loops: { binder: number; span: Span }[]
  handler: Handler | null
}

/** A position as the messages write it. */
function at(span: Span): string {
  return `line ${span.line}`
}

/** Computes the labels of a protocol to a fixed point over the whole template. */
export function analyzeFlow(protocol: ProtocolModel): Flow {
  return new FlowAnalysis(protocol).run()
}

class FlowAnalysis {
  readonly scalar: Label[]
  readonly cause: (ScalarCause | null)[]
  readonly aggregates: Span[][]
  private sinks: Sink[] = []
  private changed = false
  private collecting = false

  constructor(private readonly p: ProtocolModel) {
    this.scalar = p.vars.map(() => OWN)
    this.cause = p.vars.map(() => null)
    this.aggregates = p.vars.map(() => [])
  }

  run(): Flow {
    // Labels only rise (own -> mixed) and aggregate sets only grow, so this terminates within
    // (number of scalars + number of aggregates) rounds.
    do {
      this.changed = false
      this.template()
    } while (this.changed)
    this.collecting = true
    this.template()
    return { scalar: this.scalar, cause: this.cause, aggregates: this.aggregates, sinks: this.sinks }
  }

  private template(): void {
    for (const h of this.p.handlers) {
      const name = this.p.messages[h.message].name
      const q = this.p.binders[h.binder].name
      const pc: Source = {
        kind: 'handler', label: { k: 'peer', binder: h.binder }, span: h.span, via: null,
        why: `runs in the handler \`on ${name} from ${q}\` at ${at(h.span)}, once per message received`,
      }
      this.block(h.body, { pc: [pc], loops: [], handler: h })
    }
    this.block(this.p.step, { pc: [], loops: [], handler: null })
  }

  private block(body: Stmt[], ctx: Ctx): void {
    for (const s of body) this.stmt(s, ctx)
  }

  private stmt(s: Stmt, ctx: Ctx): void {
    switch (s.k) {
      case 'skip':
        return
      case 'assign':
      case 'choose':
      case 'chooseRange': {
        const values = s.k === 'assign' ? [s.value] : s.k === 'choose' ? s.options : [s.lo, s.hi]
        const sources = [...ctx.pc]
        for (const v of values) this.expr(v, ctx, sources, null)
        const t = s.target
        // A loop whose binder does not index the target repeats the assignment once per peer.
        for (const l of ctx.loops) {
          if (t.binder === l.binder) continue
          sources.push({
            kind: 'loop', label: { k: 'peer', binder: l.binder }, span: l.span, via: null,
            why: `runs inside \`for ${this.p.binders[l.binder].name}\` at ${at(l.span)}, once per peer`,
          })
        }
        if (t.binder === null) this.assignScalar(t.index, s.span, sources)
        else if (this.collecting) this.sinks.push({ kind: 'entry', span: s.span, index: t.index, binder: t.binder, sources })
        return
      }
      case 'if': {
        // Each branch runs under its own condition and the conditions of the branches before it.
        const pc = [...ctx.pc]
        for (const b of s.branches) {
          this.expr(b.cond, ctx, pc, b.cond.span)
          this.block(b.body, { ...ctx, pc: [...pc] })
        }
        if (s.otherwise) this.block(s.otherwise, { ...ctx, pc })
        return
      }
      case 'for':
        this.block(s.body, { ...ctx, loops: [...ctx.loops, { binder: s.binder, span: s.span }] })
        return
      case 'broadcast':
      case 'send': {
        const sources = [...ctx.pc]
        for (const a of s.args) this.expr(a, ctx, sources, null)
        if (this.collecting) {
          this.sinks.push({ kind: s.k, span: s.span, index: s.message, binder: s.k === 'send' ? s.to : null, sources })
        }
        return
      }
    }
  }

  private assignScalar(v: number, span: Span, sources: Source[]): void {
    const bad = sources.filter((src) => src.label.k !== 'own')
    if (bad.length > 0 && this.scalar[v].k !== 'mixed') {
      this.scalar[v] = MIXED
      this.cause[v] = { at: span, sources: bad }
      this.changed = true
    }
    for (const src of bad) {
      const aggs = src.kind === 'aggregate' ? [src.span] : src.kind === 'scalar' ? this.aggregates[src.scalar!] : []
      for (const a of aggs) {
        if (this.aggregates[v].some((b) => b.from === a.from && b.to === a.to)) continue
        this.aggregates[v].push(a)
        this.changed = true
      }
    }
  }

  /** Adds the sources of expression `e` to `out`; `via` is the condition it is read in, if any. */
  private expr(e: Expr, ctx: Ctx, out: Source[], via: Span | null): void {
    // Read in a condition, the value flows implicitly: say so, naming the condition.
    const reads = (what: string, span: Span) =>
      via ? `depends on the condition at ${at(via)}, which reads ${what}` : `reads ${what} at ${at(span)}`
    switch (e.k) {
      case 'lit':
      case 'const':
        return
      case 'scalar': {
        const name = this.p.vars[e.index].name
        out.push({ kind: 'scalar', label: this.scalar[e.index], span: e.span, scalar: e.index, via, why: reads(`\`${name}\``, e.span) })
        return
      }
      case 'entry': {
        const name = `${this.p.vars[e.index].name}[${this.p.binders[e.binder].name}]`
        out.push({ kind: 'entry', label: { k: 'peer', binder: e.binder }, span: e.span, via, why: reads(`\`${name}\``, e.span) })
        return
      }
      case 'field': {
        const h = ctx.handler!
        const fname = h.fieldNames[e.index] ?? this.p.messages[h.message].fields[e.index]?.name ?? `#${e.index + 1}`
        const q = this.p.binders[h.binder].name
        out.push({
          kind: 'field', label: { k: 'peer', binder: h.binder }, span: e.span, via,
          why: reads(`\`${fname}\` (a field of the message from \`${q}\`)`, e.span),
        })
        return
      }
      case 'neg':
      case 'not':
        this.expr(e.arg, ctx, out, via)
        return
      case 'bin':
      case 'min':
      case 'max':
        this.expr(e.left, ctx, out, via)
        this.expr(e.right, ctx, out, via)
        return
      case 'ite':
        this.expr(e.cond, ctx, out, via)
        this.expr(e.then, ctx, out, via)
        this.expr(e.else, ctx, out, via)
        return
      case 'agg':
        // Whatever the body reads, an aggregate speaks of every peer at once (and `count q: true`
        // of how many there are), so the body need not be looked into.
        out.push({
          kind: 'aggregate', label: MIXED, span: e.span, via,
          why: reads(`the aggregate \`${e.op} ${this.p.binders[e.binder].name}: ...\``, e.span),
        })
        return
    }
  }
}

/**
 * Explains why a scalar is mixed, following the chain through other scalars (at most `depth` links),
 * e.g. "`alarm` at line 14 is mixed because its assignment there runs inside `for q` at line 13, once per peer".
 */
export function explainScalar(protocol: ProtocolModel, flow: Flow, v: number, depth = 3): string {
  const c = flow.cause[v]
  const name = protocol.vars[v].name
  if (!c) return `\`${name}\` is own`
  // Two contributions say enough ("runs inside `for q` ... and reads `suspect[q]` ...").
  const context = (s: Source) => s.kind === 'loop' || s.kind === 'handler'
  const shown = [...c.sources.filter(context), ...c.sources.filter((s) => !context(s))].slice(0, 2)
  let text = `\`${name}\` at ${at(c.at)} is mixed because its assignment ${shown.map((s) => s.why).join(', and ')}`
  const via = shown.find((s) => s.kind === 'scalar' && s.scalar !== undefined && s.scalar !== v)
  if (via && depth > 1) text += `, and ${explainScalar(protocol, flow, via.scalar!, depth - 1)}`
  return text
}
