// Verdicts at the limits (issue 10, items 1, 2, 12, 18, 21, value order): the widest range keeps its
// values, one state with billions of successors honours the state limit and Stop, a dozen
// processes run, and a division by zero in a property is a model error at its operator. Oracle:
// the reference interpreter (tests/reference/), which computes with BigInt and was written from
// semantics.md, and plain arithmetic on the notebooks' few states.
import { describe, expect, test } from 'vitest'
import { explore, reachableCanonical } from '../../kernels/explore/reach'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { ModelSetupError } from '../../kernels/model/errors'
import { compileInstance } from '../../kernels/model/instance'
import { planRows, runRow } from '../../kernels/run'
import { instanceOf, protocolOf } from '../model/fixtures'
import { referenceReachable } from '../reference/interpreter'
import { referenceTemporal } from '../reference/temporal'

/** Notebook text with one protocol `ferry`, the property lines and the check lines. */
const nb = (items: string, properties: string, checks: string) =>
  '# ferry\n\n```protocol\nprotocol ferry {\n  timing synchronous(delay: 1, idle: 1)\n' + items +
  '\n}\n```\n\n```property\n' + properties + '\n```\n\n```check\n' + checks + '\n```\n'

function rows(text: string) {
  const model = analyzeNotebook(text)
  expect(model.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
  return { model, rows: planRows(model).map((p) => runRow(model, p)) }
}

describe('the widest range keeps its values (item 1)', () => {
  test.each([
    ['0..2147483647', '0', '7'],
    ['-2147483648..-1', '-1', '-2147483648'],
  ])('b: %s starting at %s, set to %s, is violated and both interpreters reach the two values', (range, init, next) => {
    const { model, rows: [row] } = rows(nb(`  state b: ${range} = ${init}\n  step { b := ${next} }`, `property still = forall p: always p.b = ${init}`, 'check ferry: still at N = 1'))
    expect(row.verdict).toBe('violated')
    const p = model.protocols[0]
    const kernel = reachableCanonical(compileInstance(p, 1, []))
    const reference = referenceReachable(p, 1, [])
    expect([...kernel.states].sort()).toEqual([...reference.states].sort())
    expect([...reference.states].map((s) => JSON.parse(s).procs[0].vars.b).sort()).toEqual([Number(init), Number(next)].sort())
  })

  test('a swept constant that widens a range past the limit is a located setup error when rows are built directly', () => {
    const p = protocolOf('protocol ferry {\n  const cap = 2\n  timing synchronous(delay: 1, idle: 1)\n  state b: 0..cap = 0\n  step { b := 1 }\n}')
    expect(() => compileInstance(p, 1, [2 ** 31])).toThrow(ModelSetupError)
    expect(() => compileInstance(p, 1, [2 ** 31])).toThrow(/constant `cap` \(2147483648\) is outside .* \(line 5, column 9\)/)
  })
})

describe('arithmetic is exact (item 2)', () => {
  test('near 2^53 the kernel and the BigInt reference agree, and k + 2 = k + 1 is false', () => {
    // k * 2^22 + 2 with k = 2^31 - 1 stays below 2^53; the comparisons must see the exact values.
    const body = 'protocol ferry {\n  const k = 2147483647\n  timing synchronous(delay: 1, idle: 1)\n  state b: bool = false\n  state c: bool = false\n' +
      '  step { b := k * 4194304 + 2 = k * 4194304 + 1\n c := k * 4194304 + 1 = 9007199250546689 }\n}'
    const p = protocolOf(body)
    const kernel = reachableCanonical(compileInstance(p, 1, [2147483647]))
    const reference = referenceReachable(p, 1, [2147483647])
    expect([...kernel.states].sort()).toEqual([...reference.states].sort())
    // 2147483647 * 4194304 + 1 = 9007199250546689 exactly (BigInt), so c becomes true and b stays false.
    expect(2147483647n * 4194304n + 1n).toBe(9007199250546689n)
    const after = [...reference.states].map((s) => JSON.parse(s).procs[0].vars)
    expect(after).toContainEqual({ b: 0, c: 1 })
    expect(after.some((v) => v.b === 1)).toBe(false)
  })
})

describe('one state with a huge expansion (item 12)', () => {
  test('`one of 0..2147483647` under a 10-state limit stops at the limit, inconclusive', () => {
    const inst = instanceOf('protocol ferry {\n  timing synchronous(delay: 1, idle: 1)\n  state b: 0..2147483647 = 0\n  step { b := one of 0..2147483647 }\n}', 1)
    const r = explore(inst, { limit: 10 })
    expect(r.limitHit).toBe(true)
    expect(r.complete).toBe(false)
    expect(r.states).toBe(10)
  })

  test('twenty choices of 4 values in one step stop at the limit', () => {
    const vars = Array.from({ length: 20 }, (_, i) => `  state v${i}: 0..3 = 0`).join('\n')
    const step = Array.from({ length: 20 }, (_, i) => `v${i} := one of 0..3`).join('  ')
    const inst = instanceOf(`protocol ferry {\n  timing synchronous(delay: 1, idle: 1)\n${vars}\n  step { ${step} }\n}`, 1)
    const r = explore(inst, { limit: 10 })
    expect(r.limitHit).toBe(true)
    expect(r.states).toBe(10)
  })

  test('Stop is honoured inside the expansion of the first state', () => {
    const vars = Array.from({ length: 20 }, (_, i) => `  state v${i}: 0..3 = 0`).join('\n')
    const step = Array.from({ length: 20 }, (_, i) => `v${i} := one of 0..3`).join('  ')
    const inst = instanceOf(`protocol ferry {\n  timing synchronous(delay: 1, idle: 1)\n${vars}\n  step { ${step} }\n}`, 1)
    let polls = 0
    const r = explore(inst, { shouldStop: () => ++polls >= 3 })
    expect(r.stopped).toBe(true)
    expect(r.complete).toBe(false)
    expect(r.states).toBe(1)
  })

  test('a violation reached through a wide choice gets its trace without listing every choice', () => {
    const { rows: [row] } = rows(nb('  state b: 0..2147483647 = 0\n  step { b := one of 0..2147483647 }', 'property small = forall p: always p.b < 5', 'check ferry: small at N = 1 within 1000 states'))
    expect(row.verdict).toBe('violated')
    expect(row.counterexample?.ticks.map((t) => t.changes.map((c) => `${c.variable} ${c.from}->${c.to}`))).toEqual([['b 0->5']])
  })

  test('a model error in a wide choice is found at once, with its trace', () => {
    const inst = instanceOf('protocol ferry {\n  timing synchronous(delay: 1, idle: 1)\n  state b: 0..10 = 0\n  step { b := one of 0..2147483647 }\n}', 1)
    const r = explore(inst, { limit: 1000 })
    expect(r.outcome).toBe('model-error')
    expect(r.error?.message).toMatch(/sets b to 11, outside its type 0\.\.10/)
  })

  test('with room to spare, cut outcome lists are completed: the counts equal the reference', () => {
    // Outcomes 0..5 of `one of` collapse under min(., 2): cut lists alone would miss nothing here,
    // and the reachable set must be exactly the reference's.
    const p = protocolOf('protocol ferry {\n  timing synchronous(delay: 1, idle: 1)\n  state b: 0..2 = 0\n  state c: 0..5 = 0\n  step { c := one of 0..5  b := min(c, 2) }\n}')
    const reference = referenceReachable(p, 1, [])
    const kernel = explore(compileInstance(p, 1, []), { limit: 7 })
    expect(kernel.limitHit).toBe(false)
    expect(kernel.states).toBe(reference.states.size)
    expect(kernel.transitions).toBe(reference.transitions)
  })

  test('too many initial states is a setup error naming the `any` variable and its line', () => {
    const p = protocolOf('protocol ferry {\n  timing synchronous(delay: 1, idle: 1)\n  state seen[peer]: 0..4000 = any\n  step { skip }\n}')
    expect(() => compileInstance(p, 3, []).initialStates()).toThrow(/^the `any` initial values give about 4.10e\+21 initial states for 3 processes, more than the 4194304 an exploration may start from \(`seen`, line 6, column 9\)/)
  })
})

describe('a dozen processes (item 18)', () => {
  test('sizes 7 to 12 run and hold', () => {
    const { rows: out } = rows(nb('  message hail\n  state heard[peer]: bool = false\n  on hail from q { heard[q] := true }\n  step { broadcast hail }',
      'property quiet = forall p, q: always (p.heard[q] implies alive(q))', 'check ferry: quiet at N = 7..12'))
    expect(out.map((r) => [r.processes, r.verdict])).toEqual([[7, 'holds'], [8, 'holds'], [9, 'holds'], [10, 'holds'], [11, 'holds'], [12, 'holds']])
    // Lock-step, no faults: the start, then every hail in flight, then every entry true. Three states at every size.
    expect(out.map((r) => r.states)).toEqual([3, 3, 3, 3, 3, 3])
  })
})

describe('temporal rows beyond 5 processes (item 1, temporal rows)', () => {
  test('a row built directly for 6 processes is a setup error naming the property, not a run on aliased marks', () => {
    const model = analyzeNotebook(nb('  state b: 0..1 = 0\n  step { b := 1 }', 'property up = forall p: eventually p.b = 1', 'check ferry: up at N = 5'))
    const [plan] = planRows(model)
    const row = runRow(model, { ...plan, processes: 6 })
    expect(row.verdict).toBe('error')
    expect(row.note).toBe('temporal properties are checked on at most 5 processes (their fairness conditions must fit the temporal product\'s 31 marks), not 6 (line 12, column 10)')
    expect(runRow(model, plan).verdict).toBe('holds')
  })
})

describe('division by zero in a property (item 21)', () => {
  const body = '  state b: 0..2 = 0\n  step { b := min(b + 1, 2) }'
  test('an invariant dividing by a value that reaches zero is a model error at the operator, as in the reference', () => {
    const text = nb(body, 'property ratio = forall p: always (p.b = 0 or 6 / (p.b - 1) > 0)', 'check ferry: ratio at N = 1')
    const { model, rows: [row] } = rows(text)
    expect(row.verdict).toBe('violated')
    expect(row.counterexample?.kind).toBe('model-error')
    expect(row.counterexample?.message).toBe('model error at line 12, column 47: division by zero in a property, on the state reached')
    // The state b = 1 is reached after one tick: the trace ends there, with no failing step.
    expect(row.counterexample?.ticks.length).toBe(1)
    const ref = referenceTemporal(model.protocols[0], 1, [], model.checks[0].properties[0], [1])
    expect(ref.verdict).toBe('violated')
    expect(ref.modelError).toMatch(/division by zero in a property at line 12, column 47/)
  })

  test('a temporal property dividing by zero is a model error too, in both', () => {
    const text = nb(body, 'property settles = forall p: eventually always 6 % (p.b - 1) = 0', 'check ferry: settles at N = 1')
    const { model, rows: [row] } = rows(text)
    expect(row.verdict).toBe('violated')
    expect(row.counterexample?.kind).toBe('model-error')
    expect(row.counterexample?.message).toMatch(/^model error at line 12, column 48: modulo by zero in a property/)
    const ref = referenceTemporal(model.protocols[0], 1, [], model.checks[0].properties[0], [1])
    expect(ref.verdict).toBe('violated')
    expect(ref.modelError).not.toBeNull()
  })
})

describe('order of values (semantics.md): declaration order, not alphabetical', () => {
  // Each beacon sends `flag(zulu)` and `flag(alpha)` in its first step; the other handles both in
  // its next step, in the order of values: zulu (declared first) before alpha, so the handler that
  // runs last leaves `alpha`. Alphabetical order would leave `zulu`. Bools likewise: false, then true.
  const items = '  message flag(c: {zulu, alpha, unset}, up: bool)\n  state last: {zulu, alpha, unset} = unset\n  state rose: bool = false\n  state sent: bool = false\n' +
    '  on flag(c, up) from q { last := c  rose := up }\n  step { if not sent { broadcast flag(zulu, true)  broadcast flag(alpha, false)  sent := true } }'
  test('the kernel handles zulu before alpha, and (alpha, false) last', () => {
    const { rows: [a, b] } = rows(nb(items, 'property order = forall p: always p.last != zulu\nproperty bools = forall p: always (p.last = alpha implies not p.rose)', 'check ferry: order, bools at N = 2'))
    expect(a.verdict).toBe('holds')
    expect(b.verdict).toBe('holds')
  })

  test('the reference interpreter reaches the same states', () => {
    const model = analyzeNotebook(nb(items, 'property order = forall p: always p.last != zulu', 'check ferry: order at N = 2'))
    const p = model.protocols[0]
    const kernel = reachableCanonical(compileInstance(p, 2, []))
    const reference = referenceReachable(p, 2, [])
    expect([...kernel.states].sort()).toEqual([...reference.states].sort())
    const lasts = new Set([...reference.states].map((s) => JSON.parse(s).procs[0].vars.last))
    expect(lasts).toEqual(new Set([2, 1])) // unset, then alpha (label indices); never zulu (0)
  })
})
