// The command line on the real kernel: exit codes from notebooks made for each, records that
// round-trip and replay, shards that merge into the unsharded record, and two real spawns of
// bin/twofold.js. Fixtures are short notebooks written to a temporary directory.
import { spawnSync } from 'node:child_process'
import { createHash } from 'node:crypto'
import { readFileSync, readdirSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { canonicalJsonPretty } from '../../kernels/base/canonical'
import { compareRecords, parseRecord } from '../../kernels/record/replay'
import type { Report } from '../../kernels/result'
import { twofold, workspace } from './harness'

const repo = fileURLToPath(new URL('../..', import.meta.url))

/** Lamps that blink to each other in lock-step; `seen[q]` counts blinks from q up to `cap`. */
const lamps = [
  '```protocol',
  'protocol lamps {',
  '  const cap = 2',
  '  timing synchronous(delay: 1, idle: 1)',
  '  faults none',
  '  message blink',
  '  state lit: bool = false',
  '  state seen[peer]: 0..cap = 0',
  '  on blink from q {',
  '    seen[q] := min(seen[q] + 1, cap)',
  '  }',
  '  step {',
  '    broadcast blink',
  '    lit := not lit',
  '  }',
  '}',
  '```',
  '',
  '```property',
  'property steady = forall p, q: always p.seen[q] <= cap',
  'property dark = forall p: always not p.lit',
  '```',
  '',
].join('\n')

const notebook = (title: string, ...checks: string[]) =>
  `# ${title}\n\nLighthouse lamps on a breakwater.\n\n${lamps}\n\`\`\`check\n${checks.join('\n')}\n\`\`\`\n`

const fixtures = {
  'holds.md': notebook('Steady lamps', 'check lamps: steady'),
  'violated.md': notebook('Dark lamps', 'check lamps: steady, dark'),
  'broken.md': notebook('Broken lamps', 'check lamps: steady, dark').replace('property dark = forall p: always not p.lit', 'property dark = forall p: always not p.lamp'),
  'limited.md': notebook('Limited lamps', 'check lamps: steady within 2 states'),
  'refused.md': notebook('Crowded lamps', 'check lamps: dark').replace('    lit := not lit', '    lit := some r: seen[r] > 0'),
  'sweep.md': notebook('Swept lamps', 'check lamps: steady, dark with cap in 1..4'),
}

let ws: ReturnType<typeof workspace>
beforeAll(() => {
  ws = workspace(fixtures)
})
afterAll(() => ws.remove())

const json = async (file: string, ...flags: string[]) => {
  const ran = await twofold(['check', file, '--json', ...flags], ws.dir)
  return { code: ran.code, report: JSON.parse(ran.stdout) as Report, stderr: ran.stderr }
}

describe('twofold check exit codes', () => {
  it('exits 0 when every check holds', async () => {
    const { code, report } = await json('holds.md')
    // Oracle: hand derivation: seen[q] is assigned min(seen[q] + 1, cap), so it never exceeds cap.
    expect(report.checks.map((r) => r.verdict)).toEqual(['holds'])
    expect(code).toBe(0)
  })

  it('counts the states and transitions of the lock-step lamps as derived by hand', async () => {
    const { report } = await json('holds.md')
    // Oracle: hand derivation from semantics.md: idle 1 makes both lamps step every tick and delay 1
    // makes every blink overdue the tick after it is sent, so the run is one path
    // S0 (dark, seen 0) -> S1 (lit, blinks in flight) -> S2 (seen 1) -> S3 (lit, seen 2) -> S4 -> S3.
    expect(report.checks[0].processes).toBe(2)
    expect([report.checks[0].states, report.checks[0].transitions]).toEqual([5, 5])
  })

  it('exits 1 when some check is violated, with the trace to it', async () => {
    const { code, report } = await json('violated.md')
    // Oracle: hand derivation: every lamp flips `lit` at its first step, so `always not p.lit` fails after one tick.
    const dark = report.checks.find((r) => r.property === 'dark')!
    expect(dark.verdict).toBe('violated')
    expect(dark.counterexample?.ticks).toHaveLength(1)
    expect(code).toBe(1)
  })

  it('exits 2 and names the line and column when the notebook has errors', async () => {
    const ran = await twofold(['check', 'broken.md'], ws.dir)
    expect(ran.code).toBe(2)
    const line = fixtures['broken.md'].split('\n').findIndex((l) => l.includes('p.lamp')) + 1
    expect(ran.stderr).toMatch(new RegExp(`^broken\\.md:${line}:\\d+: .*lamp`, 'm'))
    const { report } = await json('broken.md')
    expect(report.checks).toEqual([])
    expect(report.errors.length).toBeGreaterThan(0)
  })

  it('exits 3 when a state limit stops a check that found no violation', async () => {
    const { code, report } = await json('limited.md')
    // Oracle: the hand derivation above gives 5 reachable states, more than the limit of 2 (language.md: hitting it is inconclusive).
    expect(report.checks.map((r) => r.verdict)).toEqual(['inconclusive'])
    expect(code).toBe(3)
  })

  it('exits 3 when the cutoff is refused and no sizes are given, printing the reasons', async () => {
    const { code, report } = await json('refused.md')
    // Oracle: cutoff.md rule 5: `lit` is written from the aggregate `some r: ...` and the property mentions it.
    expect(report.checks.map((r) => [r.verdict, r.cutoff.applies])).toEqual([['inconclusive', false]])
    expect(report.checks[0].cutoff.reasons.map((r) => r.rule)).toContain(5)
    expect(code).toBe(3)
    const ran = await twofold(['check', 'refused.md'], ws.dir)
    expect(ran.stdout).toMatch(/cutoff refused:\n {4}refused\.md:\d+:\d+: [a-z-]+ \(rule \d\): /)
  })
})

describe('twofold check sweeps', () => {
  it('gives 8 rows for 2 properties x 4 constant values, in the same order every run', async () => {
    const first = (await json('sweep.md')).report.checks
    const second = (await json('sweep.md')).report.checks
    const shape = (rows: Report['checks']) => rows.map((r) => `${r.row}:${r.property}@cap=${r.constants.cap}`)
    expect(first).toHaveLength(8)
    expect(first.map((r) => r.row)).toEqual([0, 1, 2, 3, 4, 5, 6, 7])
    expect(new Set(first.map((r) => `${r.property}@${r.constants.cap}`)).size).toBe(8)
    expect(shape(second)).toEqual(shape(first))
  })
})

describe('twofold --shard and merge', () => {
  it('merges --shard 1/3, 2/3, 3/3 into the unsharded record', async () => {
    await twofold(['check', 'sweep.md', '--record', 'all.json'], ws.dir)
    for (const i of [1, 2, 3]) await twofold(['check', 'sweep.md', '--shard', `${i}/3`, '--record', `part${i}.json`], ws.dir)
    const parts = await Promise.all([1, 2, 3].map((i) => parseRecord(readFileSync(join(ws.dir, `part${i}.json`), 'utf8'))))
    expect(parts.map((p) => p.checks.map((r) => r.row))).toEqual([[0, 3, 6], [1, 4, 7], [2, 5]])
    const merged = await twofold(['merge', 'part3.json', 'part1.json', 'part2.json'], ws.dir)
    expect(merged.code).toBe(0)
    // Oracle: the unsharded run's record; every field but times must agree.
    const whole = await parseRecord(readFileSync(join(ws.dir, 'all.json'), 'utf8'))
    expect(compareRecords(whole, await parseRecord(merged.stdout))).toEqual([])
    ws.write('merged.json', merged.stdout)
    expect((await twofold(['replay', 'merged.json'], ws.dir)).code).toBe(0)
  })

  it('merges the shards of notebooks/guide.md into the unsharded record, which replays clean', async () => {
    const guide = join(repo, 'notebooks', 'guide.md')
    expect((await twofold(['check', guide, '--record', 'guide-all.json'], ws.dir)).code).toBe(1)
    // A shard may hold only the guide's deliberately inconclusive proof by induction (exit 3).
    for (const i of [1, 2, 3]) expect([0, 1, 3]).toContain((await twofold(['check', guide, '--shard', `${i}/3`, '--record', `guide${i}.json`], ws.dir)).code)
    const merged = await twofold(['merge', 'guide1.json', 'guide2.json', 'guide3.json'], ws.dir)
    expect(merged.code).toBe(0)
    // Oracle: the unsharded run. `patient at N = 2..3` puts G_2 and G_3 in different shards,
    // so agreement must come from each row's own comparison with the cutoff instance.
    const all = await parseRecord(readFileSync(join(ws.dir, 'guide-all.json'), 'utf8'))
    const joined = await parseRecord(merged.stdout)
    expect(compareRecords(all, joined)).toEqual([])
    expect(joined.checks.filter((r) => r.agreement !== undefined).length).toBeGreaterThan(1)
    ws.write('guide-merged.json', merged.stdout)
    expect((await twofold(['replay', 'guide-merged.json'], ws.dir)).code).toBe(0)
  })
})

describe('twofold check --record', () => {
  /** Oracle: the formal blocks found by scanning the fixture's fences line by line, hashed with node:crypto. */
  function fencedBlocks(text: string) {
    const lines = text.split('\n')
    const blocks: { kind: string; line: number; sha256: string }[] = []
    for (let i = 0; i < lines.length; i++) {
      const kind = /^```(protocol|property|check)$/.exec(lines[i])?.[1]
      if (!kind) continue
      const end = lines.indexOf('```', i + 1)
      const body = lines.slice(i + 1, end).join('\n')
      blocks.push({ kind, line: i + 2, sha256: createHash('sha256').update(body).digest('hex') })
      i = end
    }
    return blocks
  }

  it('hashes the notebook and each formal block, with its kind, name and line', async () => {
    await twofold(['check', 'violated.md', '--record', 'provenance.json'], ws.dir)
    const record = await parseRecord(readFileSync(join(ws.dir, 'provenance.json'), 'utf8'))
    expect(record.notebook.sha256).toBe(createHash('sha256').update(fixtures['violated.md']).digest('hex'))
    expect(record.blocks.map(({ kind, line, sha256 }) => ({ kind, line, sha256 }))).toEqual(fencedBlocks(fixtures['violated.md']))
    expect(record.blocks.map((b) => b.name)).toEqual(['lamps', 'steady, dark', 'lamps'])
    expect(record.options).toEqual({ only: null, shard: null, limits: [null] })
    expect(record.notebook.text).toBe(fixtures['violated.md'])
  })
})

describe('twofold replay', () => {
  beforeAll(async () => {
    await twofold(['check', 'violated.md', '--record', 'violated.json'], ws.dir)
  })
  const recorded = () => readFileSync(join(ws.dir, 'violated.json'), 'utf8')

  it('exits 0 on an untouched record and notebook', async () => {
    expect((await twofold(['replay', 'violated.json'], ws.dir)).code).toBe(0)
  })

  it('exits 2 when the notebook changed', async () => {
    ws.write('edited.md', fixtures['violated.md'].replace('breakwater', 'harbour wall'))
    const ran = await twofold(['replay', 'violated.json', 'edited.md'], ws.dir)
    expect(ran.code).toBe(2)
    expect(ran.stderr).toContain('the notebook changed since the record was made')
  })

  it('exits 1 naming the field when a result was changed', async () => {
    const doctored = JSON.parse(recorded())
    doctored.checks[0].states += 1
    ws.write('doctored.json', canonicalJsonPretty(doctored) + '\n')
    const ran = await twofold(['replay', 'doctored.json'], ws.dir)
    expect(ran.code).toBe(1)
    expect(ran.stdout).toContain(`checks[0].states: record says ${doctored.checks[0].states}, now ${doctored.checks[0].states - 1}`)
  })

  it('exits 2 with a one-line message and no stack for a truncated record', async () => {
    ws.write('cut.json', recorded().slice(0, 300))
    const ran = await twofold(['replay', 'cut.json'], ws.dir)
    expect(ran.code).toBe(2)
    expect(ran.stderr.trimEnd().split('\n')).toHaveLength(1)
    expect(ran.stderr).toMatch(/^twofold: cut\.json: not valid JSON/)
  })
})

describe('records of the example notebooks', () => {
  const examples = readdirSync(join(repo, 'notebooks')).filter((f) => f.endsWith('.md'))

  it('has example notebooks to check', () => {
    expect(examples.length).toBeGreaterThan(0)
  })

  it.each(examples)('%s: two runs give records equal in every field but times, and replay', async (name) => {
    const path = join(repo, 'notebooks', name)
    const a = await twofold(['check', path, '--record', join(ws.dir, `${name}.a.json`)], ws.dir)
    const b = await twofold(['check', path, '--record', join(ws.dir, `${name}.b.json`)], ws.dir)
    expect(a.stderr).not.toContain('internal error')
    expect(b.code).toBe(a.code)
    const read = (suffix: string) => parseRecord(readFileSync(join(ws.dir, `${name}.${suffix}.json`), 'utf8'))
    // Oracle: the first run's record; only `seconds` and `created` may differ.
    expect(compareRecords(await read('a'), await read('b'))).toEqual([])
    expect((await twofold(['replay', join(ws.dir, `${name}.a.json`)], ws.dir)).code).toBe(0)
  })
})

describe('bin/twofold.js', () => {
  const bin = join(repo, 'bin', 'twofold.js')

  it('runs a check as a real process, printing JSON and exiting 1 for a violation', () => {
    const ran = spawnSync(process.execPath, [bin, 'check', 'violated.md', '--json'], { cwd: ws.dir, encoding: 'utf8' })
    expect(ran.status).toBe(1)
    expect(JSON.parse(ran.stdout).checks.some((r: { verdict: string }) => r.verdict === 'violated')).toBe(true)
  })

  it('exits 2 with one line and no stack trace for a malformed record', () => {
    ws.write('junk.json', '{"format": {"name": "twofold-record", "version": 1}, "checks": [')
    const ran = spawnSync(process.execPath, [bin, 'replay', 'junk.json'], { cwd: ws.dir, encoding: 'utf8' })
    expect(ran.status).toBe(2)
    expect(ran.stderr.trimEnd().split('\n')).toEqual([expect.stringMatching(/^twofold: junk\.json: not valid JSON/)])
  })
})
