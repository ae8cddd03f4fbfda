// The self-contained report: one HTML file a reviewer opens without the tool. Inline CSS, prose
// rendered and sanitized, formal blocks as text, properties typeset, findings and counterexample
// diagrams, the caution, and the notebook's SHA-256. No scripts: a Content-Security-Policy that
// allows none makes that a property of the file, not only of how we wrote it. Math is MathML, which
// browsers typeset without KaTeX's fonts.
import { notebookSpans, printProperties, type CheckRow } from '../../kernels/api'
import { DIAGRAM_CSS } from './diagram'
import { html, raw, type Markup } from './html'
import { CAUTION, findingsMarkup } from './results'
import { summaryMarkup } from './summary'
import { contentOf, type Segment } from './segments'
import { texToHtml } from './tex'

/** The findings of one check line, as the page shows them. */
export interface ReportCheck {
  /** Index of the check in the notebook. */
  check: number
  source: string
  rows: CheckRow[] | null
  /** False when the inputs changed since the rows were computed. */
  fresh: boolean
}

/** What the report is built from. */
export interface ReportInput {
  title: string
  text: string
  segments: Segment[]
  /** Check lines by the index of the check block's segment. */
  checks: Map<number, ReportCheck[]>
  /** Turns prose into sanitized HTML (the page passes `renderProse` with MathML output). */
  prose: (src: string) => string
  sha256: string
  created: Date
}

const CSS = `
body{margin:0;background:#fbfaf6;color:#24231f;font:17px/1.55 Georgia,"Iowan Old Style","Palatino Linotype",serif}
main{max-width:52rem;margin:0 auto;padding:2.5rem 1.5rem 4rem}
header.report{border-bottom:1px solid #d9d3c3;margin-bottom:2rem;padding-bottom:1rem}
header.report h1{font-weight:normal;font-size:2rem;margin:0 0 .3rem}
.meta{font-size:.85rem;color:#5e594e}
.meta code{font-size:.8rem;word-break:break-all}
pre.formal{background:#f3efe3;border-left:3px solid #2f5d50;padding:.7rem 1rem;overflow-x:auto;font:13px/1.45 "DejaVu Sans Mono",Menlo,monospace;white-space:pre-wrap}
.kind{display:block;font:12px/1 Georgia,serif;letter-spacing:.08em;text-transform:uppercase;color:#2f5d50;margin-bottom:.4rem}
.typeset{margin:.3rem 0 1rem 1rem}
.typeset div{margin:.3rem 0}
.check-source{font:13px "DejaVu Sans Mono",Menlo,monospace;background:#f3efe3;padding:.2rem .5rem}
.stale{color:#8a5a1e;font-style:italic}
table{border-collapse:collapse;margin:.6rem 0;font-size:.9rem}
th,td{border-bottom:1px solid #e2dccd;padding:.3rem .6rem;text-align:left;vertical-align:top}
caption{text-align:left;color:#5e594e;font-size:.85rem;padding-bottom:.2rem}
.verdict .word{font-weight:bold}
.v-holds .word{color:#2f5d50}.v-violated .word{color:#a33b20}.v-inconclusive .word{color:#8a5a1e}.v-error .word{color:#6f6a5e}
.counts,.quiet{color:#5e594e;font-size:.8rem}
.alarm{color:#a33b20;font-weight:bold}
.certificate{margin:.6rem 0}.statement{overflow-x:auto}summary{color:#5e594e;font-size:.85rem}
.cert-title{font-weight:bold}
.witness-body{display:flex;flex-wrap:wrap;gap:1rem;align-items:flex-start}
.ticks td div{margin:.1rem 0}
.summary{margin:1rem 0 0}.summary-counts{font-weight:bold;margin:.3rem 0}.summary-links{margin:.2rem 0;padding-left:1.2rem;font-size:.9rem}
.shape{font-size:.85em}.v-model-error .word{color:#a33b20}.not-run{color:#5e584b}
a{color:#2f5d50}
@media print{body{background:#fff;font-size:11pt}main{max-width:none;padding:0}pre.formal,.witness,table,.certificate{break-inside:avoid}a{color:inherit;text-decoration:none}}
.caution{border-left:3px solid #b07a2a;padding:.4rem .8rem;color:#5e584b;font-size:.85rem;background:#f6f0e0}
` + DIAGRAM_CSS

/** Builds the report's HTML text. */
/** The notebook's first top-level heading when it reads `title` (the kernel's spans find it), else null. */
function titleHeading(text: string, title: string): { from: number; to: number } | null {
  const first = notebookSpans(text).headings.find((h) => !h.nested)
  return first && first.text.trim() === title ? first : null
}

export function buildReport(input: ReportInput): string {
  const parts: Markup[] = []
  // The title once: the notebook's first heading, when it says the title, gives way to the report's.
  const heading = titleHeading(input.text, input.title)
  input.segments.forEach((seg, i) => {
    const content = contentOf(input.text, seg)
    if (seg.kind === 'front') return
    if (seg.kind === 'prose') {
      const shown = heading && heading.from >= seg.contentFrom && heading.to <= seg.contentTo
        ? input.text.slice(seg.contentFrom, heading.from) + input.text.slice(heading.to, seg.contentTo)
        : content
      parts.push(raw(input.prose(shown)))
      return
    }
    parts.push(html`<pre class="formal"><span class="kind">${seg.kind}</span>${content}</pre>`)
    if (seg.kind === 'property') {
      const typeset = printProperties(content).filter((p) => p.tex)
      if (typeset.length) parts.push(html`<div class="typeset">${typeset.map((p) => html`<div><b>${p.name}</b>: ${raw(texToHtml(p.tex!, false, true))}</div>`)}</div>`)
    }
    if (seg.kind === 'check') {
      for (const c of input.checks.get(i) ?? []) {
        parts.push(html`<p><span class="check-source">${c.source}</span></p>`)
        if (!c.rows) parts.push(html`<p class="quiet">Not checked when this report was made.</p>`)
        else {
          if (!c.fresh) parts.push(html`<p class="stale">Out of date: the notebook changed after this check ran.</p>`)
          parts.push(raw(findingsMarkup(c.rows, { mathmlOnly: true })))
        }
      }
    }
  })
  // The caution is said once: inside the summary, or on its own when nothing was checked.
  const tally = summaryMarkup([...input.checks.values()].flat())
  const summary = raw(tally || html`<p class="caution">${CAUTION}</p>`.text)
  const csp = "default-src 'none'; style-src 'unsafe-inline'; img-src data:"
  return '<!doctype html>\n' + html`<html lang="en"><head><meta charset="utf-8"><meta http-equiv="Content-Security-Policy" content="${csp}"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${input.title}</title><style>${raw(CSS)}</style></head><body><main><header class="report"><h1>${input.title}</h1><div class="meta">Report made ${input.created.toISOString()} by twofold from a notebook with SHA-256 <code>${input.sha256}</code>.</div>${summary}</header>${parts}</main></body></html>`.text
}
