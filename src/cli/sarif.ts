// `--format sarif`: the report as a SARIF 2.1.0 log (OASIS Static Analysis Results Interchange
// Format, Version 2.1.0, OASIS Standard, 2020), the format code hosts read to annotate files. One
// result per row that does not hold, located at the property's declaration and at the check line
// in the notebook, with the reasons a cutoff was refused as related locations; one result per
// notebook error when nothing was checked.
import { isAbsolute } from 'node:path'
import { pathToFileURL } from 'node:url'
import type * as Sarif from 'sarif'
import type { NotebookModel, Span } from '../../kernels/language/model'
import type { CheckRow, Report } from '../../kernels/result'
import { ruleLabel } from '../../kernels/symmetry/rules'
import { rowName } from './junit'
import { renderCounterexample } from './table'

/** The published identifier of the SARIF 2.1.0 schema (errata 01), as the standard gives it. */
export const SARIF_SCHEMA = 'https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json'

/** The rules of our results: one per way a row can fail to hold, and one for notebook errors. */
const RULES: Sarif.ReportingDescriptor[] = [
  { id: 'violated', name: 'PropertyViolated', shortDescription: { text: 'A property of the notebook is violated: the model reaches a counterexample.' }, defaultConfiguration: { level: 'error' } },
  { id: 'inconclusive', name: 'PropertyInconclusive', shortDescription: { text: 'A check did not decide its property (a state limit was hit, or the cutoff was refused without explicit sizes).' }, defaultConfiguration: { level: 'warning' } },
  { id: 'error', name: 'CheckError', shortDescription: { text: 'A check could not be run at all.' }, defaultConfiguration: { level: 'error' } },
  { id: 'notebook-error', name: 'NotebookError', shortDescription: { text: 'The notebook has an error (syntax, types, unknown names), so nothing was checked.' }, defaultConfiguration: { level: 'error' } },
]
const RULE_INDEX = new Map(RULES.map((r, i) => [r.id, i]))

/** The notebook's path as a URI reference: relative paths stay relative (to the checkout), absolute ones become file: URIs. */
export function artifactUri(path: string): string {
  if (isAbsolute(path)) return pathToFileURL(path).href
  return path.split(/[\\/]/).map(encodeURIComponent).join('/')
}

/** A SARIF region for a span: 1-based lines and columns, the end column being the one after the span. */
function region(span: Span | undefined, fallbackLine: number | undefined): Sarif.Region | undefined {
  if (span && span.line >= 1) {
    const startColumn = Math.max(1, span.column)
    const endLine = Math.max(span.line, span.endLine)
    const endColumn = endLine === span.line ? Math.max(startColumn, span.endColumn) : Math.max(1, span.endColumn)
    return { startLine: span.line, startColumn, endLine, endColumn }
  }
  return fallbackLine !== undefined && fallbackLine >= 1 ? { startLine: fallbackLine } : undefined
}

function location(uri: string, where: Sarif.Region | undefined, message: string, id?: number): Sarif.Location {
  return {
    ...(id === undefined ? {} : { id }),
    physicalLocation: { artifactLocation: { uri, index: 0 }, ...(where ? { region: where } : {}) },
    message: { text: message },
  }
}

function rowMessage(row: CheckRow): string {
  const name = rowName(row)
  if (row.verdict === 'violated') return `${name}: violated${row.counterexample ? `: ${row.counterexample.message}` : ''}`
  return `${name}: ${row.verdict}${row.note ? `: ${row.note}` : ''}`
}

function rowResult(row: CheckRow, model: NotebookModel, uri: string): Sarif.Result {
  const check = model.checks[row.check]
  const property = check?.properties.find((p) => p.name === row.property)
  const declared = model.properties.find((p) => p.name === row.property)
  const propertyRegion = region(property?.span ?? declared?.span, property?.block?.line ?? declared?.block?.line)
  const checkRegion = region(check?.span, check?.block?.line)
  const reasons = row.cutoff.applies ? [] : row.cutoff.reasons
  const constants = Object.entries(row.constants).map(([n, v]) => `${n}=${v}`).join(' ')
  return {
    ruleId: row.verdict,
    ruleIndex: RULE_INDEX.get(row.verdict),
    kind: 'fail',
    level: row.verdict === 'inconclusive' ? 'warning' : 'error',
    message: { text: rowMessage(row) },
    locations: [
      location(uri, propertyRegion, `property ${row.property}`),
      location(uri, checkRegion, `check ${row.check + 1} (${row.protocol})`),
    ],
    ...(reasons.length
      ? { relatedLocations: reasons.map((r, i) => location(uri, { startLine: Math.max(1, r.line), startColumn: Math.max(1, r.column) }, `cutoff ${ruleLabel(r.rule, r.name)}: ${r.message}`, i + 1)) }
      : {}),
    // Code hosts match a result across runs by these: the row's identity, not its line.
    partialFingerprints: { 'twofoldRow/v1': `${row.protocol}/${row.property}/G_${row.processes}/${constants}/check ${row.check + 1}` },
    properties: {
      row: row.row,
      verdict: row.verdict,
      processes: row.processes,
      constants: row.constants,
      complete: row.complete,
      ...(row.counterexample ? { counterexample: renderCounterexample(row.counterexample, row.assignment).map((l) => l.trim()) } : {}),
    },
  }
}

/**
 * The report as a SARIF 2.1.0 log. `model` is the notebook's typed model (for the lines of
 * properties and checks); `exitCode` is what `twofold check` answers for this report.
 */
export function sarifReport(report: Report, model: NotebookModel, kernelVersion: string, exitCode: number): Sarif.Log {
  const uri = artifactUri(report.notebook.path)
  const results: Sarif.Result[] = report.errors.map((e) => ({
    ruleId: 'notebook-error',
    ruleIndex: RULE_INDEX.get('notebook-error'),
    kind: 'fail',
    level: 'error',
    message: { text: e.message },
    locations: [location(uri, { startLine: Math.max(1, e.line), startColumn: Math.max(1, e.column) }, e.message)],
  }))
  for (const row of report.checks) if (row.verdict !== 'holds') results.push(rowResult(row, model, uri))
  return {
    $schema: SARIF_SCHEMA,
    version: '2.1.0',
    runs: [
      {
        tool: { driver: { name: 'twofold', version: kernelVersion, semanticVersion: kernelVersion, rules: RULES } },
        invocations: [{ executionSuccessful: true, exitCode }],
        artifacts: [{ location: { uri }, mimeType: 'text/markdown', ...(report.notebook.sha256 ? { hashes: { 'sha-256': report.notebook.sha256 } } : {}) }],
        columnKind: 'utf16CodeUnits',
        results,
      },
    ],
  }
}
