// The class check (cutoff.md rules 1-6). Oracle for the positions: the offending construct located
// by searching the notebook text (fixtures.ts `position`), not through the parser's spans. Oracle for
// the verdicts as a whole: witness.test.ts checks empirically (projection, symmetry, a necessity
// counterexample) that granted protocols behave as the theorem says and a refused one does not.
import { describe, expect, it } from 'vitest'
import { classCheck } from '../../kernels/symmetry/classcheck'
import { decideCutoff } from '../../kernels/symmetry/cutoff'
import { depot, notebook, position, PUMPS, SEEN } from './fixtures'

/** The short name of each rule, as cutoff.md gives them (written here, not imported). */
const NAMES: Record<number, string> = {
  1: 'peer-entries', 2: 'mixed-silent', 3: 'own-broadcast', 4: 'peer-reply', 5: 'no-aggregate', 6: 'property-form',
}

/** Asserts that the case breaks exactly one rule, once, at the `occurrence`-th `needle`, under the rule's name. */
function breaksOnly(rule: number, protocolBody: string, needle: string, opts: { extra?: string; property?: string; occurrence?: number } = {}) {
  const c = notebook(depot(protocolBody, opts.extra ?? ''), [opts.property ?? SEEN])
  const { reasons } = classCheck(c.protocol, c.properties[0])
  const where = position(c.text, needle, opts.occurrence ?? 1)
  expect(reasons.map((r) => ({ rule: r.rule, name: r.name, line: r.line, column: r.column }))).toEqual([{ rule, name: NAMES[rule], ...where }])
  return reasons[0].message
}

describe('rule 1: entries are written only from own state and their own peer', () => {
  it('refuses a write to another peer\'s entry inside a handler', () => {
    const m = breaksOnly(1, `  on ping from q { for r { seen[r] := true } }\n  step { broadcast ping }`, 'seen[r] := true')
    expect(m).toContain('on ping from q')
  })
  it('refuses an entry written from another peer\'s entry', () => {
    breaksOnly(1, `  step { broadcast ping\n    for q { for r { seen[q] := seen[r] } } }`, 'seen[q] := seen[r]')
  })
  it('refuses an entry written from a field of a message from another peer', () => {
    breaksOnly(1, `  on ack(v) from q { for r { hits[r] := v } }\n  step { broadcast ping }`, 'hits[r] := v', { extra: '' })
  })
  it('refuses an entry written under a condition on another peer (implicit flow)', () => {
    const m = breaksOnly(1, `  step { broadcast ping\n    for q { for r { if seen[r] { hits[q] := 1 } } } }`, 'hits[q] := 1')
    expect(m).toContain('condition')
  })
  it('refuses an entry chosen among values about another peer', () => {
    breaksOnly(1, `  step { broadcast ping\n    for q { for r { seen[q] := one of {seen[r], false} } } }`, 'seen[q] := one of')
  })
  it('refuses an entry updated once per peer of an inner loop (it counts the peers)', () => {
    const m = breaksOnly(1, `  on ping from q { for r { hits[q] := min(hits[q] + 1, 2) } }\n  step { broadcast ping }`, 'hits[q] := min')
    expect(m).toContain('once per peer')
  })
})

describe('rule 2: scalars that carry peer information feed nothing guarded', () => {
  it('refuses a scalar set by a handler and read by a broadcast condition', () => {
    const m = breaksOnly(2, `  on ping from q { heard := true }\n  step { broadcast ping\n    if heard { broadcast ack(0) } }`, 'heard {')
    expect(m).toMatch(/`heard` at line \d+ is mixed because its assignment runs in the handler `on ping from q`/)
    expect(m).toContain('it feeds `broadcast ack`')
  })
  it('refuses a scalar set inside a loop and sent as a broadcast field', () => {
    const m = breaksOnly(2, `  step { broadcast ping\n    for q { if seen[q] { level := 1 } }\n    broadcast ack(level) }`, 'level) }')
    expect(m).toContain('inside `for q`')
    expect(m).toContain('reads `seen[q]`')
  })
  it('refuses a scalar copied from a message field and written into an entry', () => {
    breaksOnly(2, `  on ack(v) from q { level := v }\n  step { broadcast ping\n    for q { seen[q] := level = 1 } }`, 'level = 1')
  })
  it('refuses a scalar read by the condition of a reply', () => {
    breaksOnly(2, `  on ping from q { heard := true\n    if heard { send ack(0) to q } }\n  step { broadcast ping }`, 'heard {')
  })
  it('refuses a property that mentions a scalar set by a handler', () => {
    const m = breaksOnly(2, `  on ping from q { heard := true }\n  step { broadcast ping }`, 'p.heard', {
      property: 'property quiet = forall p: always (p.heard implies alive(p))',
    })
    expect(m).toContain('property `quiet` mentions it')
  })
  it('explains a chain through two scalars', () => {
    const m = breaksOnly(2, `  on ack(v) from q { level := v }\n  step { broadcast ping\n    copy := level\n    broadcast ack(copy) }`, 'copy) }', {
      extra: '  state copy: 0..2 = 0',
    })
    expect(m).toMatch(/`copy` at line \d+ is mixed because its assignment reads `level`.*and `level` at line \d+ is mixed/)
  })
})

describe('rule 3: broadcasts depend only on own state', () => {
  it('refuses a broadcast inside a handler', () => {
    breaksOnly(3, `  on ping from q { broadcast ack(0) }\n  step { broadcast ping }`, 'broadcast ack(0)')
  })
  it('refuses a broadcast whose field reads an entry', () => {
    breaksOnly(3, `  step { broadcast ping\n    for q { broadcast ack(if seen[q] then 1 else 0) } }`, 'broadcast ack(if')
  })
  it('refuses a broadcast under a condition on an entry', () => {
    breaksOnly(3, `  step { broadcast ping\n    for q { if seen[q] { broadcast ack(1) } } }`, 'broadcast ack(1)')
  })
  it('refuses a broadcast forwarding a received field', () => {
    breaksOnly(3, `  on ack(v) from q { broadcast ack(v) }\n  step { broadcast ping }`, 'broadcast ack(v)')
  })
})

describe('rule 4: a send to q depends only on own state and on q', () => {
  it('refuses a send to another peer inside a handler', () => {
    const m = breaksOnly(4, `  on ping from q { for r { send ack(0) to r } }\n  step { broadcast ping }`, 'send ack(0) to r')
    expect(m).toContain('`send ack to r`')
  })
  it('refuses a send to q under a condition on another peer', () => {
    breaksOnly(4, `  step { broadcast ping\n    for q { for r { if seen[r] { send ack(1) to q } } } }`, 'send ack(1) to q')
  })
  it('refuses a field from q forwarded to another peer', () => {
    breaksOnly(4, `  on ack(v) from q { for r { send ack(v) to r } }\n  step { broadcast ping }`, 'send ack(v) to r')
  })
  it('refuses a send to q whose field reads another peer\'s entry', () => {
    breaksOnly(4, `  step { broadcast ping\n    for q { for r { send ack(hits[r]) to q } } }`, 'send ack(hits[r]) to q')
  })
})

describe('rule 5: no aggregate feeds a guarded construct', () => {
  it('refuses an aggregate in a broadcast condition', () => {
    breaksOnly(5, `  step { broadcast ping\n    if some q: seen[q] { broadcast ack(1) } }`, 'some q')
  })
  it('refuses an aggregate written into an entry', () => {
    breaksOnly(5, `  step { broadcast ping\n    for q { seen[q] := (count r: seen[r]) >= 2 } }`, 'count r')
  })
  it('refuses an aggregate as a broadcast field', () => {
    breaksOnly(5, `  step { broadcast ping\n    broadcast ack(count q: seen[q]) }`, 'count q')
  })
  it('refuses an aggregate in the condition of a send', () => {
    breaksOnly(5, `  step { broadcast ping\n    for q { if every r: seen[r] { send ack(2) to q } } }`, 'every r')
  })
  it('reports both the aggregate and the scalar it feeds when a scalar carries it', () => {
    const c = notebook(depot(`  step { broadcast ping\n    heard := some q: seen[q]\n    if heard { broadcast ack(1) } }`), [SEEN])
    const { reasons } = classCheck(c.protocol, c.properties[0])
    expect(reasons.map((r) => [r.rule, r.line, r.column])).toEqual([
      [5, position(c.text, 'some q').line, position(c.text, 'some q').column],
      [2, position(c.text, 'heard {').line, position(c.text, 'heard {').column],
    ])
  })
})

describe('rule 6: the property form', () => {
  const plain = `  on ack(v) from q { hits[q] := v }\n  step { broadcast ping\n    broadcast ack(level) }`
  it('refuses `next`', () => {
    const m = breaksOnly(6, plain, 'next', { property: 'property step1 = forall p, q: always (p.seen[q] implies next p.seen[q])' })
    expect(m).toContain('next-free')
  })
  it('refuses a process named by number', () => {
    breaksOnly(6, plain, '#1', { property: 'property numbered = forall p: always (alive(p) or alive(#1))' })
  })
  it('refuses a property without `forall`, at its name', () => {
    breaksOnly(6, plain, 'fixedpair', { property: 'property fixedpair = always not #1.seen[#2]' })
  })
  it('refuses an atom comparing p\'s scalar with q\'s scalar', () => {
    const m = breaksOnly(6, plain, 'p.level = q.level', { property: 'property same = forall p, q: always (p.level = q.level)' })
    expect(m).toContain("p's scalars and of q's scalars")
  })
  it('refuses an atom mixing p\'s scalar with p\'s entry for q', () => {
    breaksOnly(6, plain, 'p.seen[q] = (p.level > 0)', { property: 'property tied = forall p, q: always (p.seen[q] = (p.level > 0))' })
  })
  it('refuses a one-process property that speaks of a second process', () => {
    // The parser rejects `q` under `forall p`, so the model is built by dropping q from a two-process one.
    const c = notebook(depot(plain), ['property lone = forall p, q: always (p.hits[q] = 0)'])
    const one = { ...c.properties[0], vars: ['p'] }
    const { reasons } = classCheck(c.protocol, one)
    const where = position(c.text, 'p.hits[q] = 0')
    expect(reasons.map((r) => ({ rule: r.rule, line: r.line, column: r.column }))).toEqual([{ rule: 6, ...where }])
    expect(reasons[0].message).toContain('may mention only p\'s scalars')
  })
  it('accepts atoms that each speak of one module', () => {
    const c = notebook(depot(plain), ['property views = forall p, q: always (p.hits[q] = 0 or pending(ping, q -> p) or q.seen[p] or p.level = 1 or crashed(q))'])
    expect(classCheck(c.protocol, c.properties[0]).reasons).toEqual([])
  })
})

describe('in-class protocols that look suspicious are granted', () => {
  const granted = (body: string, property = SEEN, extra = '') => {
    const c = notebook(depot(body, extra), [property])
    const info = decideCutoff(c.protocol, c.properties[0])
    expect(info.reasons).toEqual([])
    expect(info.applies).toBe(true)
  }
  it('grants a reply to the handled peer', () => {
    granted(`  on ping from q { seen[q] := true\n    send ack(1) to q }\n  step { broadcast ping }`)
  })
  it('grants an own counter feeding a broadcast', () => {
    granted(`  step { level := (level + 1) % 3\n    broadcast ack(level) }`)
  })
  it('grants an entry updated from a field of a message from its peer', () => {
    granted(`  on ack(v) from q { hits[q] := v }\n  step { broadcast ack(1) }`)
  })
  it('grants a nondeterministic own choice sent to everyone', () => {
    granted(`  step { level := one of {0, 2}\n    broadcast ack(level) }`)
  })
  it('grants a mixed scalar that feeds nothing guarded', () => {
    granted(`  on ping from q { heard := true\n    seen[q] := true }\n  step { broadcast ping }`)
  })
  it('grants a send to q guarded by q\'s own entry', () => {
    granted(`  step { for q { if not seen[q] { send ping to q } } }\n  on ping from q { seen[q] := true }`)
  })
  it('grants the orchard pumps of the language guide with all three properties', () => {
    const c = notebook(PUMPS, [
      'property detects = forall p, q: correct(p) and faulty(q) implies eventually always p.suspect[q]',
      'property settles = forall p, q: correct(p) and correct(q) implies eventually always not p.suspect[q]',
      'property calm    = forall p, q: always (correct(q) implies not p.suspect[q])',
    ])
    for (const p of c.properties) expect(decideCutoff(c.protocol, p).applies).toBe(true)
  })
})
