// Findings under a check: the rows of one check line rendered as a table of verdicts (properties
// side by side, one line per size and constant setting), the counts, the cutoff statement typeset,
// the rules passed or the reasons (each linking to its line), and the counterexamples. Pure: rows
// in, markup string out, so the page and the exported report show the same thing.
import { ruleLabel, type CheckRow, type CutoffInfo } from '../../kernels/api'
import { changesTable, counterexampleSvg } from './diagram'
import { html, raw, type Markup } from './html'
import { texToHtml } from './tex'

/** Options for rendering findings. */
export interface FindingsOptions {
  /** Render TeX as MathML only (the report has no KaTeX fonts). */
  mathmlOnly?: boolean
  /** Leave out the counterexample diagrams (the live page renders them on demand). */
  diagrams?: boolean
  /** A sentence about planned rows that did not finish (a stopped check). */
  unfinished?: string
}

/** The words people read for each verdict. */
export const VERDICT_WORDS: Record<CheckRow['verdict'], string> = {
  holds: 'holds',
  violated: 'violated',
  inconclusive: 'inconclusive',
  error: 'could not run',
}

/**
 * A shape per verdict, so that a verdict never rests on colour alone: a full disc holds, a
 * triangle (a warning sign's outline) is violated, a half disc is undecided, a square could not run.
 */
export const VERDICT_SHAPES: Record<CheckRow['verdict'] | 'model-error' | 'not-run', string> = {
  holds: '●',
  violated: '▲',
  inconclusive: '◐',
  error: '■',
  'model-error': '✖',
  'not-run': '○',
}

/** The caution shown once per notebook (and once in the report). */
export const CAUTION =
  'A verdict is about this model under its stated timing and fault assumptions, not about deployed code. ' +
  'For systems where failure can hurt people, defer to the applicable safety standards and licensed engineering review.'

/** The line a cutoff refusal without sizes shows instead of a row of zeros. */
export const NOT_RUN = 'not run: the cutoff does not apply (reasons below); give sizes with `at N = ...`'

/** Text with `backticks` set as code; everything else escaped. */
export function withCode(text: string): Markup {
  return raw(text.split(/`([^`]+)`/).map((part, i) => (i % 2 ? html`<code>${part}</code>` : html`${part}`).text).join(''))
}

/** Where a model error message points: "model error at line L, column C: ...". */
export function modelErrorAt(message: string): { line: number; column: number } | null {
  const m = /model error at line (\d+), column (\d+)/.exec(message)
  return m ? { line: Number(m[1]), column: Number(m[2]) } : null
}

/** A model error message with its location as a link to the line. */
export function modelErrorMarkup(message: string): Markup {
  const at = modelErrorAt(message)
  if (!at) return withCode(message)
  const m = /^(.*?)(line \d+, column \d+)(.*)$/s.exec(message)!
  return html`${withCode(m[1])}<a class="jump" href="#line-${at.line}" data-line="${at.line}" data-column="${at.column}">${m[2]}</a>${withCode(m[3])}`
}

/** A row the kernel did not explore because the cutoff was refused and no sizes were given. */
export function notRun(r: CheckRow): boolean {
  return !r.cutoff.applies && r.states === 0 && r.verdict === 'inconclusive' && /cutoff does not apply/.test(r.note ?? '')
}

/** A row whose run was a model error rather than a property violation. */
export function isModelError(r: CheckRow): boolean { return r.counterexample?.kind === 'model-error' }

/** A row stopped by the user before it finished. */
export function wasStopped(r: CheckRow): boolean { return !r.complete && r.verdict === 'inconclusive' && /stopped/.test(r.note ?? '') }

/** The summary key of a row: its verdict, or model error. */
export function shownVerdict(r: CheckRow): keyof typeof VERDICT_SHAPES {
  return isModelError(r) ? 'model-error' : notRun(r) ? 'not-run' : r.verdict
}

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

function verdictWord(r: CheckRow): Markup {
  const key = shownVerdict(r)
  const word = key === 'model-error' ? 'model error' : key === 'not-run' ? 'not run' : wasStopped(r) ? 'stopped: inconclusive' : VERDICT_WORDS[r.verdict]
  return html`<span class="shape" aria-hidden="true">${VERDICT_SHAPES[key]}</span> <span class="word">${word}</span>`
}

function cell(r: CheckRow, sharedError: boolean): Markup {
  const alarm = r.agreement === false
    ? html`<div class="alarm">sizes disagree: soundness alarm</div>`
    : r.agreement === true ? html`<div class="counts">agrees with the cutoff instance</div>` : null
  const partial = !r.complete && r.verdict !== 'violated' ? html` <span class="unfinished">(did not finish)</span>` : null
  const note = isModelError(r)
    ? (sharedError ? html`<div class="note">the model error below stops this check</div>` : html`<div class="note">${modelErrorMarkup(r.counterexample!.message)}</div>`)
    : r.note ? html`<div class="note">${withCode(r.note)}</div>` : null
  const kind = shownVerdict(r)
  return html`<td class="verdict v-${kind === 'model-error' ? 'model-error' : r.verdict}" id="row-${r.row}" data-row="${r.row}">${verdictWord(r)}${alarm}<div class="counts">${r.method === 'induction' && r.states === 0 ? 'one tick, no states explored' : `${count(r.states)} states · ${count(r.transitions)} transitions`}${partial}</div><div class="counts">${r.method ? `${r.method === 'induction' ? 'induction' : r.search === 'ltl' ? 'temporal' : 'invariant'}, ` : ''}${r.seconds.toFixed(2)} s${r.reducedStates !== undefined ? ` · ${count(r.reducedStates)} up to symmetry` : ''}</div>${note}</td>`
}

/** A cutoff certificate: the theorem instance typeset, and the rules passed or the reasons. */
export function cutoffMarkup(c: CutoffInfo, opts: FindingsOptions = {}): Markup {
  if (c.applies) {
    const statement = c.tex ? raw(texToHtml(c.tex, true, opts.mathmlOnly)) : html`<p>${c.statement}</p>`
    return html`<div class="cutoff applies"><div class="cutoff-head">The cutoff applies: ${c.processes === 1 ? 'one process stands' : `${c.processes} processes stand`} for every size.</div><div class="statement" aria-label="${c.statement}">${statement}</div>${c.passed.length ? html`<details class="passed-rules"><summary>the ${c.passed.length} rules it passed</summary><ul class="passed">${c.passed.map((p) => html`<li>${p}</li>`)}</ul></details>` : null}</div>`
  }
  // The advice to give sizes is said once, where it applies (the not-run line), never under rows that have sizes.
  const statement = c.statement.replace(/;?\s*give explicit sizes.*$/s, '')
  const reason = (r: CutoffInfo['reasons'][number]) => {
    return html`<li><span class="rule">${ruleLabel(r.rule, r.name)}</span> <a class="jump" href="#line-${r.line}" data-line="${r.line}" data-column="${r.column}">line ${r.line}, column ${r.column}</a>: ${withCode(r.message)}</li>`
  }
  return html`<div class="cutoff refused"><div class="cutoff-head">The cutoff does not apply${statement ? html`: ${withCode(statement)}` : null}</div><ul class="reasons">${c.reasons.map(reason)}</ul></div>`
}

/** One model error that stops every property of a check: shown once for the check. */
function sharedModelError(rows: CheckRow[]): CheckRow | null {
  if (rows.length < 2 || !rows.every(isModelError)) return null
  const message = rows[0].counterexample!.message
  return rows.every((r) => r.counterexample!.message === message && r.processes === rows[0].processes) ? rows[0] : null
}

/**
 * Renders the rows of one check line. Several properties share the table as columns; each size
 * and constant setting is a line of it.
 */
export function findingsMarkup(rows: CheckRow[], opts: FindingsOptions = {}): string {
  if (!rows.length) return ''
  const properties = [...new Set(rows.map((r) => r.property))]
  const certificates = properties.map((p) => {
    const r = rows.find((x) => x.property === p)!
    return html`<div class="certificate"><div class="cert-title">${p}${Object.keys(r.assignment).length ? html` <span class="quiet">(checked with ${Object.entries(r.assignment).map(([v, n]) => `${v} = ${n}`).join(', ')})</span>` : null}</div>${cutoffMarkup(r.cutoff, opts)}</div>`
  })
  if (rows.every(notRun)) {
    return html`<div class="findings"><p class="not-run"><span class="shape" aria-hidden="true">${VERDICT_SHAPES['not-run']}</span> ${withCode(NOT_RUN)}</p>${certificates}</div>`.text
  }
  const shared = sharedModelError(rows)
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
      return r ? cell(r, shared !== null) : html`<td class="quiet">not in this setting</td>`
    })
    return html`<tr><th scope="row">${first.processes}</th>${swept.map((n) => html`<td class="num">${first.constants[n]}</td>`)}${cells}</tr>`
  })
  const stopNote = opts.unfinished ? html`<p class="unfinished-rows">${opts.unfinished}</p>` : null
  const shown = shared ? [shared] : rows.filter((r) => r.counterexample)
  const witnesses = opts.diagrams === false ? [] : shown.map((r) => counterexampleMarkup(r, shared !== null))
  return html`<div class="findings"><div class="table-scroll"><table class="verdicts"><caption>${fixed.length ? `with ${constantsText(rows[0].constants, fixed)}` : 'verdicts'} <span class="quiet">· ${rows[0].timing} timing</span></caption><thead>${head}</thead><tbody>${body}</tbody></table></div>${stopNote}${certificates}${witnesses}</div>`.text
}

/** The rows of a check as a Markdown table (for copying into other documents). */
export function findingsMarkdown(rows: CheckRow[]): string {
  const properties = [...new Set(rows.map((r) => r.property))]
  const swept = sweptConstants(rows)
  const byKey = new Map<string, CheckRow[]>()
  for (const r of rows) byKey.set(instanceKey(r), [...(byKey.get(instanceKey(r)) ?? []), r])
  const cellText = (r: CheckRow | undefined) => {
    if (!r) return 'not in this setting'
    const key = shownVerdict(r)
    const word = key === 'model-error' ? 'model error' : key === 'not-run' ? 'not run' : VERDICT_WORDS[r.verdict]
    return `${word} (${count(r.states)} states)`.replace(/\|/g, '\\|')
  }
  const head = ['processes', ...swept, ...properties]
  const lines = [`| ${head.join(' | ')} |`, `| ${head.map(() => '---').join(' | ')} |`]
  for (const line of byKey.values()) {
    lines.push(`| ${[String(line[0].processes), ...swept.map((n) => String(line[0].constants[n])), ...properties.map((p) => cellText(line.find((x) => x.property === p)))].join(' | ')} |`)
  }
  return lines.join('\n') + '\n'
}

/** A counterexample with its caption, diagram and tick table, side by side. */
export function counterexampleMarkup(r: CheckRow, forCheck = false): Markup {
  const cx = r.counterexample!
  const size = `${r.processes} ${r.processes === 1 ? 'process' : 'processes'}`
  const heading = cx.kind === 'model-error'
    ? (forCheck ? `A model error stops every property of this check with ${size}` : `A model error stops ${r.property} with ${size}`)
    : cx.kind === 'induction'
      ? `Why ${r.property} is not proved by induction with ${size}: one tick from a state s that satisfies the invariant to a state s' that does not`
      : `Why ${r.property} is violated with ${size}: ${cx.kind === 'lasso' ? 'a run that repeats forever' : 'a shortest run to the violation'}`
  const message = cx.kind === 'model-error' ? modelErrorMarkup(cx.message) : withCode(cx.message)
  return html`<section class="witness${cx.kind === 'model-error' ? ' witness-error' : ''}" data-row="${r.row}" aria-label="counterexample for ${r.property} with ${size}"><h4>${heading}</h4><p class="witness-message">${message}</p><div class="witness-body"><div class="diagram">${raw(counterexampleSvg(cx, r.processes, { assignment: r.assignment }))}</div><div class="tick-table">${raw(changesTable(cx))}</div></div></section>`
}
