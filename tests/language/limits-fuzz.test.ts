// Generated hostile input at the limits (issue 10): wide ranges, big constants and expressions near
// 2^53, big sweeps. Whatever the input, the checker never throws, and each notebook either gets an
// error with a line and column inside the notebook, or runs quickly to the verdict that plain
// arithmetic predicts. Oracles: BigInt evaluation of the generated expressions (exact by
// construction) and the arithmetic of one-variable protocols.
import fc from 'fast-check'
import { describe, expect, test } from 'vitest'
import { reachableCanonical } from '../../kernels/explore/reach'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { MAX_ANY_VALUES, MAX_RANGE_VALUES, MAX_SWEEP_ROWS, MAX_SWEEP_VALUES } from '../../kernels/language/limits'
import type { NotebookModel } from '../../kernels/language/model'
import { compileInstance } from '../../kernels/model/instance'
import { planRows, runRow } from '../../kernels/run'

const I32_MIN = -(2n ** 31n)
const I32_MAX = 2n ** 31n - 1n
const SAFE = 2n ** 53n - 1n

/** Integers that sit at the edges: small ones, and ones near 2^31, 2^32 and 2^53 on both sides. */
const edgy: fc.Arbitrary<bigint> = fc.oneof(
  fc.bigInt({ min: -20n, max: 20n }),
  ...[2n ** 31n, 2n ** 32n, 2n ** 53n].flatMap((e) => [
    fc.bigInt({ min: e - 3n, max: e + 3n }),
    fc.bigInt({ min: -e - 3n, max: -e + 3n }),
  ]),
  fc.bigInt({ min: -(2n ** 60n), max: 2n ** 60n }),
)

/** Mostly 32-bit values, many of them at the 32-bit edges. */
const i32ish: fc.Arbitrary<bigint> = fc.oneof(
  fc.bigInt({ min: -20n, max: 20n }),
  fc.bigInt({ min: 2n ** 31n - 4n, max: 2n ** 31n + 1n }),
  fc.bigInt({ min: -(2n ** 31n) - 1n, max: -(2n ** 31n) + 4n }),
  fc.bigInt({ min: -(2n ** 31n), max: 2n ** 31n - 1n }),
)

/** A count of values: tiny, at the 2^31 range limit, at 2^32, or anything. */
const width: fc.Arbitrary<bigint> = fc.oneof(
  fc.bigInt({ min: -1n, max: 6n }),
  fc.bigInt({ min: 2n ** 31n - 2n, max: 2n ** 31n + 2n }),
  fc.bigInt({ min: 2n ** 32n - 2n, max: 2n ** 32n + 2n }),
  fc.bigInt({ min: 4090n, max: 4100n }),
  edgy,
)

const lit = (v: bigint) => (v < 0n ? `-${-v}` : `${v}`)

/** The errors of a notebook, each checked to point inside it. */
function located(model: NotebookModel, text: string) {
  const lines = text.split('\n').length
  const errors = model.diagnostics.filter((d) => d.severity === 'error')
  for (const d of errors) {
    expect(d.line).toBeGreaterThanOrEqual(1)
    expect(d.line).toBeLessThanOrEqual(lines)
    expect(d.column).toBeGreaterThanOrEqual(1)
  }
  return errors
}

const notebook = (items: string, property: string, check: string) =>
  '# edges\n\n```protocol\nprotocol edges {\n  timing synchronous(delay: 1, idle: 1)\n' + items +
  '\n}\n```\n\n```property\n' + property + '\n```\n\n```check\n' + check + '\n```\n'

describe('wide ranges', () => {
  test('a range, an initial value and one assignment: a located error or the verdict arithmetic predicts', () => {
    const seen = { refused: 0, held: 0, violated: 0 }
    const cases = fc.tuple(i32ish, width, fc.option(fc.oneof(fc.bigInt({ min: -1n, max: 3n }), edgy), { nil: undefined }), fc.oneof(fc.bigInt({ min: -1n, max: 3n }), edgy), fc.integer({ min: 0, max: 2 }))
      .map(([lo, w, initOffset, vOffset, how]) => {
        const hi = lo + w - 1n
        const init = initOffset === undefined ? undefined : initOffset >= -1n && initOffset <= 3n ? lo + initOffset : initOffset
        // v is the start itself, near the top of the range, near the start, or anything.
        const near = vOffset >= -1n && vOffset <= 3n
        const v = how === 0 ? (init ?? lo) : !near ? vOffset : how === 1 ? hi - vOffset : (init ?? lo) + vOffset
        return [lo, hi, init, v] as const
      })
    fc.assert(fc.property(cases, ([lo, hi, init, v]) => {
      const text = notebook(`  state b: ${lit(lo)}..${lit(hi)} = ${init === undefined ? 'any' : lit(init)}\n  step { b := ${lit(v)} }`,
        `property settled = forall p: always p.b = ${lit(v)}`, 'check edges: settled at N = 1 within 5000 states')
      const model = analyzeNotebook(text)
      const errors = located(model, text)
      const inI32 = (x: bigint) => x >= I32_MIN && x <= I32_MAX
      const width = hi - lo + 1n
      const acceptable = inI32(lo) && inI32(hi) && lo <= hi && width <= BigInt(MAX_RANGE_VALUES) &&
        (init === undefined ? width <= BigInt(MAX_ANY_VALUES) : init >= lo && init <= hi) &&
        v >= -SAFE && v <= SAFE
      expect(errors.length === 0, `${text}\n${JSON.stringify(errors)}`).toBe(acceptable)
      if (!acceptable) { seen.refused++; return }
      const [row] = planRows(model).map((p) => runRow(model, p))
      // Holds exactly when every start is v and v fits the type (otherwise a model error).
      const holds = v >= lo && v <= hi && (init === undefined ? lo === hi && lo === v : init === v)
      expect(row.verdict, text).toBe(holds ? 'holds' : 'violated')
      seen[holds ? 'held' : 'violated']++
    }), { numRuns: 600 })
    console.log(`wide ranges: ${JSON.stringify(seen)}`)
    expect(seen.refused).toBeGreaterThan(20)
    expect(seen.violated).toBeGreaterThan(20)
    expect(seen.held).toBeGreaterThan(5)
  })
})

/** A generated integer expression over constants j and k and literals. */
type Gen = { t: 'k' | 'j' } | { t: 'lit'; v: bigint } | { t: 'neg'; a: Gen } | { t: '+' | '-' | '*' | '/' | '%' | 'min' | 'max'; a: Gen; b: Gen }

const gen: fc.Arbitrary<Gen> = fc.letrec<{ e: Gen }>((tie) => ({
  e: fc.oneof(
    { depthSize: 'small', withCrossShrink: true },
    fc.constantFrom<Gen>({ t: 'k' }, { t: 'j' }),
    fc.oneof(fc.bigInt({ min: 0n, max: 9n }), edgy.filter((v) => v >= 0n && v <= SAFE)).map((v): Gen => ({ t: 'lit', v })),
    tie('e').map((a): Gen => ({ t: 'neg', a })),
    fc.tuple(fc.constantFrom('+', '-', '*', '/', '%', 'min', 'max' as const), tie('e'), tie('e')).map(([t, a, b]) => ({ t, a, b }) as Gen),
  ),
})).e

function show(e: Gen): string {
  switch (e.t) {
    case 'k': case 'j': return e.t
    case 'lit': return lit(e.v)
    case 'neg': return `-(${show(e.a)})`
    case 'min': case 'max': return `${e.t}(${show(e.a)}, ${show(e.b)})`
    default: return `(${show(e.a)} ${e.t} ${show(e.b)})`
  }
}

/** Exact value, with whether any intermediate left the safe integers; null on a zero divisor. */
function exact(e: Gen, k: bigint, j: bigint, seen: { unsafe: boolean }): bigint | null {
  const check = (x: bigint) => { if (x > SAFE || x < -SAFE) seen.unsafe = true; return x }
  switch (e.t) {
    case 'k': return k
    case 'j': return j
    case 'lit': return e.v
    case 'neg': { const a = exact(e.a, k, j, seen); return a === null ? null : -a }
    default: {
      const a = exact(e.a, k, j, seen)
      const b = exact(e.b, k, j, seen)
      if (a === null || b === null) return null
      switch (e.t) {
        case '+': return check(a + b)
        case '-': return check(a - b)
        case '*': return check(a * b)
        case 'min': return a < b ? a : b
        case 'max': return a > b ? a : b
        default: return b === 0n ? null : check(e.t === '/' ? a / b : a % b)
      }
    }
  }
}

describe('big constants and arithmetic near 2^53', () => {
  test('constant folding and a step agree with BigInt, and nothing unsafe gets through', () => {
    const count = { refused: 0, accepted: 0, unsafeRefused: 0 }
    fc.assert(fc.property(gen, i32ish, i32ish, (e, k, j) => {
      const E = show(e)
      const text = notebook(`  const k = ${lit(k)}\n  const j = ${lit(j)}\n  state c: -1073741824..1073741823 = ${E}\n  state b: -1073741824..1073741823 = 0\n  step { b := ${E} }`,
        'property same = forall p: always p.b = 0 or p.b = p.c', 'check edges: same at N = 1')
      const model = analyzeNotebook(text)
      const errors = located(model, text)
      const seen = { unsafe: false }
      const inI32 = (x: bigint) => x >= I32_MIN && x <= I32_MAX
      const value = inI32(k) && inI32(j) ? exact(e, k, j, seen) : null
      if (errors.length > 0) {
        count.refused++
        if (seen.unsafe) count.unsafeRefused++
        return
      }
      count.accepted++
      // Accepted: the constants are 32-bit, no intermediate leaves the safe integers (the interval
      // analysis over-approximates, so it may refuse more, never less), and both evaluations are exact.
      expect(inI32(k) && inI32(j), text).toBe(true)
      expect(seen.unsafe, text).toBe(false)
      expect(value, text).not.toBeNull()
      const r = reachableCanonical(compileInstance(model.protocols[0], 1, [Number(k), Number(j)]))
      const vals = [...r.states].map((s) => JSON.parse(s).procs[0].vars)
      expect(vals.every((x) => x.c === Number(value)), text).toBe(true)
      if (value! >= -1073741824n && value! <= 1073741823n) expect(vals).toContainEqual({ b: Number(value), c: Number(value) })
      else expect(r.modelError?.message ?? '', text).toMatch(/outside its type/)
    }), { numRuns: 600 })
    console.log(`expressions: ${JSON.stringify(count)}`)
    expect(count.accepted).toBeGreaterThan(20)
    expect(count.unsafeRefused).toBeGreaterThan(3)
  })
})

describe('big sweeps', () => {
  test('a located error above the limits, otherwise one quick row per setting', () => {
    const bound = fc.oneof({ weight: 4, arbitrary: fc.bigInt({ min: -5n, max: 12n }) }, { weight: 1, arbitrary: edgy })
    const count = { refused: 0, accepted: 0 }
    fc.assert(fc.property(fc.array(fc.tuple(bound, bound), { minLength: 1, maxLength: 3 }), (ranges) => {
      const names = ['x', 'y', 'z'].slice(0, ranges.length)
      const items = names.map((n) => `  const ${n} = 0`).join('\n') + '\n  state b: 0..3 = 0\n  step { b := min(max(' + names.join(' + ') + ', 0), 3) }'
      const sweep = ranges.map(([a, b], i) => `${names[i]} in ${lit(a)}..${lit(b)}`).join(', ')
      const text = notebook(items, 'property small = forall p: always p.b <= 3', `check edges: small at N = 1 with ${sweep}`)
      const model = analyzeNotebook(text)
      const errors = located(model, text)
      const inI32 = (x: bigint) => x >= I32_MIN && x <= I32_MAX
      const counts = ranges.map(([a, b]) => b - a + 1n)
      const rows = counts.reduce((p, c) => p * c, 1n)
      const acceptable = ranges.every(([a, b]) => inI32(a) && inI32(b) && a <= b) && counts.every((c) => c <= BigInt(MAX_SWEEP_VALUES)) &&
        rows <= BigInt(MAX_SWEEP_ROWS)
      expect(errors.length === 0, `${text}\n${JSON.stringify(errors)}`).toBe(acceptable)
      if (!acceptable) { count.refused++; return }
      count.accepted++
      const plan = planRows(model)
      expect(BigInt(plan.length)).toBe(rows)
      for (const p of plan.slice(0, 20)) expect(runRow(model, p).verdict).toBe('holds')
    }), { numRuns: 200 })
    console.log(`sweeps: ${JSON.stringify(count)}`)
    expect(count.accepted).toBeGreaterThan(20)
    expect(count.refused).toBeGreaterThan(20)
  })
})
