// Differential tests of the packed explorer (kernels/model + kernels/explore) against the reference
// interpreter (tests/reference/interpreter.ts), which was written from semantics.md alone and shares
// no code with them. Oracle: the reference interpreter. Both must reach the same set of canonical
// states (DEVELOPERS.md) and count the same distinct (source, target) pairs, and agree on whether a
// model error is reachable.
import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { reachableCanonical } from '../../kernels/explore/reach'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { ProtocolModel } from '../../kernels/language/model'
import { compileInstance } from '../../kernels/model/instance'
import { generateNotebook } from '../reference/generate'
import { referenceReachable } from '../reference/interpreter'

/** States per side before a case is skipped as too big to compare. */
const LIMIT = 3000
/** Ticks the reference may enumerate per case (its cost grows with ticks, not states). */
const BUDGET = 30_000
const SEEDS = 200

type Outcome = 'compared' | 'skipped'

/** Compares one instance; returns whether it was compared, with a small diff on a mismatch. */
function compare(label: string, p: ProtocolModel, n: number, constants: number[]): Outcome {
  const ref = referenceReachable(p, n, constants, LIMIT, BUDGET)
  if (!ref.complete) return 'skipped'
  let exp: ReturnType<typeof reachableCanonical>
  try {
    exp = reachableCanonical(compileInstance(p, n, constants), LIMIT)
  } catch (err) {
    // A setup error (an initial value outside its type): the reference must have met it too.
    expect(ref.modelError, `${label}: explorer refused the instance (${String(err)}), reference did not`).not.toBeNull()
    expect(ref.states.size, `${label}: reference found states the explorer refused`).toBe(0)
    return 'compared'
  }
  if (!exp.complete && exp.modelError === null) return 'skipped'
  const diff = diffOf(label, ref, exp)
  if (diff) console.error(JSON.stringify(diff, null, 1))
  expect(diff, `${label}: reference and explorer differ (diff printed above)`).toBeNull()
  return 'compared'
}

/** Null when both sides agree; else the counts and one state found by only one side. */
function diffOf(
  label: string,
  ref: ReturnType<typeof referenceReachable>,
  exp: ReturnType<typeof reachableCanonical>,
): object | null {
  const onlyRef = [...ref.states].filter((s) => !exp.states.has(s))
  const onlyExp = [...exp.states].filter((s) => !ref.states.has(s))
  const diff = {
    case: label,
    states: [ref.states.size, exp.states.size],
    transitions: [ref.transitions, exp.transitions],
    onlyReference: onlyRef.slice(0, 1),
    onlyExplorer: onlyExp.slice(0, 1),
    modelError: [ref.modelError, exp.modelError?.message ?? null],
  }
  const agree =
    onlyRef.length === 0 &&
    onlyExp.length === 0 &&
    ref.transitions === exp.transitions &&
    (ref.modelError === null) === (exp.modelError === null)
  return agree ? null : diff
}

function protocolsOf(text: string, where: string): ProtocolModel[] {
  const nb = analyzeNotebook(text)
  const errors = nb.diagnostics.filter((d) => d.severity === 'error')
  expect(errors.map((d) => `${where}:${d.line}:${d.column} ${d.message}`)).toEqual([])
  return nb.protocols
}

describe('explorer against the reference interpreter on the example notebooks', () => {
  const dir = join(__dirname, '../../notebooks')
  const files = readdirSync(dir).filter((f) => f.endsWith('.md'))

  it('finds example notebooks to compare', () => {
    expect(files.length).toBeGreaterThan(0)
  })

  for (const f of files) {
    it(`${f}: every protocol at N = 1, 2, 3 with default constants reaches the same states`, () => {
      const protocols = protocolsOf(readFileSync(join(dir, f), 'utf8'), f)
      let compared = 0
      for (const p of protocols) {
        const constants = p.consts.map((c) => c.value)
        for (const n of [1, 2, 3]) if (compare(`${f} ${p.name} N=${n}`, p, n, constants) === 'compared') compared++
      }
      // Every example protocol is small enough at N = 1 at least.
      if (protocols.length > 0) expect(compared).toBeGreaterThan(0)
    })
  }
})

describe('explorer against the reference interpreter on generated protocols', () => {
  it(`agrees on ${SEEDS} generated protocols at N = 1, 2, 3, comparing at least 200 cases`, () => {
    let compared = 0
    let skipped = 0
    const comparedAt = [0, 0, 0, 0]
    let withErrors = 0
    const timings = new Set<string>()
    for (let seed = 1; seed <= SEEDS; seed++) {
      const [p] = protocolsOf(generateNotebook(seed), `seed ${seed}`)
      timings.add(`${p.timing.kind}/${p.faults}`)
      const constants = p.consts.map((c) => c.value)
      for (const n of [1, 2, 3]) {
        if (compare(`seed ${seed} N=${n}`, p, n, constants) === 'compared') {
          compared++
          comparedAt[n]++
        } else skipped++
      }
      if (referenceReachable(p, 1, constants, LIMIT, BUDGET).modelError !== null) withErrors++
    }
    // Every timing model with both fault modes was generated, and some protocols raise model errors.
    expect(timings.size).toBe(6)
    expect(withErrors).toBeGreaterThan(0)
    console.log(`generated: compared ${compared} (N=1 ${comparedAt[1]}, N=2 ${comparedAt[2]}, N=3 ${comparedAt[3]}), skipped ${skipped}, with model errors ${withErrors}`)
    expect(compared, `compared ${compared}, skipped ${skipped}`).toBeGreaterThanOrEqual(200)
    expect(comparedAt[3], 'some cases at N = 3 were compared').toBeGreaterThan(50)
  })
})

describe('the differential comparison itself', () => {
  it('accepts a protocol against itself and notices two protocols whose state sets differ', () => {
    // Two protocols that differ only in an initial value cannot reach the same states; compare()
    // must fail on such a pair, or the agreement above would prove nothing.
    const a = protocolsOf('```protocol\nprotocol depot {\n  timing asynchronous\n  state lamp: bool = false\n  step { skip }\n}\n```\n', 'a')[0]
    const b = protocolsOf('```protocol\nprotocol depot {\n  timing asynchronous\n  state lamp: bool = true\n  step { skip }\n}\n```\n', 'b')[0]
    expect(diffOf('a', referenceReachable(a, 2), reachableCanonical(compileInstance(a, 2, [])))).toBeNull()
    expect(diffOf('a vs b', referenceReachable(a, 2), reachableCanonical(compileInstance(b, 2, [])))).not.toBeNull()
  })
})

describe('the generated protocols', () => {
  it('cover every statement, expression form, handler shape, timing model and fault mode', () => {
    const texts = Array.from({ length: SEEDS }, (_, k) => generateNotebook(k + 1)).join('\n')
    const constructs: [string, RegExp][] = [
      ['assignment', /^\s+\w+ := (?!one of)/m],
      ['entry assignment', /^\s+\w+\[[qrs]\] := /m],
      ['else if', /\} else if /],
      ['else', /\} else \{/],
      ['for', /^\s+for [qrs] \{/m],
      ['broadcast with fields', /broadcast \w+\(/],
      ['broadcast without fields', /broadcast \w+\n/],
      ['send', /send \w+.* to [qrs]/],
      ['one of a set', /:= one of \{/],
      ['one of a range', /:= one of \d+\.\.\d+/],
      ['skip', /^\s+skip$/m],
      ['arithmetic', / [-+*] /],
      ['division', / \/ /],
      ['modulo', / % /],
      ['min', /min\(/],
      ['max', /max\(/],
      ['comparison', / (<=|>=|!=|<|>) /],
      ['and', / and /],
      ['or', / or /],
      ['implies', / implies /],
      ['not', /\(not /],
      ['if-then-else', /\(if .* then .* else /],
      ['count', /\(count [qrs]: /],
      ['some', /\(some [qrs]: /],
      ['every', /\(every [qrs]: /],
      ['handler with fields', /on \w+\(\w+(, \w+)?\) from q/],
      ['handler without fields', /on \w+ from q/],
      ['any', /= any$/m],
      ['enum', /: \{calm, storm\}|: \{ebb, flood\}/],
      ['synchronous', /timing synchronous\(/],
      ['eventually synchronous', /timing eventually synchronous\(/],
      ['asynchronous', /timing asynchronous/],
      ['faults crash', /faults crash/],
      ['faults none', /faults none/],
      ['two message kinds', /message tide/],
    ]
    expect(constructs.filter(([, re]) => !re.test(texts)).map(([name]) => name)).toEqual([])
  })

  it('are the same text for the same seed', () => {
    expect(generateNotebook(7)).toBe(generateNotebook(7))
    expect(generateNotebook(7)).not.toBe(generateNotebook(8))
  })
})
