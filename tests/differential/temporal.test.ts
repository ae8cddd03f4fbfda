// Differential tests of the kernel's temporal verdicts (kernels/run.ts: invariant fast path and the
// automaton product under fairness) against the reference temporal check (tests/reference/
// temporal.ts), which shares only the LTL-to-automaton translation with the kernel. Oracle: the
// reference temporal check over the reference interpreter's state graph. Its own verdicts are
// checked first on tiny protocols whose fair runs are worked out by hand in the comments.
import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { planRows, runRow } from '../../kernels/run'
import { generateNotebook, generateProperties } from '../reference/generate'
import { referenceTemporal } from '../reference/temporal'

const GENERATED = 150

/** Every assignment of distinct 1-based processes to k variables among n. */
function assignments(n: number, k: number): number[][] {
  if (k === 0) return [[]]
  const out: number[][] = []
  for (let p = 1; p <= n; p++) {
    if (k === 1) out.push([p])
    else for (let q = 1; q <= n; q++) if (q !== p) out.push([p, q])
  }
  return out
}

function notebook(protocol: string, properties: string, check: string) {
  const nb = analyzeNotebook(
    '```protocol\n' + protocol + '\n```\n\n```property\n' + properties + '\n```\n\n```check\n' + check + '\n```\n',
  )
  expect(nb.diagnostics.filter((d) => d.severity === 'error').map((d) => `${d.line}:${d.column} ${d.message}`)).toEqual([])
  return nb
}

/** The reference verdict of property `name` of check 0 at size n: violated when any assignment is. */
function reference(nb: ReturnType<typeof analyzeNotebook>, name: string, n: number, only?: number[]): string {
  const check = nb.checks[0]
  const prop = check.properties.find((p) => p.name === name)!
  const protocol = nb.protocols[check.protocol]
  let verdict = 'holds'
  for (const a of only ? [only] : assignments(n, prop.vars.length)) {
    const r = referenceTemporal(protocol, n, undefined, prop, a)
    if (r.verdict === 'violated') return 'violated'
    if (r.verdict === 'inconclusive') verdict = 'inconclusive'
  }
  return verdict
}

const lamps = `protocol lamps {
  timing asynchronous
  faults crash
  message flash
  state seen[peer]: bool = false
  on flash from q { seen[q] := true }
  step { broadcast flash }
}`

describe('reference temporal check', () => {
  it('fairness makes a correct peer eventually seen', () => {
    // q never crashes, so it steps infinitely often and broadcasts; p, never crashing, must
    // infinitely often empty or receive from q->p, so it receives a flash: p.seen[q] holds.
    const nb = notebook(
      lamps,
      'property heard = forall p, q: correct(p) and correct(q) implies eventually p.seen[q]',
      'check lamps: heard at N = 2',
    )
    expect(reference(nb, 'heard', 2)).toBe('holds')
  })

  it('without the correct(q) premise a peer that crashes at once is never seen', () => {
    // q crashes in the first tick before stepping: nothing is ever sent to p.
    const nb = notebook(
      lamps,
      'property heard = forall p, q: correct(p) implies eventually p.seen[q]',
      'check lamps: heard at N = 2',
    )
    expect(reference(nb, 'heard', 2)).toBe('violated')
  })

  it('a process may crash, so alive is not invariant, but seen is never reset', () => {
    const nb = notebook(
      lamps,
      'property up = forall p: always alive(p)\nproperty kept = forall p, q: always (p.seen[q] implies always p.seen[q])',
      'check lamps: up, kept at N = 2',
    )
    expect(reference(nb, 'up', 2)).toBe('violated')
    expect(reference(nb, 'kept', 2)).toBe('holds')
  })

  it('eventually synchronous runs eventually deliver within the bound', () => {
    // Before `stable` a flash may wait forever only on runs that never stabilize, and those are
    // unfair; so on fair runs the pending flash is eventually taken and seen becomes true.
    const nb = notebook(
      lamps.replace('timing asynchronous', 'timing eventually synchronous(delay: 1, idle: 1)').replace('faults crash', 'faults none'),
      'property heard = forall p, q: eventually p.seen[q]',
      'check lamps: heard at N = 2',
    )
    expect(reference(nb, 'heard', 2)).toBe('holds')
  })
})

/** Runs every row of a notebook with the kernel and compares verdicts; returns the rows compared. */
function compareRows(nb: ReturnType<typeof analyzeNotebook>, label: string): { compared: number; violated: number } {
  let compared = 0
  let violated = 0
  for (const plan of planRows(nb)) {
    const row = runRow(nb, plan)
    if (row.processes > 3 || row.processes < 1 || (row.verdict !== 'holds' && row.verdict !== 'violated')) continue
    if (row.states > 3000) continue
    const check = nb.checks[plan.check]
    const prop = check.properties[plan.property]
    const protocol = nb.protocols[check.protocol]
    // With the cutoff the kernel checks one assignment (symmetry); without it, all of them.
    const all = assignments(row.processes, prop.vars.length)
    const chosen = row.cutoff.applies ? [all[0]] : all
    let verdict = 'holds'
    for (const a of chosen) {
      const r = referenceTemporal(protocol, row.processes, plan.constants, prop, a, 3000, 200_000)
      if (r.verdict === 'violated') {
        verdict = 'violated'
        break
      }
      if (r.verdict === 'inconclusive') verdict = 'inconclusive'
    }
    if (verdict === 'inconclusive') continue
    compared++
    if (verdict === 'violated') violated++
    const what = `${label} ${prop.name} (${prop.source}) N=${row.processes} ${JSON.stringify(row.constants)}`
    expect(`${what}: ${row.verdict}`).toBe(`${what}: ${verdict}`)
  }
  return { compared, violated }
}

describe('kernel temporal verdicts against the reference', () => {
  const dir = join(__dirname, '../../notebooks')
  let total = 0
  let violatedCompared = 0
  for (const f of readdirSync(dir).filter((x) => x.endsWith('.md'))) {
    it(`${f}: every row with at most 3 processes has the reference's verdict`, () => {
      const r = compareRows(analyzeNotebook(readFileSync(join(dir, f), 'utf8')), f)
      total += r.compared
      violatedCompared += r.violated
    })
  }

  it('compared some rows of the example notebooks, violations among them', () => {
    console.log(`temporal rows compared: ${total}, violated among them: ${violatedCompared}`)
    expect(total).toBeGreaterThan(0)
    expect(violatedCompared).toBeGreaterThan(0)
  })

  it(`agrees on generated properties of ${GENERATED} generated protocols`, () => {
    let compared = 0
    let violated = 0
    for (let seed = 1; seed <= GENERATED; seed++) {
      const text = generateNotebook(seed)
      const protocol = analyzeNotebook(text).protocols[0]
      const r = compareRows(analyzeNotebook(text + '\n' + generateProperties(protocol, seed)), `seed ${seed}`)
      compared += r.compared
      violated += r.violated
    }
    console.log(`generated temporal rows compared: ${compared}, violated among them: ${violated}`)
    expect(compared).toBeGreaterThanOrEqual(GENERATED)
    expect(violated).toBeGreaterThan(0)
    expect(violated).toBeLessThan(compared)
  })
})
