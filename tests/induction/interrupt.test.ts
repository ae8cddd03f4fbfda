// Stop and Ctrl-C interrupt the solver (issue 15): a proof stopped while Z3 works on a question
// ends inconclusive with the reason, never holds, and a command line interrupted by SIGINT prints
// what finished and exits with 130 instead of hanging. The long proof is one the solver cannot
// settle in minutes: cubes of integers in 1..4000 with x^3 + y^3 = z^3 (none exist, Euler's case
// n = 3 of Fermat's theorem, a fact recalled from memory that no assertion relies on: the tests only
// need the solver to keep working until it is stopped).
import { spawn } from 'node:child_process'
import { EventEmitter } from 'node:events'
import { existsSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { afterAll, describe, expect, test } from 'vitest'
import { proveInduction } from '../../kernels/induction/prove'
import { loadSolver } from '../../kernels/induction/solver'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { canonicalJsonPretty } from '../../kernels/base/canonical'
import { buildRecord } from '../../kernels/record/record'
import { planRows, runNotebook, runPlannedRow } from '../../kernels/run'
import { main } from '../../src/cli/main'
import { workspace } from '../cli/harness'
import { LEDGER } from './fixtures'

afterAll(async () => { await (await loadSolver()).close() })

function ledgerModel() {
  const model = analyzeNotebook(LEDGER)
  expect(model.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
  return model
}

/** A stop flag that turns true at the `at`-th poll. The solver loop polls only while a question runs. */
function stopAtPoll(at: number) {
  let polls = 0
  return { shouldStop: () => ++polls >= at, polls: () => polls }
}

describe('stopping a proof', () => {
  test('a stop while the solver works on a question interrupts it: unknown with the reason', async () => {
    const model = ledgerModel()
    // Poll 1 is before the first question; polls 2 and on come from the timer while the solver runs.
    const stop = stopAtPoll(3)
    const waits: boolean[] = []
    const proof = await proveInduction(model.protocols[0], model.checks[0].properties, 1, [], { shouldStop: stop.shouldStop, onWait: (w) => waits.push(w) })
    expect(proof.outcome).toEqual({ kind: 'unknown', reason: 'the proof was stopped before the solver finished' })
    // The stop came during the first question (the base), which then ended: one wait, closed.
    expect(stop.polls()).toBeGreaterThanOrEqual(3)
    expect(waits).toEqual([true, false])
  }, 120_000)

  test('the row of a stopped proof is inconclusive, never holds, and says it was stopped', async () => {
    const model = ledgerModel()
    const [plan] = planRows(model)
    const row = await runPlannedRow(model, plan, stopAtPoll(3))
    expect(row.method).toBe('induction')
    expect(row.verdict).toBe('inconclusive')
    expect(row.complete).toBe(false)
    expect(row.note).toBe('the proof was stopped before the solver finished')
  }, 120_000)

  test('the solver answers again after an interrupted question', async () => {
    // The strengthened harbour lanterns are inductive (prove.test.ts); an interrupt must not poison the next proof.
    const model = ledgerModel()
    await proveInduction(model.protocols[0], model.checks[0].properties, 1, [], stopAtPoll(3))
    const { inductionModel, lanternsNotebook, CALM, FRESH } = await import('./fixtures')
    const lanterns = inductionModel(lanternsNotebook([CALM, FRESH], ['check lanterns: calm, fresh at N = 2']))
    const again = await proveInduction(lanterns.protocols[0], lanterns.checks[0].properties, 2, [2])
    expect(again.outcome.kind).toBe('holds')
  }, 120_000)
})

describe('Ctrl-C on the command line', () => {
  test('in-process: SIGINT while the solver works prints the stopped row, writes no record and exits 130', async () => {
    const ws = workspace({ 'ledger.md': LEDGER })
    try {
      const signals = new EventEmitter()
      let stdout = '', stderr = ''
      const ran = main(['check', 'ledger.md', '--record', 'ledger.json'], {
        stdout: (s) => void (stdout += s), stderr: (s) => void (stderr += s),
        stderrIsTTY: false, cwd: ws.dir, env: {}, stdin: [''], signals,
      })
      // The listener is there only while the run waits on the solver: Ctrl-C then, as a user would.
      while (signals.listenerCount('SIGINT') === 0) await new Promise((ok) => setTimeout(ok, 50))
      signals.emit('SIGINT')
      expect(await ran).toBe(130)
      expect(signals.listenerCount('SIGINT')).toBe(0)
      expect(stdout).toMatch(/cubes +G_1 \(cutoff\) +- +inconclusive by induction/)
      expect(stdout).toContain('the proof was stopped before the solver finished')
      expect(stdout).not.toMatch(/\bholds\b/)
      expect(stderr).toContain('twofold: interrupted by Ctrl-C: the report shows what finished; no record was written to ledger.json')
      expect(existsSync(join(ws.dir, 'ledger.json'))).toBe(false)
    } finally {
      ws.remove()
    }
  }, 120_000)

  test('in-process: SIGINT while a replay\'s proof runs compares nothing, says so and exits 130', async () => {
    // A record of the ledger made from a run stopped by hand (its row inconclusive): replaying it
    // runs the unsettleable proof again, which Ctrl-C then stops.
    const model = ledgerModel()
    const report = await runNotebook(LEDGER, 'ledger.md', stopAtPoll(3))
    expect(report.checks.map((r) => r.verdict)).toEqual(['inconclusive'])
    const record = await buildRecord(report, LEDGER, model, {})
    const ws = workspace({ 'ledger.json': canonicalJsonPretty(record) + '\n' })
    try {
      const signals = new EventEmitter()
      let stdout = '', stderr = ''
      const ran = main(['replay', 'ledger.json'], {
        stdout: (s) => void (stdout += s), stderr: (s) => void (stderr += s),
        stderrIsTTY: false, cwd: ws.dir, env: {}, stdin: [''], signals,
      })
      let ended = false
      void ran.then(() => { ended = true })
      while (signals.listenerCount('SIGINT') === 0 && !ended) await new Promise((ok) => setTimeout(ok, 50))
      expect(stderr).toBe('')
      signals.emit('SIGINT')
      expect(await ran).toBe(130)
      expect(signals.listenerCount('SIGINT')).toBe(0)
      expect(stderr).toContain('twofold: stopping: nothing will be compared (Ctrl-C again ends at once)')
      expect(stderr).toContain('twofold: replay interrupted by Ctrl-C: nothing was compared (a replay that did not finish says nothing about ledger.json)')
      expect(stdout).toBe('')
    } finally {
      ws.remove()
    }
  }, 120_000)

  test('no SIGINT listener is left behind by a run that was not interrupted', async () => {
    const { lanternsNotebook, CALM, FRESH } = await import('./fixtures')
    const ws = workspace({ 'l.md': lanternsNotebook([CALM, FRESH], ['check lanterns: calm, fresh at N = 2 by induction']) })
    try {
      const signals = new EventEmitter()
      let stdout = ''
      const code = await main(['check', 'l.md'], { stdout: (s) => void (stdout += s), stderr: () => {}, stderrIsTTY: false, cwd: ws.dir, env: {}, stdin: [''], signals })
      expect(code).toBe(0)
      expect(stdout).toContain('2 rows: 2 hold')
      expect(signals.listenerCount('SIGINT')).toBe(0)
    } finally {
      ws.remove()
    }
  }, 120_000)

  test('a real process: SIGINT during the proof ends it promptly with 130 and the stopped row', async () => {
    const ws = workspace({ 'ledger.md': LEDGER })
    const bin = new URL('../../bin/twofold.js', import.meta.url).pathname
    try {
      const child = spawn(process.execPath, [bin, 'check', 'ledger.md'], { cwd: ws.dir, stdio: ['ignore', 'pipe', 'pipe'] })
      let stdout = '', stderr = ''
      child.stdout.on('data', (d) => { stdout += d })
      child.stderr.on('data', (d) => { stderr += d })
      const exited = new Promise<{ code: number | null; signal: string | null }>((ok) => child.on('exit', (code, signal) => ok({ code, signal })))
      // Starting tsx and loading Z3 take about a second of CPU; after 4 s of CPU (all threads,
      // /proc/PID/stat utime + stime in clock ticks of 1/100 s) the only work left is the solver's.
      const cpu = () => { const f = readFileSync(`/proc/${child.pid}/stat`, 'utf8').split(') ')[1].split(' '); return (Number(f[11]) + Number(f[12])) / 100 }
      while (cpu() < 4) await new Promise((ok) => setTimeout(ok, 100))
      child.kill('SIGINT')
      // Promptly: the test's timeout is the bound; without the interrupt the solver runs for minutes.
      const end = await exited
      expect(end).toEqual({ code: 130, signal: null })
      expect(stdout).toContain('inconclusive by induction')
      expect(stdout).toContain('the proof was stopped before the solver finished')
      expect(stderr).toContain('twofold: interrupted by Ctrl-C')
    } finally {
      ws.remove()
    }
  }, 120_000)

  test('a real process: SIGINT during exploration ends it at once (no listener holds it up)', async () => {
    // Depot counters under asynchronous timing: 2048 x 2048 reachable states, far more than the
    // few seconds before the signal can explore.
    const depots = '# Depot counters\n\n```protocol\nprotocol depot {\n  timing asynchronous\n  message tick\n  state x: 0..2047 = 0\n  step { x := (x + 1) % 2048 }\n}\n```\n\n```property\nproperty small = forall p: always p.x < 2048\n```\n\n```check\ncheck depot: small at N = 2\n```\n'
    const ws = workspace({ 'depots.md': depots })
    const bin = new URL('../../bin/twofold.js', import.meta.url).pathname
    try {
      const child = spawn(process.execPath, [bin, 'check', 'depots.md'], { cwd: ws.dir, stdio: ['ignore', 'pipe', 'pipe'] })
      let stdout = ''
      child.stdout.on('data', (d) => { stdout += d })
      const exited = new Promise<{ code: number | null; signal: string | null }>((ok) => child.on('exit', (code, signal) => ok({ code, signal })))
      const cpu = () => { const f = readFileSync(`/proc/${child.pid}/stat`, 'utf8').split(') ')[1].split(' '); return (Number(f[11]) + Number(f[12])) / 100 }
      while (cpu() < 3) await new Promise((ok) => setTimeout(ok, 100))
      child.kill('SIGINT')
      // Ended by the signal itself (a shell reports 130), with no report.
      expect(await exited).toEqual({ code: null, signal: 'SIGINT' })
      expect(stdout).toBe('')
    } finally {
      ws.remove()
    }
  }, 120_000)
})
