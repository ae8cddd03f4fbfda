// The notebook summary at the top of the page and the report: how many rows hold, are violated,
// are inconclusive, could not run or are out of date (the same tally the command line prints),
// with a link to every row that does not hold, and the caution about model verdicts, said once.
import type { CheckRow } from '../../kernels/api'
import { html, type Markup } from './html'
import { CAUTION, VERDICT_SHAPES, isModelError, notRun, shownVerdict, wasStopped } from './results'

/** One check line's findings as the summary sees them. */
export interface SummaryCheck {
  /** Index of the check in the notebook. */
  check: number
  source: string
  rows: CheckRow[] | null
  fresh: boolean
  stopped?: boolean
}

function rowWords(r: CheckRow): string {
  const what = isModelError(r) ? 'model error' : notRun(r) ? 'not run' : wasStopped(r) ? 'stopped: inconclusive' : r.verdict === 'error' ? 'could not run' : r.verdict
  return `${r.property} with ${r.processes} ${r.processes === 1 ? 'process' : 'processes'}: ${what}`
}

/** The summary's markup; empty when nothing has been checked. */
export function summaryMarkup(checks: SummaryCheck[]): string {
  const tally = { holds: 0, violated: 0, inconclusive: 0, error: 0, stale: 0 }
  const links: Markup[] = []
  let rows = 0
  for (const c of checks) {
    if (!c.rows) continue
    for (const r of c.rows) {
      rows++
      if (!c.fresh && !c.stopped) { tally.stale++; continue }
      tally[r.verdict]++
      if (r.verdict !== 'holds') {
        links.push(html`<li><a class="to-row" href="#row-${r.row}" data-check="${c.check}" data-row="${r.row}"><span class="shape" aria-hidden="true">${VERDICT_SHAPES[shownVerdict(r)]}</span> ${rowWords(r)}</a> <span class="quiet">in <code>${c.source}</code></span></li>`)
      }
    }
    if (!c.fresh && !c.stopped) links.push(html`<li><a class="to-row" href="#check-${c.check}" data-check="${c.check}">out of date: <code>${c.source}</code></a></li>`)
  }
  if (!rows) return ''
  const unchecked = checks.filter((c) => !c.rows).length
  const counts = `${rows} row${rows === 1 ? '' : 's'}: ${tally.holds} hold, ${tally.violated} violated, ${tally.inconclusive} inconclusive, ${tally.error} error, ${tally.stale} out of date`
  return html`<section class="summary" aria-label="summary of the findings"><p class="summary-counts">${counts}${unchecked ? html` <span class="quiet">· ${unchecked} check${unchecked === 1 ? '' : 's'} not run yet</span>` : null}</p>${links.length ? html`<ul class="summary-links">${links}</ul>` : null}<p class="caution">${CAUTION}</p></section>`.text
}
