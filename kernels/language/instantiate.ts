// A property's atom as people read it in a counterexample: its text as written, with each
// quantified process variable replaced by the process it was bound to (`p.suspect[q]` under
// p=1, q=2 reads `#1.suspect[#2]`, `correct(p)` reads `correct(#1)`). Replacement goes by the
// spans of the process references in the resolved term, so a constant, a message or a variable
// that happens to share a variable's name is left as written.
import type { ProcRef, PropertyModel, Span, Term } from './model'

function procRefs(t: Term, out: ProcRef[]): ProcRef[] {
  switch (t.k) {
    case 'member': out.push(t.proc); if (t.peer) out.push(t.peer); break
    case 'alive': case 'crashed': out.push(t.proc); break
    case 'pending': out.push(t.from, t.to); break
    case 'neg': procRefs(t.arg, out); break
    case 'bin': case 'min': case 'max': procRefs(t.left, out); procRefs(t.right, out); break
    default: break
  }
  return out
}

/**
 * The text of `term` (an atom of `prop`) over `span` (the atom's own span, which for `correct(p)`
 * and `faulty(p)` covers the sugar), with the variables bound to `assignment` (0-based processes,
 * one per quantified variable), on one line.
 */
export function instantiatedText(prop: PropertyModel, term: Term, span: Span, assignment: number[]): string {
  const base = prop.block.from
  let text = prop.block.text.slice(span.from - base, span.to - base)
  const refs = procRefs(term, []).filter((r) => r.k === 'var' && r.span.from >= span.from && r.span.to <= span.to)
  // Right to left, so that earlier offsets stay valid.
  refs.sort((a, b) => b.span.from - a.span.from)
  for (const r of refs) {
    if (r.k !== 'var' || assignment[r.index] === undefined) continue
    const from = r.span.from - span.from
    const to = r.span.to - span.from
    text = `${text.slice(0, from)}#${assignment[r.index] + 1}${text.slice(to)}`
  }
  return text.replace(/\s+/g, ' ')
}
