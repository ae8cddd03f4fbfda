// The class check of cutoff.md: rules 1-5 over the information-flow labels of the protocol, and
// rule 6 over the form of the property. Each violation is a `Reason` at the offending construct,
// with the chain that made its label.
//
// Every refused label is reported once, under the rule of its root cause:
// - a mixed scalar read by a guarded construct (or named by the property) is rule 2, at the read;
// - an aggregate whose information reaches a guarded construct, directly or through scalars, is
//   rule 5, at the aggregate;
// - any other crossing (another peer's entry, field, handler or loop) is the guarded construct's own
//   rule: 1 for a write to an entry, 3 for a broadcast, 4 for a send, at the statement.
// So `x[q] := alarm` with a mixed `alarm` is one rule-2 reason, not a rule-1 reason as well: the
// rule-1 argument fails only because the scalar does, and the reader fixes it there.
import type { Formula, ProcRef, PropertyModel, ProtocolModel, Span, Term } from '../language/model'
import type { Reason } from '../result'
import { analyzeFlow, explainScalar, type Flow, type Sink, type Source } from './flow'
import { RULE_NAMES } from './rules'

/** The result of the class check of one protocol against one property. */
export interface ClassCheck {
  /** Every violation, sorted by position then rule. Empty when the protocol is in the class. */
  reasons: Reason[]
  /** The rules (1-6) with no violation. */
  passed: number[]
  /** The labels the check was made from. */
  flow: Flow
}

/** Runs rules 1-6 of cutoff.md on a protocol and a property resolved against it. */
export function classCheck(protocol: ProtocolModel, property: PropertyModel): ClassCheck {
  const flow = analyzeFlow(protocol)
  const out = new Reasons()
  templateRules(protocol, flow, out)
  propertyScalars(protocol, property, flow, out)
  propertyForm(protocol, property, out)
  const reasons = out.sorted()
  const failed = new Set(reasons.map((r) => r.rule))
  return { reasons, passed: [1, 2, 3, 4, 5, 6].filter((r) => !failed.has(r)), flow }
}

/** Rule 6 alone: the form of a property (quantifiers, `next`, `#n`, aggregates, atoms). */
export function checkPropertyForm(protocol: ProtocolModel, property: PropertyModel): Reason[] {
  const out = new Reasons()
  propertyForm(protocol, property, out)
  return out.sorted()
}

/** Collects reasons, one per (rule, position). */
class Reasons {
  private list: Reason[] = []
  private seen = new Set<string>()

  add(rule: number, span: Span, message: string): void {
    const key = `${rule}:${span.line}:${span.column}`
    if (this.seen.has(key)) return
    this.seen.add(key)
    this.list.push({ rule, name: RULE_NAMES[rule], line: span.line, column: span.column, message })
  }

  sorted(): Reason[] {
    return [...this.list].sort((a, b) => a.line - b.line || a.column - b.column || a.rule - b.rule)
  }
}

function sinkText(p: ProtocolModel, s: Sink): string {
  if (s.kind === 'entry') return `the write to \`${p.vars[s.index].name}[${p.binders[s.binder!].name}]\` at line ${s.span.line}`
  const m = p.messages[s.index].name
  if (s.kind === 'broadcast') return `\`broadcast ${m}\` at line ${s.span.line}`
  return `\`send ${m} to ${p.binders[s.binder!].name}\` at line ${s.span.line}`
}

function aggregateText(p: ProtocolModel, span: Span): string {
  const text = p.block.text.slice(span.from - p.block.from, span.to - p.block.from).replace(/\s+/g, ' ')
  return text.length <= 40 ? `\`${text}\`` : `\`${text.slice(0, 37)}...\``
}

/** Rules 1-5 on the guarded constructs of the template. */
function templateRules(p: ProtocolModel, flow: Flow, out: Reasons): void {
  for (const sink of flow.sinks) {
    const allowed = (s: Source) => s.label.k === 'own' || (s.label.k === 'peer' && s.label.binder === sink.binder)
    const bad = sink.sources.filter((s) => !allowed(s))
    const crossings: Source[] = []
    for (const s of bad) {
      if (s.kind === 'scalar') {
        const v = s.scalar!
        out.add(2, s.span, `${explainScalar(p, flow, v)}; it feeds ${sinkText(p, sink)}`)
        for (const a of flow.aggregates[v]) {
          out.add(5, a, `the aggregate ${aggregateText(p, a)} at line ${a.line} speaks of every peer at once, and it feeds \`${p.vars[v].name}\`, which feeds ${sinkText(p, sink)}`)
        }
      } else if (s.kind === 'aggregate') {
        out.add(5, s.span, `the aggregate ${aggregateText(p, s.span)} at line ${s.span.line} speaks of every peer at once, and it feeds ${sinkText(p, sink)}`)
      } else crossings.push(s)
    }
    if (crossings.length === 0) continue
    const first = crossings[0]
    const more = crossings.length > 1 ? ` (and ${crossings.length - 1} more such read${crossings.length > 2 ? 's' : ''})` : ''
    if (sink.kind === 'entry') {
      const q = p.binders[sink.binder!].name
      const x = `${p.vars[sink.index].name}[${q}]`
      out.add(1, sink.span, `\`${x}\` at line ${sink.span.line} is written from information about another peer than \`${q}\`: the write ${first.why}${more}; an entry about \`${q}\` may depend only on the process's own state and on \`${q}\``)
    } else if (sink.kind === 'broadcast') {
      out.add(3, sink.span, `${sinkText(p, sink)} is not under own labels: it ${first.why}${more}; a broadcast may depend only on the process's own state, with own fields`)
    } else {
      const q = p.binders[sink.binder!].name
      out.add(4, sink.span, `${sinkText(p, sink)} depends on another peer than \`${q}\`: it ${first.why}${more}; a send to \`${q}\` may depend only on the process's own state and on \`${q}\``)
    }
  }
}

function eachTerm(f: Formula, visit: (t: Term, atom: Formula) => void): void {
  switch (f.k) {
    case 'true':
    case 'false':
      return
    case 'atom':
      visit(f.term, f)
      return
    case 'not':
    case 'always':
    case 'eventually':
    case 'next':
      eachTerm(f.arg, visit)
      return
    default:
      eachTerm(f.left, visit)
      eachTerm(f.right, visit)
  }
}

function subterms(t: Term, visit: (t: Term) => void): void {
  visit(t)
  switch (t.k) {
    case 'neg':
      subterms(t.arg, visit)
      return
    case 'bin':
    case 'min':
    case 'max':
      subterms(t.left, visit)
      subterms(t.right, visit)
      return
  }
}

/** Rule 2, property side: the property must not name a scalar that is not own. */
function propertyScalars(p: ProtocolModel, prop: PropertyModel, flow: Flow, out: Reasons): void {
  eachTerm(prop.formula, (term) =>
    subterms(term, (t) => {
      if (t.k !== 'member' || t.peer !== null || flow.scalar[t.index].k === 'own') return
      const v = t.index
      out.add(2, t.span, `${explainScalar(p, flow, v)}; property \`${prop.name}\` mentions it at line ${t.span.line}`)
      for (const a of flow.aggregates[v]) {
        out.add(5, a, `the aggregate ${aggregateText(p, a)} at line ${a.line} speaks of every peer at once, and it feeds \`${p.vars[v].name}\`, which property \`${prop.name}\` mentions at line ${t.span.line}`)
      }
    }),
  )
}

function propertyText(prop: PropertyModel, span: Span): string {
  const text = prop.block.text.slice(span.from - prop.block.from, span.to - prop.block.from).replace(/\s+/g, ' ')
  return text.length <= 50 ? text : text.slice(0, 47) + '...'
}

/** Rule 6: `forall p` or `forall p, q`, no `next`, no `#n`, no aggregates, atoms of one module each. */
function propertyForm(p: ProtocolModel, prop: PropertyModel, out: Reasons): void {
  const vars = prop.vars
  if (vars.length === 0 || vars.length > 2) {
    out.add(6, prop.span, vars.length === 0
      ? `property \`${prop.name}\` has no \`forall\`; the cutoff is for properties of the form \`forall p: ...\` or \`forall p, q: ...\``
      : `property \`${prop.name}\` quantifies over ${vars.length} processes; the cutoff is for one or two`)
  }
  for (const a of prop.aggregates) {
    out.add(6, a, `the aggregate at line ${a.line} speaks of every process at once; a property for the cutoff may not use aggregates`)
  }
  const nexts = (f: Formula): void => {
    switch (f.k) {
      case 'true':
      case 'false':
      case 'atom':
        return
      case 'next':
        out.add(6, f.span, `\`next\` at line ${f.span.line}: the cutoff holds for next-free properties only (a tick of G_N need not be a tick of the small instance); rewrite it without \`next\` or give explicit sizes`)
        nexts(f.arg)
        return
      case 'not':
      case 'always':
      case 'eventually':
        nexts(f.arg)
        return
      default:
        nexts(f.left)
        nexts(f.right)
    }
  }
  nexts(prop.formula)
  if (vars.length === 0) return

  const pv = vars[0]
  const qv = vars[1] ?? 'q'
  const category: Record<string, string> = {
    S0: `${pv}'s scalars`, S1: `${qv}'s scalars`,
    V01: `${pv}'s entries for ${qv} (and the channel ${qv} -> ${pv})`, V10: `${qv}'s entries for ${pv} (and the channel ${pv} -> ${qv})`,
  }
  eachTerm(prop.formula, (term, atom) => {
    const mentions = new Set<string>()
    let fixed = false
    const ref = (r: ProcRef): number | null => {
      if (r.k === 'fixed') {
        out.add(6, r.span, `\`#${r.n}\` at line ${r.span.line} names a process by number; a property for the cutoff names processes only through \`forall\``)
        fixed = true
        return null
      }
      return r.index
    }
    subterms(term, (t) => {
      if (t.k === 'member') {
        const a = ref(t.proc)
        const b = t.peer ? ref(t.peer) : null
        if (a === null) return
        if (t.peer === null) mentions.add(`S${a}`)
        else if (b !== null) mentions.add(`V${a}${b}`)
      } else if (t.k === 'alive' || t.k === 'crashed') {
        const a = ref(t.proc)
        if (a !== null) mentions.add(`S${a}`)
      } else if (t.k === 'pending') {
        const from = ref(t.from)
        const to = ref(t.to)
        if (from !== null && to !== null) mentions.add(`V${to}${from}`)
      }
    })
    if (fixed && mentions.size === 0) return
    const text = propertyText(prop, atom.span)
    if (vars.length === 1) {
      const other = [...mentions].filter((m) => m !== 'S0')
      if (other.length > 0) {
        out.add(6, atom.span, `the atom \`${text}\` at line ${atom.span.line} speaks of more than ${pv}'s own scalars; a property over one process (\`forall ${pv}\`) may mention only ${pv}'s scalars`)
      }
      return
    }
    if (mentions.size > 1) {
      const parts = [...mentions].sort().map((m) => category[m] ?? m)
      out.add(6, atom.span, `the atom \`${text}\` at line ${atom.span.line} speaks of ${parts.join(' and of ')} at once; each atom may speak of one of ${pv}'s scalars, ${qv}'s scalars, ${pv}'s entries for ${qv} or ${qv}'s entries for ${pv}: split it into separate atoms`)
    }
  })
}
