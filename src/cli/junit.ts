// `--format junit`: the report as JUnit XML, the test-report shape CI systems (Jenkins, GitLab and
// others) read: one test case per row, a <failure> for a violated row with its counterexample, an
// <error> for a row that could not be run, <skipped> for an inconclusive one, and one test case
// holding the notebook's errors when nothing was checked. tests/cli/junit.xsd is the structure
// this follows.
import type { CheckRow, Report } from '../../kernels/result'
import { ruleLabel } from '../../kernels/symmetry/rules'
import { diagnosticLine, instanceLabel, renderCounterexample } from './table'

/** Characters XML 1.0 cannot carry at all (C0 controls but tab, newline, return; lone surrogates; U+FFFE/F). */
const NOT_XML = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g

/** `text` escaped for an XML attribute value or text node; characters XML cannot carry become U+FFFD. */
export function xmlEscape(text: string): string {
  return text
    .replace(NOT_XML, '\uFFFD')
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/\r/g, '&#13;')
}

/** The constants of a row as `a=1 b=2`, empty when it has none. */
function constantsText(row: CheckRow): string {
  return Object.entries(row.constants).map(([name, value]) => `${name}=${value}`).join(' ')
}

/**
 * A row's name for reports: the check (1-based, with its protocol), the property, the size and the
 * constants, e.g. `check 1 cranes: accurate on G_2 (cutoff) with delay=2 timeout=1`. Unique within
 * a report, since a row is one property at one size and one constant setting of one check.
 */
export function rowName(row: CheckRow): string {
  const size = row.processes < 1 ? '(no instance checked)' : `on ${instanceLabel(row)}`
  const constants = constantsText(row)
  return `check ${row.check + 1} ${row.protocol}: ${row.property} ${size}${constants ? ` with ${constants}` : ''}`
}

/** The cutoff's refusal reasons as `file:line:column: name (rule N): message` lines, as the table gives them. */
export function reasonLines(row: CheckRow, path: string): string[] {
  if (row.cutoff.applies) return []
  return row.cutoff.reasons.map((r) => diagnosticLine(path, r.line, r.column, `${ruleLabel(r.rule, r.name)}: ${r.message}`))
}

const seconds = (s: number) => (Number.isFinite(s) && s > 0 ? s : 0).toFixed(3)

function testcase(row: CheckRow, path: string, classname: string): string {
  const open = `    <testcase name="${xmlEscape(rowName(row))}" classname="${xmlEscape(classname)}" time="${seconds(row.seconds)}"`
  const reasons = reasonLines(row, path)
  const element = (tag: string, message: string, body: string[]) =>
    `      <${tag} type="${row.verdict}" message="${xmlEscape(message)}">${xmlEscape(body.join('\n'))}</${tag}>`
  let child: string | undefined
  if (row.verdict === 'violated') {
    const cx = row.counterexample
    const body = cx ? renderCounterexample(cx, row.assignment).map((l) => l.replace(/^ {2}/, '')) : []
    child = element('failure', cx?.message ?? row.note ?? `${row.property} is violated`, body)
  } else if (row.verdict === 'error') {
    child = element('error', row.note ?? 'the check could not be run', reasons)
  } else if (row.verdict === 'inconclusive') {
    const body = [...(reasons.length ? ['cutoff refused:', ...reasons] : []), ...(row.complete || row.processes < 1 ? [] : ['stopped before exploring every state'])]
    child = element('skipped', row.note ?? 'inconclusive', body)
  }
  return child === undefined ? `${open}/>` : `${open}>\n${child}\n    </testcase>`
}

/** The report as a JUnit XML document (UTF-8, ends with a newline). */
export function junitReport(report: Report, kernelVersion: string): string {
  const path = report.notebook.path
  // Reporters split `classname` at dots into package and class: keep the notebook's dots out of it.
  const suite = path.replace(/^.*[\\/]/, '').replace(/\.md$/i, '').replace(/\./g, '_')
  const rows = report.checks
  const count = (verdict: CheckRow['verdict']) => rows.filter((r) => r.verdict === verdict).length
  const hasErrors = report.errors.length > 0
  const tests = rows.length + (hasErrors ? 1 : 0)
  const failures = count('violated')
  const errors = count('error') + (hasErrors ? 1 : 0)
  const skipped = count('inconclusive')
  const time = seconds(rows.reduce((sum, r) => sum + (Number.isFinite(r.seconds) ? r.seconds : 0), 0))
  const totals = `tests="${tests}" failures="${failures}" errors="${errors}"`
  const cases = rows.map((row) => testcase(row, path, `${suite}.${row.protocol}`))
  if (hasErrors) {
    const lines = report.errors.map((e) => diagnosticLine(path, e.line, e.column, e.message))
    cases.unshift(
      `    <testcase name="notebook" classname="${xmlEscape(suite)}" time="0.000">\n` +
        `      <error type="notebook-error" message="${xmlEscape(`the notebook has ${report.errors.length} error${report.errors.length === 1 ? '' : 's'}; nothing was checked`)}">${xmlEscape(lines.join('\n'))}</error>\n` +
        '    </testcase>',
    )
  }
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    // The Jenkins lineage of the schema has no `skipped` on <testsuites>, only on <testsuite>.
    `<testsuites name="twofold" ${totals} time="${time}">`,
    `  <testsuite name="${xmlEscape(path)}" ${totals} skipped="${skipped}" time="${time}">`,
    '    <properties>',
    `      <property name="notebook.sha256" value="${xmlEscape(report.notebook.sha256)}"/>`,
    `      <property name="kernel.version" value="${xmlEscape(kernelVersion)}"/>`,
    '    </properties>',
    ...cases,
    '  </testsuite>',
    '</testsuites>',
    '',
  ].join('\n')
}
