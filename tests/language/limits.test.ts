// The limits of limits.ts, refused by the checker at the construct, with its line and column and
// the limit in the message (issue 10, items 1, 2, 11, 18). Each case failed before the limits
// existed: the notebook was accepted and then gave a wrong verdict, looped or ran out of memory.
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { MAX_PROCESSES as CHECK_MAX, MAX_SWEEP_ROWS } from '../../kernels/language/limits'
import { MAX_PROCESSES as LAYOUT_MAX } from '../../kernels/model/layout'

/** A notebook: protocol `depot` with `items` (from line 6), a property and a check line (after both). */
const nb = (items: string, property: string, check: string) =>
  '# limits\n\n```protocol\nprotocol depot {\n  timing synchronous(delay: 1, idle: 1)\n' + items +
  '\n}\n```\n\n```property\n' + property + '\n```\n\n```check\n' + check + '\n```\n'

function errors(text: string): [number, number, string][] {
  return analyzeNotebook(text).diagnostics.filter((d) => d.severity === 'error').map((d) => [d.line, d.column, d.message])
}

const zero = 'property zero = forall p: always p.b = 0'

describe('ranges and values stay 32-bit (item 1)', () => {
  test('a range of 2^32 values is refused at its bound, not packed into zero bits', () => {
    expect(errors(nb('  state b: 0..4294967296 = 0\n  step { b := 7 }', zero, 'check depot: zero at N = 1'))).toEqual([
      [6, 15, 'the upper bound of `b` (4294967296) is outside the integers a model may hold (-2147483648..2147483647); use a smaller value'],
    ])
  })

  test('a range with negative bounds wider than 2^31 values is refused at the variable', () => {
    expect(errors(nb('  state b: -2147483648..2147483647 = 0\n  step { b := 7 }', zero, 'check depot: zero at N = 1'))).toEqual([
      [6, 9, 'the range -2147483648..2147483647 of `b` holds 4294967296 values, more than the 2147483648 (2^31) a range may hold; narrow it'],
    ])
  })

  test('per-peer entries and message fields are held to the same limits', () => {
    expect(errors(nb('  message tally(x: 0..3000000000)\n  state seen[peer]: 0..4294967296 = 0\n  step { broadcast tally(0) }',
      'property zero = forall p, q: always p.seen[q] = 0', 'check depot: zero at N = 2'))).toEqual([
      [6, 23, 'the upper bound of field `x` of `tally` (3000000000) is outside the integers a model may hold (-2147483648..2147483647); use a smaller value'],
      [7, 24, 'the upper bound of `seen` (4294967296) is outside the integers a model may hold (-2147483648..2147483647); use a smaller value'],
    ])
  })

  test('a sweep that widens a range past the limit is refused at the sweep, naming the setting and the range', () => {
    expect(errors(nb('  const cap = 2\n  state b: -cap..cap = 0\n  step { b := 1 }', zero,
      'check depot: zero at N = 1 with cap in 1073741823..1073741824'))).toEqual([
      [17, 28, 'with cap = 1073741824, the range -1073741824..1073741824 of `b` holds 2147483649 values, more than the 2147483648 (2^31) a range may hold; narrow it (line 7, column 9); narrow the sweep'],
    ])
  })
})

describe('arithmetic is exact or refused (item 2)', () => {
  test('a constant beyond 32 bits is refused at the constant', () => {
    expect(errors(nb('  const k = 9007199254740991\n  state b: bool = false\n  step { b := k + 2 = k + 1 }', 'property never = forall p: always not p.b', 'check depot: never at N = 1'))).toEqual([
      [6, 9, 'constant `k` (9007199254740991) is outside the integers a model may hold (-2147483648..2147483647); use a smaller value'],
    ])
  })

  test('an expression whose intermediate value can pass 2^53 is refused at its operator', () => {
    expect(errors(nb('  state b: 0..2147483647 = 0\n  step { b := min(b * b * b, 5) }', zero, 'check depot: zero at N = 1'))).toEqual([
      [7, 19, 'this `*` can reach 4611686014132420608, beyond the exact integers (at most 2^53 - 1 = 9007199254740991 in magnitude); narrow the types or constants it combines'],
    ])
  })

  test('the same analysis covers property terms', () => {
    expect(errors(nb('  state b: 0..2147483647 = 0\n  step { b := 1 }', 'property cube = forall p: always p.b * p.b * p.b >= 0', 'check depot: cube at N = 1'))).toEqual([
      [12, 34, 'this `*` can reach 4611686014132420608, beyond the exact integers (at most 2^53 - 1 = 9007199254740991 in magnitude); narrow the types or constants it combines'],
    ])
  })

  test('products that stay within 2^53 are accepted', () => {
    expect(errors(nb('  state b: 0..200000 = 0\n  step { b := min(b * b * 3, 200000) }', zero, 'check depot: zero at N = 1'))).toEqual([])
  })
})

describe('sweeps and `any` are validated before running (item 11)', () => {
  test('a sweep bound at 2^53 is refused at the value, not looped over', () => {
    expect(errors(nb('  const k = 1\n  state b: 0..k = 0\n  step { b := 0 }', zero, 'check depot: zero at N = 1 with k in 9007199254740990..9007199254740993'))).toEqual([
      [17, 38, 'the value 9007199254740990 for `k` is outside the integers a model may hold (-2147483648..2147483647); use a smaller value'],
    ])
  })

  test(`a sweep of more than ${MAX_SWEEP_ROWS} settings is refused at the with clause`, () => {
    expect(errors(nb('  const x = 1\n  const y = 1\n  const z = 1\n  state b: 0..3000 = 0\n  step { b := x + y + z }', zero,
      'check depot: zero at N = 1 with x in 1..999, y in 1..999, z in 1..999'))).toEqual([
      [19, 28, 'this sweep gives 997002999 constant settings, more than the 10000 one check may run; narrow its ranges or split the check'],
    ])
  })

  test('`any` over a huge type is refused at the variable', () => {
    expect(errors(nb('  state b: 0..2147483647 = any\n  step { b := 7 }', zero, 'check depot: zero at N = 1'))).toEqual([
      [6, 9, '`b` starts as `any` of 2147483648 values, more than the 4096 initial values a variable may branch over; give it an initial value or a narrower type'],
    ])
  })
})

describe('instance sizes (item 18)', () => {
  test('the checker and the instance compiler share one limit', () => {
    expect(CHECK_MAX).toBe(LAYOUT_MAX)
    expect(CHECK_MAX).toBe(12)
  })

  test('sizes up to the limit pass, one more is refused at the size clause', () => {
    const body = '  state b: 0..3 = 0\n  step { b := 0 }'
    expect(errors(nb(body, zero, 'check depot: zero at N = 7..12'))).toEqual([])
    expect(errors(nb(body, zero, 'check depot: zero at N = 7..13'))).toEqual([
      [16, 19, '13 processes is beyond what an exhaustive check can explore here (at most 12); check fewer processes'],
    ])
  })

  test('temporal properties stop at 5 processes, where their fairness conditions fit the product marks', () => {
    expect(errors(nb('  state b: 0..3 = 0\n  step { b := 0 }', 'property calm = forall p: eventually p.b = 0', 'check depot: calm at N = 6'))).toEqual([
      [16, 19, 'property `calm` is temporal (not `always` of a state condition), and temporal properties are checked on at most 5 processes (their fairness conditions must fit the temporal product\'s 31 marks); write `at N = 5` or fewer'],
    ])
  })
})
