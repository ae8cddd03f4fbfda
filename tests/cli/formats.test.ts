// `twofold check --format junit|sarif`: the documents validate against their schemas (the JUnit
// XML against tests/cli/junit.xsd with libxml2's validator, the SARIF log against a transcription
// of the published SARIF 2.1.0 schema with Ajv), and their content agrees with the JSON report of
// the same run and with the lines found by scanning the fixture text.
import { readFileSync } from 'node:fs'
import Ajv from 'ajv'
import addFormats from 'ajv-formats'
import type * as Sarif from 'sarif'
import { validateXML } from 'xmllint-wasm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Report } from '../../kernels/result'
import { junitReport } from '../../src/cli/junit'
import { sarifReport } from '../../src/cli/sarif'
import { harbourModel, report, row } from '../record/synthetic'
import { twofold, workspace } from './harness'

const xsd = readFileSync(new URL('./junit.xsd', import.meta.url), 'utf8')
const sarifSchema = JSON.parse(readFileSync(new URL('./sarif-2.1.0-subset.schema.json', import.meta.url), 'utf8'))
const ajv = new Ajv({ allErrors: true, strict: false })
addFormats(ajv)
const validateSarif = ajv.compile(sarifSchema)

async function junitErrors(xml: string): Promise<string[]> {
  const result = await validateXML({ xml: { fileName: 'report.xml', contents: xml }, schema: { fileName: 'junit.xsd', contents: xsd } })
  return result.errors.map((e) => e.message)
}

/** Lamps that blink to each other in lock-step (the fixture of end-to-end.test.ts). */
const lamps = (step: string) =>
  [
    '# Breakwater lamps',
    '',
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
    `    ${step}`,
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

const fixtures = {
  'mixed.md': lamps('lit := not lit') + '```check\ncheck lamps: steady, dark with cap in 1..2\ncheck lamps: steady within 2 states\n```\n',
  'refused.md': lamps('lit := some r: seen[r] > 0') + '```check\ncheck lamps: dark\n```\n',
  'broken.md': lamps('lit := not lamp') + '```check\ncheck lamps: dark\n```\n',
}
const lineOf = (text: string, needle: string) => text.split('\n').findIndex((l) => l.includes(needle)) + 1

let ws: ReturnType<typeof workspace>
beforeAll(() => {
  ws = workspace(fixtures)
})
afterAll(() => ws.remove())

const jsonReport = async (file: string) => JSON.parse((await twofold(['check', file, '--json'], ws.dir)).stdout) as Report

describe('--format junit', () => {
  it.each(Object.keys(fixtures))('%s: validates against the common JUnit schema', async (file) => {
    const ran = await twofold(['check', file, '--format', 'junit'], ws.dir)
    expect(ran.stdout.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<testsuites ')).toBe(true)
    expect(await junitErrors(ran.stdout)).toEqual([])
  })

  it('has one test case per row: a failure per violated row, skipped per inconclusive row, and the same exit code', async () => {
    const json = await jsonReport('mixed.md')
    const ran = await twofold(['check', 'mixed.md', '--format', 'junit'], ws.dir)
    // Oracle: the JSON report of the same run.
    const tally = (v: string) => json.checks.filter((r) => r.verdict === v).length
    expect(ran.stdout.match(/<testcase /g)).toHaveLength(json.checks.length)
    expect(ran.stdout.match(/<failure /g)).toHaveLength(tally('violated'))
    expect(ran.stdout.match(/<skipped /g)).toHaveLength(tally('inconclusive'))
    expect(ran.stdout).toContain(`tests="${json.checks.length}" failures="${tally('violated')}" errors="0" skipped="${tally('inconclusive')}"`)
    expect(ran.stdout).toContain('<testcase name="check 1 lamps: dark on G_1 (cutoff) with cap=1" classname="mixed.lamps"')
    expect(ran.stdout).toMatch(/<failure type="violated" message="`dark` fails after 1 tick[^"]*">counterexample \(trace, 1 tick; p=#1\)/)
    expect(ran.code).toBe(1)
  })

  it('gives the cutoff reasons of a refused check as the skipped text, with notebook lines', async () => {
    const ran = await twofold(['check', 'refused.md', '--format', 'junit'], ws.dir)
    expect(ran.stdout).toMatch(/<skipped type="inconclusive" message="[^"]+">cutoff refused:\nrefused\.md:\d+:\d+: [\w -]+ \(rule 5\): /)
  })

  it('reports notebook errors as one test case in error', async () => {
    const ran = await twofold(['check', 'broken.md', '--format', 'junit'], ws.dir)
    expect(ran.code).toBe(2)
    expect(ran.stdout).toMatch(/<testcase name="notebook"[^>]*>\n {6}<error type="notebook-error" message="the notebook has \d+ errors?; nothing was checked">broken\.md:\d+:\d+: /)
  })

  it('writes an error element for a row that could not be run, and escapes markup and control characters', async () => {
    const r = report((i) => i < 2)
    r.checks[0] = row(0, { verdict: 'error', note: 'the <instance> & "its" limits\u0001 failed' })
    const xml = junitReport(r, '0.1.0')
    expect(xml).toContain('<error type="error" message="the &lt;instance&gt; &amp; &quot;its&quot; limits\uFFFD failed">')
    expect(await junitErrors(xml)).toEqual([])
  })

  it('the schema refuses what reporters cannot read (the validator can fail)', async () => {
    const good = junitReport(report(), '0.1.0')
    expect(await junitErrors(good.replace('failures="0"', 'failures="none"'))).not.toEqual([])
    expect(await junitErrors(good.replace(/<testcase name="[^"]*"/, '<testcase'))).not.toEqual([])
    expect(await junitErrors(good.replace('<properties>', '<verdicts>').replace('</properties>', '</verdicts>'))).not.toEqual([])
  })
})

describe('--format sarif', () => {
  const sarif = async (file: string) => {
    const ran = await twofold(['check', file, '--format', 'sarif'], ws.dir)
    return { code: ran.code, log: JSON.parse(ran.stdout) as Sarif.Log }
  }

  it.each(Object.keys(fixtures))('%s: validates against the SARIF 2.1.0 schema', async (file) => {
    const { log } = await sarif(file)
    expect(validateSarif(log) ? [] : validateSarif.errors).toEqual([])
    expect(log.version).toBe('2.1.0')
  })

  it('has one result per row that does not hold, at the property and the check lines', async () => {
    const json = await jsonReport('mixed.md')
    const { log, code } = await sarif('mixed.md')
    const results = log.runs[0].results!
    // Oracle: the JSON report of the same run, and the lines found by scanning the fixture.
    expect(results.map((r) => r.properties!.row)).toEqual(json.checks.filter((r) => r.verdict !== 'holds').map((r) => r.row))
    expect(results.map((r) => r.ruleId)).toEqual(json.checks.filter((r) => r.verdict !== 'holds').map((r) => r.verdict))
    const text = fixtures['mixed.md']
    const dark = results.find((r) => r.properties!.verdict === 'violated')!
    expect(dark.level).toBe('error')
    expect(dark.locations!.map((l) => [l.physicalLocation!.artifactLocation!.uri, l.physicalLocation!.region!.startLine])).toEqual([
      ['mixed.md', lineOf(text, 'property dark')],
      ['mixed.md', lineOf(text, 'check lamps: steady, dark')],
    ])
    const limited = results.find((r) => r.properties!.verdict === 'inconclusive')!
    expect(limited.level).toBe('warning')
    expect(limited.locations![1].physicalLocation!.region!.startLine).toBe(lineOf(text, 'within 2 states'))
    expect(log.runs[0].invocations![0].exitCode).toBe(code)
  })

  it('gives the reasons a cutoff was refused as related locations', async () => {
    const json = await jsonReport('refused.md')
    const { log } = await sarif('refused.md')
    const [result] = log.runs[0].results!
    // Oracle: the reasons of the JSON report.
    expect(result.relatedLocations!.map((l) => [l.physicalLocation!.region!.startLine, l.physicalLocation!.region!.startColumn, l.message!.text])).toEqual(
      json.checks[0].cutoff.reasons.map((r) => [r.line, r.column, `cutoff ${r.name} (rule ${r.rule}): ${r.message}`]),
    )
    expect(result.relatedLocations!.some((l) => / \(rule 5\): /.test(l.message!.text!))).toBe(true)
  })

  it('reports each notebook error at its line and column', async () => {
    const json = await jsonReport('broken.md')
    const { log } = await sarif('broken.md')
    expect(log.runs[0].results!.map((r) => [r.ruleId, r.locations![0].physicalLocation!.region!.startLine])).toEqual(json.errors.map((e) => ['notebook-error', e.line]))
  })

  it('gives a row that could not be run level error, at the blocks\' lines when the model has no spans', () => {
    const r = report((i) => i >= 6)
    r.checks[0] = row(6, { verdict: 'error', note: 'the instance has too many processes' })
    const log = sarifReport(r, harbourModel, '0.1.0', 3)
    expect(validateSarif(log) ? [] : validateSarif.errors).toEqual([])
    const [result] = log.runs[0].results!
    expect([result.ruleId, result.level, result.message.text]).toEqual(['error', 'error', 'check 1 cranes: calm on G_2 (cutoff) with reach=3: error: the instance has too many processes'])
    // Oracle: the synthetic model's property block starts at line 14 and its check block at 19.
    expect(result.locations!.map((l) => l.physicalLocation!.region)).toEqual([{ startLine: 14 }, { startLine: 19 }])
    expect(log.runs[0].artifacts![0].location!.uri).toBe('notebooks/harbour.md')
  })

  it('the schema refuses a log a code host could not read (the validator can fail)', async () => {
    const { log } = await sarif('mixed.md')
    const broken = (edit: (l: Record<string, any>) => void) => {
      const copy = structuredClone(log) as Record<string, any>
      edit(copy)
      return validateSarif(copy)
    }
    expect(broken((l) => delete l.version)).toBe(false)
    expect(broken((l) => (l.runs[0].results[0].level = 'fatal'))).toBe(false)
    expect(broken((l) => (l.runs[0].results[0].locations[0].physicalLocation.region.startLine = 0))).toBe(false)
    expect(broken((l) => (l.runs[0].results[0].verdict = 'violated'))).toBe(false)
  })
})

describe('--format errors', () => {
  it('refuses an unknown format with one line naming the option', async () => {
    const ran = await twofold(['check', 'mixed.md', '--format', 'xml'], ws.dir)
    expect(ran).toEqual({ code: 2, stdout: '', stderr: 'twofold: --format takes table, json, junit or sarif, not "xml"\n' })
  })

  it('refuses --json with another --format', async () => {
    const ran = await twofold(['check', 'mixed.md', '--json', '--format', 'junit'], ws.dir)
    expect(ran.code).toBe(2)
    expect(ran.stderr).toBe('twofold: --json is short for --format json and disagrees with --format junit; give one of them\n')
  })
})
