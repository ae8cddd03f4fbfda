// The README's batch-system examples, run as written: the Kubernetes manifests' commands, the
// Slurm batch scripts and the GitLab CI jobs' script lines are taken from README.md and run by
// `sh` in a folder laid out like the repository, with the variables each scheduler sets for each
// copy (Kubernetes: JOB_COMPLETION_INDEX 0..completions-1; Slurm `--array=1-3`: SLURM_ARRAY_TASK_ID
// 1..3 with MIN 1, MAX 3, STEP 1, COUNT 3 and SLURM_SUBMIT_DIR; GitLab `parallel: 3`: CI_NODE_INDEX
// 1..3 and CI_NODE_TOTAL 3). `npx twofold` runs bin/twofold.js through a stand-in `npx` on PATH.
// What cannot run here is left out and named: `kubectl` and `sbatch` themselves, and `npm ci`
// (the dependencies are installed already). Last, a notebook piped to a real process.
import { spawnSync } from 'node:child_process'
import { chmodSync, existsSync, mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { compareRecords, parseRecord } from '../../kernels/record/replay'
import { twofold, workspace } from './harness'

const repo = fileURLToPath(new URL('../..', import.meta.url))
const readme = readFileSync(join(repo, 'README.md'), 'utf8')
const NOTEBOOK = 'notebooks/cutoff-applies.md'

/** The text of README section `### title`, up to the next heading of level 2 or 3. */
function section(title: string): string {
  const start = readme.indexOf(`\n### ${title}\n`)
  expect(start).toBeGreaterThan(0)
  const rest = readme.slice(start + 1)
  const end = rest.slice(4).search(/\n##+ /)
  return end < 0 ? rest : rest.slice(0, end + 4)
}

const blocks = (text: string) => [...text.matchAll(/```\w*\n([\s\S]*?)```/g)].map((m) => m[1])

/** The fenced block of `text` whose comment line names `file` (`# file` or `# file: ...`). */
function block(text: string, file: string): string {
  const found = blocks(text).find((body) => body.split('\n').some((l) => l === `# ${file}` || l.startsWith(`# ${file}:`)))
  expect(found, `README block ${file}`).toBeDefined()
  return found!
}

let ws: ReturnType<typeof workspace>
let app: string
let bin: string
beforeAll(() => {
  ws = workspace()
  app = join(ws.dir, 'app')
  bin = join(ws.dir, 'bin')
  mkdirSync(join(app, 'notebooks'), { recursive: true })
  writeFileSync(join(app, NOTEBOOK), readFileSync(join(repo, NOTEBOOK), 'utf8'))
  mkdirSync(bin)
  const npx = join(bin, 'npx')
  writeFileSync(npx, `#!/bin/sh\n[ "$1" = twofold ] || { echo "npx stand-in: only twofold" >&2; exit 127; }\nshift\nexec "${process.execPath}" "${join(repo, 'bin', 'twofold.js')}" "$@"\n`)
  chmodSync(npx, 0o755)
})
afterAll(() => ws.remove())

/** Runs `script` with sh in `cwd`, seeing only PATH (with the npx stand-in first), HOME and `vars`. */
function sh(script: string, cwd: string, vars: Record<string, string> = {}, file?: string) {
  const env = { PATH: `${bin}:${process.env.PATH ?? ''}`, HOME: process.env.HOME ?? ws.dir, ...vars }
  const ran = spawnSync('sh', file ? [file] : ['-c', script], { cwd, env, encoding: 'utf8' })
  return { status: ran.status, stdout: ran.stdout, stderr: ran.stderr }
}

/** Oracle: the record of an unsharded run, made in-process; the merged record must equal it but for times. */
async function unshardedRecord(): Promise<Awaited<ReturnType<typeof parseRecord>>> {
  const ran = await twofold(['check', NOTEBOOK, '--record', 'whole.json'], app)
  expect(ran.code).toBe(0)
  return await parseRecord(readFileSync(join(app, 'whole.json'), 'utf8'))
}

describe('README: Kubernetes', () => {
  it('runs the Indexed Job\'s shards and the merge Job, whose record replays clean', async () => {
    const text = section('Kubernetes')
    const shards = block(text, 'twofold-shards.yaml')
    const merge = block(text, 'twofold-merge.yaml')
    const command = (manifest: string) => {
      const [shell, flag, script] = JSON.parse(/^\s+command: (\[.*\])$/m.exec(manifest)![1]) as string[]
      expect([shell, flag]).toEqual(['sh', '-c'])
      expect(/workingDir: \/app$/m.test(manifest)).toBe(true)
      // The volume mounted at /records is a folder of the test.
      return script.replaceAll('/records', join(ws.dir, 'k8s-records'))
    }
    const completions = Number(/^\s+completions: (\d+)$/m.exec(shards)![1])
    const declared = /- name: TWOFOLD_SHARDS\n\s+value: "(\d+)"/.exec(shards)![1]
    expect(Number(declared)).toBe(completions)
    mkdirSync(join(ws.dir, 'k8s-records'))
    for (let index = 0; index < completions; index++) {
      const ran = sh(command(shards), app, { JOB_COMPLETION_INDEX: String(index), TWOFOLD_SHARDS: declared })
      expect(ran.stderr).toBe('')
      expect(ran.status).toBe(0)
    }
    expect(readdirSync(join(ws.dir, 'k8s-records')).sort()).toEqual(['shard-0.json', 'shard-1.json', 'shard-2.json'])
    const merged = sh(command(merge), app)
    expect(merged.stderr).toBe('')
    expect(merged.status).toBe(0)
    expect(merged.stdout).toMatch(/every compared field matches the record/)
    expect(compareRecords(await unshardedRecord(), await parseRecord(readFileSync(join(ws.dir, 'k8s-records', 'merged.json'), 'utf8')))).toEqual([])
  })
})

describe('README: Slurm', () => {
  it('runs the array script once per task id and the merge script, whose record replays clean', async () => {
    const text = section('Slurm')
    writeFileSync(join(app, 'shards.sbatch'), block(text, 'shards.sbatch'))
    writeFileSync(join(app, 'merge.sbatch'), block(text, 'merge.sbatch'))
    const submit = blocks(text).find((b) => b.includes('sbatch --parsable'))!
    expect(submit).toMatch(/--dependency=afterany:"\$shards" merge\.sbatch/)
    expect(submit.split('\n')[0]).toBe('mkdir -p records')
    expect(sh('mkdir -p records', app).status).toBe(0)
    const [, min, max] = /^#SBATCH --array=(\d+)-(\d+)$/m.exec(block(text, 'shards.sbatch'))!.map(Number)
    const count = max - min + 1
    for (let id = min; id <= max; id++) {
      const vars = { SLURM_SUBMIT_DIR: app, SLURM_ARRAY_TASK_ID: String(id), SLURM_ARRAY_TASK_MIN: String(min), SLURM_ARRAY_TASK_MAX: String(max), SLURM_ARRAY_TASK_STEP: '1', SLURM_ARRAY_TASK_COUNT: String(count) }
      // Slurm starts the script in its own working directory; the script must cd to the submit folder.
      const ran = sh('', ws.dir, vars, join(app, 'shards.sbatch'))
      expect(ran.stderr).toBe('')
      expect(ran.status).toBe(0)
    }
    const merged = sh('', ws.dir, { SLURM_SUBMIT_DIR: app }, join(app, 'merge.sbatch'))
    expect(merged.stderr).toBe('')
    expect(merged.status).toBe(0)
    expect(merged.stdout).toMatch(/every compared field matches the record/)
    expect(compareRecords(await unshardedRecord(), await parseRecord(readFileSync(join(app, 'records', 'merged.json'), 'utf8')))).toEqual([])
  })
})

describe('README: CI matrix', () => {
  /** The script lines of job `name` in the pipeline, and its `parallel:` count. */
  function job(pipeline: string, name: string): { parallel: number; script: string[] } {
    const start = pipeline.indexOf(`\n${name}:\n`)
    expect(start).toBeGreaterThanOrEqual(0)
    const body = pipeline.slice(start + name.length + 3).split(/\n(?=\S)/)[0]
    const lines = body.split('\n')
    const from = lines.indexOf('  script:') + 1
    const script: string[] = []
    for (let i = from; i < lines.length && lines[i].startsWith('    - '); i++) script.push(lines[i].slice(6))
    return { parallel: Number(/^ {2}parallel: (\d+)$/m.exec(body)?.[1] ?? 1), script }
  }

  it('runs the parallel check job once per node and the merge job, whose record replays clean', async () => {
    const pipeline = block(section('CI matrix'), '.gitlab-ci.yml')
    const check = job(pipeline, 'check')
    const merge = job(pipeline, 'merge')
    expect(check.script[0]).toBe('npm ci')
    expect(merge.script[0]).toBe('npm ci')
    const ci = join(app, 'ci')
    mkdirSync(ci)
    mkdirSync(join(ci, 'notebooks'))
    writeFileSync(join(ci, NOTEBOOK), readFileSync(join(repo, NOTEBOOK), 'utf8'))
    for (let node = 1; node <= check.parallel; node++) {
      for (const line of check.script.slice(1)) {
        const ran = sh(line, ci, { CI: 'true', CI_NODE_INDEX: String(node), CI_NODE_TOTAL: String(check.parallel) })
        expect(ran.stderr).toBe('')
        expect(ran.status).toBe(0)
      }
    }
    expect(check.parallel).toBe(3)
    for (let node = 1; node <= 3; node++) expect(readFileSync(join(ci, `junit-${node}.xml`), 'utf8')).toMatch(/^<\?xml version="1\.0" encoding="UTF-8"\?>\n<testsuites /)
    let last = { status: 0 as number | null, stdout: '', stderr: '' }
    for (const line of merge.script.slice(1)) {
      last = sh(line, ci, { CI: 'true' })
      expect(last.stderr).toBe('')
      expect(last.status).toBe(0)
    }
    expect(last.stdout).toMatch(/every compared field matches the record/)
    expect(existsSync(join(ci, 'merged.json'))).toBe(true)
    const whole = await twofold(['check', NOTEBOOK, '--record', 'whole.json'], ci)
    expect(whole.code).toBe(0)
    expect(compareRecords(await parseRecord(readFileSync(join(ci, 'whole.json'), 'utf8')), await parseRecord(readFileSync(join(ci, 'merged.json'), 'utf8')))).toEqual([])
  })
})

describe('a real process reading standard input', () => {
  it('checks a notebook piped to `twofold check -`, as the README shows', () => {
    expect(readme).toContain('cat notebooks/harbour-cranes.md | npx twofold check -')
    const ran = sh(`cat ${NOTEBOOK} | npx twofold check - --format junit`, app)
    expect(ran.stderr).toBe('')
    expect(ran.status).toBe(0)
    expect(ran.stdout).toContain('<testsuite name="&lt;stdin&gt;"')
  })
})
