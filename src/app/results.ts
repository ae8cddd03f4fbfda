// Findings under a check: the rows of one check line rendered as a table of verdicts (properties
// side by side, one line per size and constant setting), the counts, the cutoff statement typeset,
// the rules passed or the reasons (each linking to its line), and the counterexamples. Pure: rows
// in, markup string out, so the page and the exported report show the same thing.
import type { CheckRow, CutoffInfo } from '../../kernels/result'
import { changesTable, counterexampleSvg } from './diagram'
import { html, raw, type Markup } from './html'
import { texToHtml } from './tex'
import { ruleLabel } from '../../kernels/symmetry/rules'

/** Options for rendering findings. */
export interface FindingsOptions {
  /** Render TeX as MathML only (the report has no KaTeX fonts). */
  mathmlOnly?: boolean
  /** Leave out the counterexample diagrams (the live page renders them on demand). */
  diagrams?: boolean
}

/** The words people read for each verdict. */
export const VERDICT_WORDS: Record<CheckRow['verdict'], string> = {
  holds: 'holds',
  violated: 'violated',
  inconclusive: 'inconclusive',
  error: 'could not run',
}

/** The caution shown next to every set of findings. */
export const CAUTION =
  'A verdict is about this model under its stated timing and fault assumptions, not about deployed code. ' +
  'For systems where failure can hurt people, defer to the applicable safety standards and licensed engineering review.'

function constantsText(c: Record<string, number>, names: string[]): string {
  return names.map((n) => `${n} = ${c[n]}`).join(', ')
}

/** Constants whose value differs between rows: the ones worth a column. */
export function sweptConstants(rows: CheckRow[]): string[] {
  if (!rows.length) return []
  return Object.keys(rows[0].constants).filter((n) => rows.some((r) => r.constants[n] !== rows[0].constants[n]))
}

function instanceKey(r: CheckRow): string {
  return JSON.stringify([r.processes, Object.entries(r.constants).sort()])
}

function count(n: number): string {
  return n.toLocaleString('en-US')
}

function cell(r: CheckRow): Markup {
  const alarm = r.agreement === false
    ? html`<div class="alarm">sizes disagree: soundness alarm</div>`
    : r.agreement === true ? html`<div class="counts">agrees with the cutoff instance</div>` : null
  const partial = r.complete ? null : html` <span class="quiet">(stopped early)</span>`
  return html`<td class="verdict v-${r.verdict}" data-row="${r.row}"><span class="word">${VERDICT_WORDS[r.verdict]}</span>${alarm}<div class="counts">${count(r.states)} states · ${count(r.transitions)} transitions${partial}</div><div class="counts">${r.method ? `${r.method === 'induction' ? 'induction' : r.search === 'ltl' ? 'temporal' : 'invariant'}, ` : ''}${r.seconds.toFixed(2)} s${r.reducedStates !== undefined ? ` · ${count(r.reducedStates)} up to symmetry` : ''}</div>${r.note ? html`<div class="note">${r.note}</div>` : null}</td>`
}

/** A cutoff certificate: the theorem instance typeset, and the rules passed or the reasons. */
export function cutoffMarkup(c: CutoffInfo, opts: FindingsOptions = {}): Markup {
  if (c.applies) {
    const statement = c.tex ? raw(texToHtml(c.tex, true, opts.mathmlOnly)) : html`<p>${c.statement}</p>`
    return html`<div class="cutoff applies"><div class="cutoff-head">The cutoff applies: ${c.processes === 1 ? 'one process stands' : `${c.processes} processes stand`} for every size.</div><div class="statement" aria-label="${c.statement}">${statement}</div>${c.passed.length ? html`<details class="passed-rules"><summary>the ${c.passed.length} rules it passed</summary><ul class="passed">${c.passed.map((p) => html`<li>${p}</li>`)}</ul></details>` : null}</div>`
  }
  return html`<div class="cutoff refused"><div class="cutoff-head">The cutoff does not apply${c.statement ? html`: ${c.statement}` : null}</div><ul class="reasons">${c.reasons.map((r) => html`<li><a class="jump" href="#line-${r.line}" data-line="${r.line}" data-column="${r.column}">line ${r.line}, column ${r.column}</a> <span class="rule">${ruleLabel(r.rule, r.name)}</span>: ${r.message}</li>`)}</ul></div>`
}

/**
 * Renders the rows of one check line. Several properties share the table as columns; each size
 * and constant setting is a line of it.
 */
export function findingsMarkup(rows: CheckRow[], opts: FindingsOptions = {}): string {
  if (!rows.length) return ''
  const properties = [...new Set(rows.map((r) => r.property))]
  const swept = sweptConstants(rows)
  const fixed = Object.keys(rows[0].constants).filter((n) => !swept.includes(n))
  const instances: CheckRow[][] = []
  const byKey = new Map<string, CheckRow[]>()
  for (const r of rows) {
    const k = instanceKey(r)
    let line = byKey.get(k)
    if (!line) { line = []; byKey.set(k, line); instances.push(line) }
    line.push(r)
  }
  const head = html`<tr><th scope="col">processes</th>${swept.map((n) => html`<th scope="col">${n}</th>`)}${properties.map((p) => html`<th scope="col">${p}</th>`)}</tr>`
  const body = instances.map((line) => {
    const first = line[0]
    const cells = properties.map((p) => {
      const r = line.find((x) => x.property === p)
      return r ? cell(r) : html`<td class="quiet">not in this setting</td>`
    })
    return html`<tr><th scope="row">${first.processes}</th>${swept.map((n) => html`<td class="num">${first.constants[n]}</td>`)}${cells}</tr>`
  })
  // One certificate per property: the cutoff decision does not depend on sizes or constants.
  const certificates = properties.map((p) => {
    const r = rows.find((x) => x.property === p)!
    return html`<div class="certificate"><div class="cert-title">${p}${Object.keys(r.assignment).length ? html` <span class="quiet">(checked with ${Object.entries(r.assignment).map(([v, n]) => `${v} = ${n}`).join(', ')})</span>` : null}</div>${cutoffMarkup(r.cutoff, opts)}</div>`
  })
  const witnesses = opts.diagrams === false ? [] : rows.filter((r) => r.counterexample).map((r) => counterexampleMarkup(r))
  return html`<div class="findings"><table class="verdicts"><caption>${fixed.length ? `with ${constantsText(rows[0].constants, fixed)}` : 'verdicts'} <span class="quiet">· ${rows[0].timing} timing</span></caption><thead>${head}</thead><tbody>${body}</tbody></table>${certificates}${witnesses}</div>`.text
}

/** A counterexample with its caption, diagram and tick table, side by side. */
export function counterexampleMarkup(r: CheckRow): Markup {
  const cx = r.counterexample!
  const kind = cx.kind === 'lasso' ? 'a run that repeats forever' : cx.kind === 'model-error' ? 'a run that reaches a model error' : 'a shortest run to the violation'
  return html`<section class="witness" data-row="${r.row}" aria-label="counterexample for ${r.property} with ${r.processes} processes"><h4>Why ${r.property} is violated with ${r.processes} ${r.processes === 1 ? 'process' : 'processes'}: ${kind}</h4><p class="witness-message">${cx.message}</p><div class="witness-body"><div class="diagram">${raw(counterexampleSvg(cx, r.processes))}</div><div class="tick-table">${raw(changesTable(cx))}</div></div></section>`
}
