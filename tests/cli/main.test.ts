// The command line's plumbing, against a scripted kernel whose answers are fixed in advance: what
// is printed where, exit codes for each kind of answer, records written and replayed, failures as
// one line. The real kernel's verdicts are exercised in end-to-end.test.ts.
import { createHash } from 'node:crypto'
import { readFileSync, symlinkSync } from 'node:fs'
import { join } from 'node:path'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { RecordKernel } from '../../kernels/record/kernel'
import { canonicalJsonPretty } from '../../kernels/base/canonical'
import { parseRecord } from '../../kernels/record/replay'
import type { Report, Verdict } from '../../kernels/result'
import { harbourModel, harbourText, report, row } from '../record/synthetic'
import { twofold, workspace } from './harness'

/**
 * A kernel that reads a verdict for row 3 from a marker line `verdict: X` in the notebook, reports
 * notebook errors for a marker `broken`, and calls onProgress once per row.
 */
function scriptedKernel(overrides: Partial<RecordKernel> = {}): RecordKernel {
  return {
    analyzeNotebook: (text) =>
      text.includes('broken')
        ? { ...harbourModel, diagnostics: [{ severity: 'error', message: "unknown variable 'bsuy'", line: 14, column: 37, endLine: 14, endColumn: 41, from: 0, to: 0 }] }
        : harbourModel,
    runNotebook: async (text, path, options) => {
      if (text.includes('broken')) return { notebook: { path, sha256: '' }, errors: [{ line: 14, column: 37, message: "unknown variable 'bsuy'" }], checks: [] }
      const verdict = (/verdict: (\w+)/.exec(text)?.[1] ?? 'holds') as Verdict
      const r: Report = report((i) => !options.shard || i % options.shard.count === options.shard.index - 1)
      r.notebook.path = path
      r.checks = r.checks
        .filter((c) => !options.only || c.property === options.only)
        .map((c) => (c.row === 3 ? row(3, { verdict }) : c))
      r.checks.forEach((c) => options.onProgress?.({ check: 0, property: c.property, processes: c.processes, states: c.states, transitions: c.transitions, statesPerSecond: 1000, seconds: 0.5 }))
      return r
    },
    ...overrides,
  }
}

let ws: ReturnType<typeof workspace>
beforeEach(() => {
  ws = workspace({ 'harbour.md': harbourText })
})
afterEach(() => ws.remove())
const kernel = scriptedKernel()

describe('twofold check', () => {
  it('prints a table with property, instance, constants, verdict, states, transitions and time', async () => {
    const ran = await twofold(['check', 'harbour.md'], ws.dir, { kernel })
    expect(ran.code).toBe(0)
    const [header, rule, first] = ran.stdout.split('\n')
    expect(header.split(/\s+/)).toEqual(['property', 'instance', 'constants', 'verdict', 'states', 'transitions', 'time'])
    expect(rule).toMatch(/^-+( +-+){6}$/)
    expect(first.split(/\s+/)).toEqual(['idle', 'G_1', '(cutoff)', 'reach=1', 'holds', '10', '30', '0.01', 's'])
    expect(ran.stdout).toContain('8 rows: 8 hold, 0 violated, 0 inconclusive, 0 error')
  })

  it('exits 1 when a row is violated, 3 when one is inconclusive or in error', async () => {
    for (const [verdict, code] of [['violated', 1], ['inconclusive', 3], ['error', 3], ['holds', 0]] as const) {
      ws.write('harbour.md', harbourText + `\nverdict: ${verdict}\n`)
      expect((await twofold(['check', 'harbour.md'], ws.dir, { kernel })).code).toBe(code)
    }
  })

  it('exits 2 and prints file:line:column: message for notebook errors', async () => {
    ws.write('harbour.md', harbourText + '\nbroken\n')
    const ran = await twofold(['check', 'harbour.md'], ws.dir, { kernel })
    expect(ran.code).toBe(2)
    expect(ran.stderr).toBe("harbour.md:14:37: unknown variable 'bsuy'\n")
    expect(ran.stdout).toContain('nothing was checked')
  })

  it('prints only the JSON report with --json', async () => {
    const ran = await twofold(['check', 'harbour.md', '--json'], ws.dir, { kernel })
    const doc = JSON.parse(ran.stdout)
    expect(Object.keys(doc)).toEqual(['notebook', 'errors', 'checks'])
    expect(doc.checks).toHaveLength(8)
    expect(doc.notebook.path).toBe('harbour.md')
  })

  it('writes a record with --record that names the options used', async () => {
    const ran = await twofold(['check', 'harbour.md', '--record', 'out.json', '--only', 'idle', '--shard', '2/3'], ws.dir, { kernel })
    expect(ran.code).toBe(0)
    const record = await parseRecord(readFileSync(join(ws.dir, 'out.json'), 'utf8'))
    // Oracle: `idle` has the 4 rows reach 1..4 (plan rows 0..3); shard 2/3 plans the rows r mod 3 = 1.
    expect(record.options).toEqual({ only: 'idle', shard: { index: 2, count: 3, indices: [1] }, limits: [null] })
    expect(record.plan.rows).toBe(4)
    expect(record.checks.map((c) => c.row)).toEqual([1])
  })

  it('exits 2 for a shard that selects no row, or whose numbers cannot be held exactly', async () => {
    const beyond = await twofold(['check', 'harbour.md', '--shard', '9/10'], ws.dir, { kernel })
    expect(beyond).toEqual({ code: 2, stdout: '', stderr: 'twofold: --shard 9/10 selects no row: the plan of harbour.md has 8 rows\n' })
    const huge = await twofold(['check', 'harbour.md', '--shard', '99999999999999999999/99999999999999999999'], ws.dir, { kernel })
    expect([huge.code, huge.stdout]).toEqual([2, ''])
    expect(huge.stderr).toMatch(/^twofold: --shard 99999999999999999999\/99999999999999999999: I and N must be at most/)
  })

  it('exits 2 and leaves the notebook alone when --record names the notebook, directly or through a link', async () => {
    symlinkSync(join(ws.dir, 'harbour.md'), join(ws.dir, 'link.json'))
    for (const out of ['harbour.md', './harbour.md', 'link.json']) {
      const ran = await twofold(['check', 'harbour.md', '--record', out], ws.dir, { kernel })
      expect([out, ran.code, ran.stderr]).toEqual([out, 2, `twofold: the record ${out} would overwrite the input harbour.md; choose another file for --record\n`])
    }
    expect(readFileSync(join(ws.dir, 'harbour.md'), 'utf8')).toBe(harbourText)
  })

  it('draws the progress line on stderr only when stderr is a terminal, and erases it', async () => {
    const tty = await twofold(['check', 'harbour.md'], ws.dir, { kernel, tty: true })
    expect(tty.stderr).toContain('\r\x1b[Kcheck 1 idle on G_1: 10 states, 1,000 states/s, 0.5 s')
    expect(tty.stderr.endsWith('\r\x1b[K')).toBe(true)
    const piped = await twofold(['check', 'harbour.md'], ws.dir, { kernel, tty: false })
    expect(piped.stderr).toBe('')
  })

  it('shows a counterexample tick by tick and the reasons a cutoff was refused', async () => {
    const shown = scriptedKernel({
      runNotebook: async (_t, path) => ({
        notebook: { path, sha256: '' },
        errors: [],
        checks: [
          row(0, {
            verdict: 'violated',
            complete: false,
            counterexample: {
              kind: 'lasso', message: 'calm fails forever', loopStart: 1,
              initial: [{ process: 1, values: { busy: false } }, { process: 2, values: { busy: false } }],
              ticks: [
                { tick: 1, crashed: [2], stepped: [1], received: [], sent: [{ from: 1, to: 2, message: 'hoist' }], changes: [{ process: 1, variable: 'busy', from: false, to: true }] },
                { tick: 2, crashed: [], stepped: [], received: [], sent: [], changes: [] },
              ],
            },
          }),
          row(1, { verdict: 'inconclusive', processes: 0, note: 'the cutoff does not apply; give explicit sizes', cutoff: { applies: false, processes: null, statement: '', tex: '', passed: [], reasons: [{ rule: 5, name: 'no-aggregate', line: 9, column: 3, message: "an aggregate feeds 'busy'" }] } }),
        ],
      }),
    })
    const ran = await twofold(['check', 'harbour.md'], ws.dir, { kernel: shown })
    expect(ran.code).toBe(1)
    expect(ran.stdout).toContain('counterexample (lasso, 2 ticks, loop from tick index 1; p=#1): calm fails forever')
    expect(ran.stdout).toContain('    start  #1 busy=false | #2 busy=false')
    expect(ran.stdout).toContain('    t1  crash #2 | step #1 | #1->#2 hoist | #1 busy false->true')
    expect(ran.stdout).toMatch(/-- from here the ticks repeat forever --\n {4}t2 {2}no step/)
    expect(ran.stdout).toContain('    harbour.md:9:3: no-aggregate (rule 5): an aggregate feeds \'busy\'')
    expect(ran.stdout).toContain('  the cutoff does not apply; give explicit sizes')
  })

  it('refuses --only naming nothing in the notebook, before running', async () => {
    const ran = await twofold(['check', 'harbour.md', '--only', 'lantern'], ws.dir, { kernel })
    expect(ran.code).toBe(2)
    expect(ran.stderr).toBe('twofold: --only lantern: no check in harbour.md names that protocol or property\n')
  })

  it('refuses a malformed --shard with one line', async () => {
    const ran = await twofold(['check', 'harbour.md', '--shard', '4/3'], ws.dir, { kernel })
    expect(ran.code).toBe(2)
    expect(ran.stderr).toBe('twofold: --shard 4/3: I must be between 1 and N\n')
  })

  it('exits 2 with one line for a notebook it cannot read', async () => {
    const ran = await twofold(['check', 'missing.md'], ws.dir, { kernel })
    expect(ran).toEqual({ code: 2, stdout: '', stderr: 'twofold: cannot read notebook missing.md: no such file\n' })
  })

  it('turns an unexpected exception into one line and a non-zero code, without a stack', async () => {
    const crashing = scriptedKernel({ runNotebook: async () => { throw new TypeError('lanterns out\n    at somewhere (file.ts:1:1)') } })
    const ran = await twofold(['check', 'harbour.md'], ws.dir, { kernel: crashing })
    expect(ran.code).toBe(3)
    expect(ran.stderr).toBe('twofold: internal error: lanterns out\n')
  })
})

describe('twofold replay', () => {
  const record = async () => {
    expect((await twofold(['check', 'harbour.md', '--record', 'r.json'], ws.dir, { kernel })).code).toBe(0)
    return readFileSync(join(ws.dir, 'r.json'), 'utf8')
  }

  it('exits 0 when every compared field matches', async () => {
    await record()
    const ran = await twofold(['replay', 'r.json'], ws.dir, { kernel })
    expect(ran.code).toBe(0)
    expect(ran.stdout).toBe('replayed 8 rows of the notebook embedded in r.json: every compared field matches the record\n')
  })

  it('exits 1 naming each changed field', async () => {
    const doctored = JSON.parse(await record())
    doctored.checks[3].verdict = 'violated'
    doctored.checks[6].states = 4
    ws.write('r.json', canonicalJsonPretty(doctored) + '\n')
    const ran = await twofold(['replay', 'r.json'], ws.dir, { kernel })
    expect(ran.code).toBe(1)
    expect(ran.stdout.split('\n').slice(1, 3)).toEqual(['checks[3].verdict: record says violated, now holds', 'checks[6].states: record says 4, now 16'])
  })

  it('exits 2 when the notebook given changed since the record, naming the block that changed', async () => {
    await record()
    ws.write('edited.md', harbourText + '\nOne more sentence of prose.\n')
    const prose = await twofold(['replay', 'r.json', 'edited.md'], ws.dir, { kernel })
    expect(prose.code).toBe(2)
    expect(prose.stderr).toMatch(/^edited\.md: the notebook changed since the record was made \(notebook\.sha256: record says [0-9a-f]{64}, the notebook hashes to [0-9a-f]{64}; no formal block changed, only the text around them\); nothing was replayed\n$/)
    // The scripted kernel reads the edited text's blocks from the model, so edit the model's block text.
    const edited = { ...harbourModel, blocks: harbourModel.blocks.map((b, i) => (i === 1 ? { ...b, text: b.text + ' ' } : b)) }
    const ran = await twofold(['replay', 'r.json', 'edited.md'], ws.dir, { kernel: scriptedKernel({ analyzeNotebook: () => edited }) })
    expect(ran.code).toBe(2)
    expect(ran.stderr).toMatch(/; property block "idle, calm" at line 14 \(now property block "idle, calm" at line 14\): sha256 [0-9a-f]{12}\.\.\. in the record, [0-9a-f]{12}\.\.\. now\); nothing was replayed\n$/)
  })

  it('exits 1 naming the block of an edited block hash', async () => {
    const doctored = JSON.parse(await record())
    doctored.blocks[2].sha256 = '0'.repeat(64)
    ws.write('r.json', canonicalJsonPretty(doctored) + '\n')
    const ran = await twofold(['replay', 'r.json'], ws.dir, { kernel })
    expect(ran.code).toBe(1)
    expect(ran.stdout).toMatch(/^blocks\[2\]\.sha256 \(check block "cranes" at line 19\): record says 0{64}, now [0-9a-f]{64}$/m)
  })

  it('exits 2 for a record that is not canonical, has a duplicate key or a field of the wrong type', async () => {
    const text = await record()
    const cases = {
      layout: JSON.stringify(JSON.parse(text)),
      duplicate: text.replace('"verdict": "holds"\n', '"verdict": "holds", "verdict": "violated"\n'),
      type: text.replace(/"seconds": [0-9.e-]+/, '"seconds": "yesterday"'),
    }
    for (const [name, bad] of Object.entries(cases)) {
      ws.write('bad.json', bad)
      const ran = await twofold(['replay', 'bad.json'], ws.dir, { kernel })
      expect([name, ran.code, ran.stderr.trimEnd().split('\n').length]).toEqual([name, 2, 1])
    }
  })

  it('exits 2 with one line for a truncated record', async () => {
    const text = await record()
    ws.write('r.json', text.slice(0, 200))
    const ran = await twofold(['replay', 'r.json'], ws.dir, { kernel })
    expect(ran.code).toBe(2)
    expect(ran.stderr).toMatch(/^twofold: r\.json: not valid JSON \(truncated or damaged\): [^\n]*\n$/)
    expect(ran.stderr).not.toMatch(/\bat .*:\d+:\d+/)
  })

  it('exits 2 with one line for a missing record file', async () => {
    const ran = await twofold(['replay', 'nowhere.json'], ws.dir, { kernel })
    expect(ran).toEqual({ code: 2, stdout: '', stderr: 'twofold: cannot read record nowhere.json: no such file\n' })
  })

  it('never opens the notebook path a record names, replaying the embedded text instead', async () => {
    const doctored = JSON.parse(await record())
    ws.write('private.txt', 'a secret that replay must not read')
    doctored.notebook.path = join(ws.dir, 'private.txt')
    ws.write('r.json', canonicalJsonPretty(doctored) + '\n')
    const texts: string[] = []
    const base = scriptedKernel()
    const spy = scriptedKernel({ runNotebook: (text, path, options) => { texts.push(text); return base.runNotebook(text, path, options) } })
    const ran = await twofold(['replay', 'r.json'], ws.dir, { kernel: spy })
    // The path is information and compared like any field; the text run is the embedded one.
    expect(texts).toEqual([harbourText])
    expect(ran.stdout + ran.stderr).not.toContain('secret')
    expect(ran.stdout + ran.stderr).not.toContain(createHash('sha256').update('a secret that replay must not read').digest('hex'))
  })

  it('replays against the notebook given on the command line', async () => {
    await record()
    ws.write('copy.md', harbourText)
    expect((await twofold(['replay', 'r.json', 'copy.md'], ws.dir, { kernel })).code).toBe(0)
  })
})

describe('twofold merge', () => {
  it('prints the merged record of all shards, equal to the unsharded one but for times', async () => {
    for (const i of [1, 2, 3]) expect((await twofold(['check', 'harbour.md', '--shard', `${i}/3`, '--record', `s${i}.json`], ws.dir, { kernel })).code).toBe(0)
    await twofold(['check', 'harbour.md', '--record', 'all.json'], ws.dir, { kernel })
    const ran = await twofold(['merge', 's2.json', 's3.json', 's1.json'], ws.dir, { kernel })
    expect(ran.code).toBe(0)
    const strip = (r: Awaited<ReturnType<typeof parseRecord>>) => ({ ...r, created: '', checks: r.checks.map((c) => ({ ...c, seconds: 0 })) })
    expect(strip(await parseRecord(ran.stdout))).toEqual(strip(await parseRecord(readFileSync(join(ws.dir, 'all.json'), 'utf8'))))
    ws.write('merged.json', ran.stdout)
    expect((await twofold(['replay', 'merged.json'], ws.dir, { kernel })).code).toBe(0)
  })

  it('exits 2 naming the gap when a shard is missing', async () => {
    for (const i of [1, 3]) await twofold(['check', 'harbour.md', '--shard', `${i}/3`, '--record', `s${i}.json`], ws.dir, { kernel })
    const ran = await twofold(['merge', 's1.json', 's3.json'], ws.dir, { kernel })
    expect(ran).toEqual({ code: 2, stdout: '', stderr: 'twofold: cannot merge: shard 2/3 missing: the merge would have a gap\n' })
  })
})

describe('twofold --help', () => {
  it('describes each command and its exit codes', async () => {
    for (const command of ['check', 'replay', 'merge']) {
      const ran = await twofold([command, '--help'], ws.dir, { kernel })
      expect(ran.code).toBe(0)
      expect(ran.stdout).toContain(`Usage: twofold ${command}`)
      expect(ran.stdout).toContain('Exit codes:')
    }
    const top = await twofold(['--help'], ws.dir, { kernel })
    expect(top.stdout).toMatch(/check \[options\] <notebook>/)
  })

  it('exits 2 for a missing argument, with commander\'s message and no stack', async () => {
    const ran = await twofold(['check'], ws.dir, { kernel })
    expect(ran.code).toBe(2)
    expect(ran.stderr).toContain("error: missing required argument 'notebook'")
    expect(ran.stderr).not.toMatch(/\bat .*:\d+:\d+/)
  })
})
