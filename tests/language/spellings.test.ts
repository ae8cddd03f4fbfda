// The spellings of language.md: `at N = ...`, `within K states`, `by induction` and `timing
// eventually synchronous(...)`; the earlier spellings as errors that give the current one at the
// same place; contextual keywords usable as names; and the reserved words, compared with the
// grammar and with the guide. Oracle for positions: the offending text located by searching the
// notebook (`where`), not the parser's spans. Oracle for the word lists: the grammar's own text.
import { readFileSync } from 'node:fs'
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { contextualWords, reservedWords } from '../../kernels/language/syntax'
import { planRows, runRow } from '../../kernels/run'

const root = new URL('../../', import.meta.url)

/** A protocol with one invariant property, then `check` as the check block. */
const lamps = (check: string, timing = 'synchronous(delay: 1, idle: 1)') => `
\`\`\`protocol
protocol lamps {
  const cap = 2
  timing ${timing}
  message blink
  state seen[peer]: 0..cap = 0
  on blink from q { seen[q] := min(seen[q] + 1, cap) }
  step { broadcast blink }
}
\`\`\`

\`\`\`property
property capped = forall p, q: always p.seen[q] <= cap
property lively = forall p, q: eventually p.seen[q] > 0
\`\`\`

\`\`\`check
${check}
\`\`\`
`

/** The 1-based line and column of the `occurrence`-th `needle` in `text`. */
function where(text: string, needle: string, occurrence = 1): { line: number; column: number } {
  let at = -1
  for (let k = 0; k < occurrence; k++) at = text.indexOf(needle, at + 1)
  if (at < 0) throw new Error(`no ${needle}`)
  const before = text.slice(0, at).split('\n')
  return { line: before.length, column: before[before.length - 1].length + 1 }
}

function diagnostics(text: string) {
  return analyzeNotebook(text).diagnostics.map((d) => ({ severity: d.severity, line: d.line, column: d.column, message: d.message }))
}

function errorAt(text: string, needle: string, message: string) {
  return [{ severity: 'error', ...where(text, needle), message }]
}

describe('earlier spellings are errors that give the current spelling at the same place', () => {
  const cases: [written: string, needle: string, message: string][] = [
    ['check lamps: capped for 2 processes', 'for 2', 'write `at N = 2` instead of `for 2 processes`'],
    ['check lamps: capped for 1 process', 'for 1', 'write `at N = 1` instead of `for 1 process`'],
    ['check lamps: capped for 2..4 processes', 'for 2', 'write `at N = 2..4` instead of `for 2..4 processes`'],
    ['check lamps: capped limit 5000000 states', 'limit', 'write `within 5000000 states` instead of `limit 5000000 states`'],
  ]
  for (const [written, needle, message] of cases) {
    test(written, () => {
      const text = lamps(written)
      expect(diagnostics(text)).toEqual(errorAt(text, needle, message))
      expect(analyzeNotebook(text).checks).toEqual([])
    })
  }

  test('both earlier clauses in one line give one error each', () => {
    const text = lamps('check lamps: capped for 2 processes with cap = 1 limit 40 states')
    expect(diagnostics(text)).toEqual([
      ...errorAt(text, 'for 2', 'write `at N = 2` instead of `for 2 processes`'),
      ...errorAt(text, 'limit', 'write `within 40 states` instead of `limit 40 states`'),
    ])
  })

  test('timing stabilizing, with and without parameters', () => {
    const text = lamps('check lamps: capped', 'stabilizing(delay: 1, idle: 2)')
    expect(diagnostics(text)).toEqual(errorAt(text, 'stabilizing',
      'write `timing eventually synchronous(delay: 1, idle: 2)` instead of `timing stabilizing(delay: 1, idle: 2)`'))
    const bare = lamps('check lamps: capped', 'stabilizing')
    expect(diagnostics(bare)).toEqual(errorAt(bare, 'stabilizing',
      'write `timing eventually synchronous(delay: D, idle: I)` instead of `timing stabilizing`'))
  })

  test('no shipped notebook and not the README uses an earlier spelling', () => {
    // The same patterns as the hook that checks submissions.
    const patterns = [/timing stabilizing\(/, /^check .* for [0-9.]+ process/m, /limit [0-9]+ states/]
    const files = ['README.md', ...['guide.md', 'cutoff-applies.md', 'cutoff-refused.md', 'depot-radios.md', 'harbour-cranes.md'].map((f) => `notebooks/${f}`)]
    for (const f of files) {
      const text = readFileSync(new URL(f, root), 'utf8')
      for (const p of patterns) expect(p.test(text), `${f} ${p}`).toBe(false)
    }
  })
})

describe('the current spellings', () => {
  test('at N = K, at N = A..B, with, within K states and by induction read into the check model', () => {
    const model = analyzeNotebook(lamps([
      'check lamps: capped at N = 3',
      'check lamps: capped at N = 2..4 with cap in 1..2 within 5000000 states',
      'check lamps: capped within 1 state',
      'check lamps: capped at N = 2..6 by induction',
    ].join('\n')))
    expect(model.diagnostics).toEqual([])
    expect(model.checks.map((c) => [c.sizes, c.sweep.map((s) => s.values), c.limit, c.method])).toEqual([
      [[3], [], null, 'exploration'],
      [[2, 3, 4], [[1, 2]], 5000000, 'exploration'],
      [null, [], 1, 'exploration'],
      [[2, 3, 4, 5, 6], [], null, 'induction'],
    ])
  })

  test('timing eventually synchronous(...) reads as its own kind, and rows say so in the words as written', () => {
    const text = lamps('check lamps: capped', 'eventually synchronous(delay: 1, idle: 2)')
    const model = analyzeNotebook(text)
    expect(model.diagnostics).toEqual([])
    expect(model.protocols[0].timing.kind).toBe('eventually synchronous')
    const [row] = planRows(model).map((p) => runRow(model, p))
    expect(row.timing).toBe('eventually synchronous')
    expect(row.verdict).toBe('holds')
  })

  test('`eventually` stays the property operator beside its timing use', () => {
    const model = analyzeNotebook(lamps('check lamps: lively', 'eventually synchronous(delay: 1, idle: 1)'))
    expect(model.diagnostics).toEqual([])
    expect(model.checks[0].properties[0].formula.k).toBe('eventually')
  })
})

describe('misuse of the clauses gets a located error', () => {
  const cases: [written: string, needle: string, message: string, occurrence?: number][] = [
    ['check lamps: capped within 0 states', 'within',
      'a check explores at least 1 state, so `within 0 states` cannot run; write a positive bound, as in `within 1000000 states`'],
    ['check lamps: capped within 99999999999999999999 states', 'within',
      'the bound 99999999999999999999 is too large to count states exactly; write at most `within 9007199254740991 states`'],
    ['check lamps: capped at n = 2', 'n =', 'the number of processes is called `N` (an instance is G_N); write `at N = 2`'],
    ['check lamps: capped at N = 0', 'at N', 'a check needs at least 1 process; write `at N = 1` or more'],
    ['check lamps: capped at N = 4..2', 'at N', 'the size range 4..2 is empty; write the smaller size first, as in `at N = 2..4`'],
    ['check lamps: capped at N = 2 at N = 3', 'at N', 'this check has a second `at` clause (the first is at column 21); keep one', 2],
    ['check lamps: capped within 9 states at N = 2', 'at N',
      'the `at` clause goes before the `within` clause; write the clauses in the order `at N = ...`, `with ...`, `within K states`, `by induction`'],
    ['check lamps: capped by induction with cap = 1', 'with',
      'the `with` clause goes before the `by` clause; write the clauses in the order `at N = ...`, `with ...`, `within K states`, `by induction`'],
    ['check lamps: capped by exploration', 'exploration', 'unexpected `exploration` in the `by` clause of the check; write `by induction`'],
    // An incomplete clause is reported where the missing word should be.
    ['check lamps: capped by\n', '\n', 'the `by` clause of the check is incomplete at the end of the block; write `by induction`', 2],
    ['check lamps: capped within states', 'states', 'the `within` clause of the check is incomplete before `states`; write `within K states`'],
    ['check lamps: capped, lively by induction', 'lively',
      'property `lively` is not `always P` with P free of temporal operators, so it cannot be proved by induction; check it in a line without `by induction`'],
  ]
  for (const [written, needle, message, occurrence] of cases) {
    test(written, () => {
      const text = lamps(written)
      // The needle is searched after the check fence, so that `by` or `states` in the protocol do not match.
      const fence = text.indexOf('```check')
      const { line, column } = where(text.slice(fence), needle, occurrence)
      const fenceLine = text.slice(0, fence).split('\n').length - 1
      expect(diagnostics(text)).toEqual([{ severity: 'error', line: fenceLine + line, column, message }])
    })
  }
})

describe('contextual keywords are ordinary names outside check and timing lines', () => {
  const harbourText = `
\`\`\`protocol
protocol at {
  const within = 2
  timing synchronous(delay: 1, idle: 1)
  faults crash

  message at
  message by(states: 0..1)

  state limit[peer]: bool = false
  state induction: 0..within = 0
  state processes: bool = false
  state synchronous: bool = true
  state asynchronous: {with, in} = with

  on at from q { limit[q] := true }
  on by(states) from q { processes := states = 1 }

  step {
    broadcast at
    broadcast by(if synchronous then 1 else 0)
    induction := min(induction + 1, within)
    asynchronous := if induction = within then in else with
  }
}
\`\`\`

\`\`\`property
property within = forall p, q: always (p.limit[q] implies p.induction >= 1)
property by = forall p: always (p.asynchronous = in implies p.induction = 2)
\`\`\`

\`\`\`check
check at: within, by at N = 2 within 100000 states
\`\`\`
`
  test('a protocol named `at` with a message `at`, a state `limit[peer]` and more checks clean', () => {
    expect(diagnostics(harbourText)).toEqual([])
  })

  test('and it runs: both invariants hold (by hand: `limit[q]` is set on the first receipt, a tick after `induction` reaches 1)', () => {
    const model = analyzeNotebook(harbourText)
    const rows = planRows(model).map((p) => runRow(model, p))
    expect(rows.map((r) => [r.property, r.processes, r.verdict])).toEqual([['within', 2, 'holds'], ['by', 2, 'holds']])
  })
})

describe('reserved words', () => {
  const grammar = readFileSync(new URL('kernels/language/twofold.grammar', root), 'utf8')
  const words = (macro: string) => new Set([...grammar.matchAll(new RegExp(`\\b${macro}<"([a-z]+)">`, 'g'))].map((m) => m[1]))

  test('the reserved words are the grammar\'s keywords, and the contextual ones its contextual keywords', () => {
    expect([...reservedWords].sort()).toEqual([...words('kw')].sort())
    expect([...contextualWords].sort()).toEqual([...words('ckw')].sort())
    for (const w of contextualWords) expect(reservedWords.has(w), w).toBe(false)
  })

  test('the guide lists exactly the reserved words in its section on them', () => {
    const guide = readFileSync(new URL('notebooks/guide.md', root), 'utf8')
    const section = guide.slice(guide.indexOf('## 7. Reserved words'))
    const list = section.split('\n\n')[2]
    expect(new Set([...list.matchAll(/`([a-z]+)`/g)].map((m) => m[1]))).toEqual(new Set(reservedWords))
  })

  test('a reserved word used as a name is an error that says it is reserved', () => {
    for (const w of ['always', 'for', 'check', 'eventually', 'timing']) {
      const text = lamps('check lamps: capped').replace('state seen[peer]', `state ${w}: bool = false\n  state seen[peer]`)
      const ds = diagnostics(text)
      expect(ds.length, w).toBeGreaterThan(0)
      const at = where(text, `state ${w}`)
      expect(ds[0], w).toMatchObject({ severity: 'error', line: at.line, column: at.column + 'state '.length })
      expect(ds[0].message, w).toContain(`\`${w}\` is a reserved word`)
    }
  })
})
