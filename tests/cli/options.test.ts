// The options of `twofold check` around a run, against a scripted kernel that records what it was
// asked: `--shard auto` and `--shards`, `--workers`, a notebook on standard input, `--quiet`,
// colour (`--color`, NO_COLOR) and `--output` written atomically, never over the notebook.
import { availableParallelism } from 'node:os'
import { readFileSync, readdirSync, symlinkSync } from 'node:fs'
import { join } from 'node:path'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import type { RunOptions } from '../../kernels/api'
import type { RecordKernel } from '../../kernels/record/kernel'
import { parseRecord } from '../../kernels/record/replay'
import type { Report } from '../../kernels/result'
import { harbourModel, harbourText, report, row } from '../record/synthetic'
import { twofold, workspace } from './harness'

/** A kernel that remembers the options of its last run; row 3 is violated when the text says `violated`. */
function recordingKernel() {
  const seen: { options?: RunOptions & { workers?: number }; path?: string; text?: string } = {}
  const kernel: RecordKernel = {
    analyzeNotebook: () => harbourModel,
    runNotebook: async (text, path, options) => {
      Object.assign(seen, { options, path, text })
      const r: Report = report((i) => !options.shard || i % options.shard.count === options.shard.index - 1)
      r.notebook.path = path
      r.checks = r.checks.map((c) => (c.row === 3 && text.includes('violated') ? row(3, { verdict: 'violated' }) : c))
      return r
    },
  }
  return { kernel, seen }
}

let ws: ReturnType<typeof workspace>
beforeEach(() => {
  ws = workspace({ 'harbour.md': harbourText })
})
afterEach(() => ws.remove())

describe('--shard auto', () => {
  it('runs the shard the environment names and records it', async () => {
    const { kernel, seen } = recordingKernel()
    const ran = await twofold(['check', 'harbour.md', '--shard', 'auto', '--record', 'r.json'], ws.dir, { kernel, env: { CI_NODE_INDEX: '2', CI_NODE_TOTAL: '3' } })
    expect(ran.code).toBe(0)
    expect(seen.options?.shard).toEqual({ index: 2, count: 3 })
    expect((await parseRecord(readFileSync(join(ws.dir, 'r.json'), 'utf8'))).options.shard).toMatchObject({ index: 2, count: 3 })
  })

  it('takes the Kubernetes count from --shards', async () => {
    const { kernel, seen } = recordingKernel()
    await twofold(['check', 'harbour.md', '--shard', 'auto', '--shards', '4'], ws.dir, { kernel, env: { JOB_COMPLETION_INDEX: '3' } })
    expect(seen.options?.shard).toEqual({ index: 4, count: 4 })
  })

  it('exits 2 with one line naming the variables when the environment has none', async () => {
    const ran = await twofold(['check', 'harbour.md', '--shard', 'auto'], ws.dir, { kernel: recordingKernel().kernel })
    expect(ran.code).toBe(2)
    expect(ran.stderr.trimEnd().split('\n')).toHaveLength(1)
    expect(ran.stderr).toMatch(/^twofold: --shard auto: no batch system's shard variables are set; looked for JOB_COMPLETION_INDEX .*CI_NODE_TOTAL/)
  })

  it('exits 2 with one line for an index out of range or a --shards that disagrees', async () => {
    const kernel = recordingKernel().kernel
    const out = await twofold(['check', 'harbour.md', '--shard', 'auto', '--shards', '2'], ws.dir, { kernel, env: { JOB_COMPLETION_INDEX: '2' } })
    expect(out.code).toBe(2)
    expect(out.stderr).toMatch(/^twofold: --shard auto: JOB_COMPLETION_INDEX=2 is out of range for 2 shards \(0\.\.1\)[^\n]*\n$/)
    const disagree = await twofold(['check', 'harbour.md', '--shard', 'auto', '--shards', '4'], ws.dir, { kernel, env: { CI_NODE_INDEX: '1', CI_NODE_TOTAL: '3' } })
    expect(disagree).toEqual({ code: 2, stdout: '', stderr: "twofold: --shards 4 disagrees with the parallel CI job's 3 shards (CI_NODE_INDEX=1)\n" })
  })

  it('refuses --shards without --shard auto, and a malformed --shards', async () => {
    const kernel = recordingKernel().kernel
    expect(await twofold(['check', 'harbour.md', '--shards', '3'], ws.dir, { kernel })).toEqual({ code: 2, stdout: '', stderr: 'twofold: --shards is only used with --shard auto\n' })
    expect((await twofold(['check', 'harbour.md', '--shard', '1/3', '--shards', '3'], ws.dir, { kernel })).stderr).toBe('twofold: --shards is only used with --shard auto (--shard 1/3 names its count)\n')
    expect((await twofold(['check', 'harbour.md', '--shard', 'auto', '--shards', '0'], ws.dir, { kernel, env: { JOB_COMPLETION_INDEX: '0' } })).stderr).toBe('twofold: --shards takes a whole number of shards, at least 1, not "0"\n')
  })
})

describe('--workers', () => {
  it('passes the number of workers to the kernel', async () => {
    const { kernel, seen } = recordingKernel()
    expect((await twofold(['check', 'harbour.md', '--workers', '4'], ws.dir, { kernel })).code).toBe(0)
    expect(seen.options?.workers).toBe(4)
  })

  it('defaults to the number of cores', async () => {
    const { kernel, seen } = recordingKernel()
    expect((await twofold(['check', 'harbour.md'], ws.dir, { kernel })).code).toBe(0)
    expect(seen.options?.workers).toBe(availableParallelism())
  })

  it.each(['0', '257', 'many', '2.5'])('refuses --workers %s with one line', async (n) => {
    const ran = await twofold(['check', 'harbour.md', '--workers', n], ws.dir, { kernel: recordingKernel().kernel })
    expect(ran).toEqual({ code: 2, stdout: '', stderr: `twofold: --workers takes a whole number from 1 to 256, not "${n}"\n` })
  })
})

describe('a notebook on standard input', () => {
  it('reads the notebook from stdin for `-` and names it <stdin>', async () => {
    const { kernel, seen } = recordingKernel()
    const ran = await twofold(['check', '-', '--json'], ws.dir, { kernel, stdin: harbourText + '\nviolated\n' })
    expect(seen.text).toBe(harbourText + '\nviolated\n')
    expect(JSON.parse(ran.stdout).notebook.path).toBe('<stdin>')
    expect(ran.code).toBe(1)
  })

  it('records the text read from stdin, hashed like a file', async () => {
    const ran = await twofold(['check', '-', '--record', 'r.json'], ws.dir, { kernel: recordingKernel().kernel, stdin: harbourText })
    expect(ran.code).toBe(0)
    const fromFile = await twofold(['check', 'harbour.md', '--record', 'f.json'], ws.dir, { kernel: recordingKernel().kernel })
    expect(fromFile.code).toBe(0)
    const read = async (f: string) => await parseRecord(readFileSync(join(ws.dir, f), 'utf8'))
    expect((await read('r.json')).notebook.sha256).toBe((await read('f.json')).notebook.sha256)
  })
})

describe('--quiet', () => {
  it('prints nothing and answers with the exit code alone', async () => {
    const kernel = recordingKernel().kernel
    expect(await twofold(['check', 'harbour.md', '--quiet'], ws.dir, { kernel, tty: true })).toEqual({ code: 0, stdout: '', stderr: '' })
    ws.write('harbour.md', harbourText + '\nviolated\n')
    expect(await twofold(['check', 'harbour.md', '-q', '--format', 'sarif'], ws.dir, { kernel })).toEqual({ code: 1, stdout: '', stderr: '' })
  })

  it('still writes the record and the report file', async () => {
    const ran = await twofold(['check', 'harbour.md', '--quiet', '--record', 'r.json', '--output', 'report.xml', '--format', 'junit'], ws.dir, { kernel: recordingKernel().kernel })
    expect(ran).toEqual({ code: 0, stdout: '', stderr: '' })
    expect(readFileSync(join(ws.dir, 'report.xml'), 'utf8')).toMatch(/^<\?xml /)
    expect((await parseRecord(readFileSync(join(ws.dir, 'r.json'), 'utf8'))).checks).toHaveLength(8)
  })
})

describe('colour in the table', () => {
  const ESC = '\x1b['
  const run = (flags: string[], options: { stdoutTTY?: boolean; env?: Record<string, string> }) =>
    twofold(['check', 'harbour.md', ...flags], ws.dir, { kernel: recordingKernel().kernel, ...options })

  it('colours verdicts on a terminal, keeping the columns aligned', async () => {
    const plain = await run([], { stdoutTTY: false })
    const coloured = await run([], { stdoutTTY: true })
    expect(plain.stdout).not.toContain(ESC)
    expect(coloured.stdout).toContain(`${ESC}32mholds${ESC}0m`)
    // Removing the escape codes must give back the plain table exactly.
    expect(coloured.stdout.replace(/\x1b\[[0-9;]*m/g, '')).toBe(plain.stdout)
  })

  it('respects NO_COLOR unless --color asks for colour', async () => {
    expect((await run([], { stdoutTTY: true, env: { NO_COLOR: '1' } })).stdout).not.toContain(ESC)
    // no-color.org: an empty NO_COLOR does not turn colour off.
    expect((await run([], { stdoutTTY: true, env: { NO_COLOR: '' } })).stdout).toContain(ESC)
    expect((await run(['--color'], { stdoutTTY: false, env: { NO_COLOR: '1' } })).stdout).toContain(ESC)
    expect((await run(['--color=always'], { stdoutTTY: false })).stdout).toContain(ESC)
  })

  it('never colours with --no-color or --color=never, nor in JSON', async () => {
    expect((await run(['--no-color'], { stdoutTTY: true })).stdout).not.toContain(ESC)
    expect((await run(['--color=never'], { stdoutTTY: true })).stdout).not.toContain(ESC)
    expect((await run(['--json', '--color'], { stdoutTTY: true })).stdout).not.toContain(ESC)
  })

  it('keeps colour out of a report file, even when the table on stdout is coloured', async () => {
    const ran = await run(['--color', '--output', 'table.txt'], {})
    expect(ran.stdout).toContain(ESC)
    const file = readFileSync(join(ws.dir, 'table.txt'), 'utf8')
    expect(file).not.toContain(ESC)
    expect(file).toBe(ran.stdout.replace(/\x1b\[[0-9;]*m/g, '').replace('report (table) written to table.txt\n', ''))
  })

  it('refuses an unknown --color value with one line', async () => {
    expect(await run(['--color=sometimes'], {})).toEqual({ code: 2, stdout: '', stderr: 'twofold: --color takes always, never or auto (as --color=WHEN), not "sometimes"\n' })
  })
})

describe('--output', () => {
  it('writes the report to the file and shows the table on stdout', async () => {
    const kernel = recordingKernel().kernel
    const ran = await twofold(['check', 'harbour.md', '--format', 'sarif', '--output', 'out.sarif'], ws.dir, { kernel })
    expect(ran.code).toBe(0)
    const direct = await twofold(['check', 'harbour.md', '--format', 'sarif'], ws.dir, { kernel })
    expect(readFileSync(join(ws.dir, 'out.sarif'), 'utf8')).toBe(direct.stdout)
    expect(ran.stdout).toMatch(/^property +instance/)
    expect(ran.stdout.endsWith('report (sarif) written to out.sarif\n')).toBe(true)
    expect(readdirSync(ws.dir).filter((f) => f.endsWith('.tmp'))).toEqual([])
  })

  it('refuses a report file that is the notebook, or links to it, and leaves the notebook as it was', async () => {
    const kernel = recordingKernel().kernel
    const same = await twofold(['check', 'harbour.md', '--format', 'junit', '--output', './harbour.md'], ws.dir, { kernel })
    expect(same).toEqual({ code: 2, stdout: '', stderr: 'twofold: the report ./harbour.md would overwrite the input harbour.md; choose another file for --output\n' })
    symlinkSync(join(ws.dir, 'harbour.md'), join(ws.dir, 'link.xml'))
    const linked = await twofold(['check', 'harbour.md', '--format', 'junit', '--output', 'link.xml'], ws.dir, { kernel })
    expect(linked.code).toBe(2)
    expect(readFileSync(join(ws.dir, 'harbour.md'), 'utf8')).toBe(harbourText)
  })

  it('refuses a report file that is also the record', async () => {
    const ran = await twofold(['check', 'harbour.md', '--output', 'r.json', '--record', 'r.json'], ws.dir, { kernel: recordingKernel().kernel })
    expect(ran).toEqual({ code: 2, stdout: '', stderr: 'twofold: --output r.json is also the --record file; give the report and the record different files\n' })
  })

  it('exits 2 with one line when the report cannot be written', async () => {
    const ran = await twofold(['check', 'harbour.md', '--output', 'no/such/dir/out.json', '--json'], ws.dir, { kernel: recordingKernel().kernel })
    expect(ran.code).toBe(2)
    expect(ran.stderr).toBe('twofold: cannot write report no/such/dir/out.json: no such file\n')
  })
})
