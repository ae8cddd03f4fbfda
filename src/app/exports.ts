// What the workbench exports: the notebook as Markdown, the verification record as JSON, and the
// self-contained HTML report. Each reads the page's state through `ExportHost` and raises no
// notices of its own beyond what the export itself needs to say.
import type { CheckRow, NotebookModel, Report } from '../../kernels/api'
import { download, fileName } from './dom'
import type { Kernel } from './kernel'
import { renderProse } from './markdown'
import { buildReport, type ReportCheck } from './report'
import type { Segment } from './segments'
import { shownTitle } from './store'

/** What an export reads from the page. */
export interface ExportHost {
  text(): string
  segments(): Segment[]
  segmentAt(offset: number): number
  checks(): { rows: CheckRow[] | null; fresh: boolean; source: string }[]
  kernel: Kernel
  analysis(): Promise<NotebookModel>
  /** Runs the checks whose findings are missing or out of date, saying nothing when there are none. */
  runChanged(): Promise<void>
  notice(message: string): void
}

/** SHA-256 of a text as hex (the text itself, prefixed, where Web Crypto is unavailable). */
export async function digest(s: string): Promise<string> {
  const subtle = globalThis.crypto?.subtle
  if (!subtle) return 'text:' + s // insecure context: key by the text itself
  const bytes = new Uint8Array(await subtle.digest('SHA-256', new TextEncoder().encode(s)))
  return [...bytes].map((b) => b.toString(16).padStart(2, '0')).join('')
}

/** Downloads the notebook text as `.md`. */
export function exportMarkdown(text: string): void {
  download(fileName(shownTitle(text), '.md'), 'text/markdown;charset=utf-8', text)
}

/** The Report of the findings shown now (fresh rows only), in plan order. */
async function report(host: ExportHost, model: NotebookModel): Promise<Report> {
  const text = host.text()
  const plan = await host.kernel.plan(text)
  const checks: CheckRow[] = []
  host.checks().forEach((s, c) => {
    if (!s.fresh || !s.rows) return
    const mine = plan.filter((p) => p.check === c)
    s.rows.forEach((r, k) => checks.push({ ...r, check: c, row: mine[k]?.row ?? r.row }))
  })
  return {
    notebook: { path: fileName(shownTitle(text), '.md'), sha256: await digest(text) },
    errors: model.diagnostics.filter((d) => d.severity === 'error').map((d) => ({ line: d.line, column: d.column, message: d.message })),
    checks,
  }
}

/** Runs what changed, then downloads the verification record. */
export async function exportRecord(host: ExportHost): Promise<void> {
  await host.runChanged()
  const model = await host.analysis()
  if (host.checks().some((c) => !c.fresh)) { host.notice('Some checks did not finish, so no record was made.'); return }
  const r = await report(host, model)
  const { buildRecord } = await import('../../kernels/record/record')
  const { canonicalJsonPretty } = await import('../../kernels/base/canonical')
  const record = await buildRecord(r, host.text(), model)
  download(fileName(shownTitle(host.text()), '.record.json'), 'application/json', canonicalJsonPretty(record) + '\n')
}

/** The findings of each check line, by the segment of its check block, as the report wants them. */
export async function reportChecks(host: ExportHost): Promise<Map<number, ReportCheck[]>> {
  const model = await host.analysis()
  const byBlock = new Map<number, ReportCheck[]>()
  const states = host.checks()
  model.checks.forEach((c, k) => {
    const i = host.segmentAt(c.block.from)
    const list = byBlock.get(i) ?? []
    const s = states[k]
    list.push({ check: k, source: c.source, rows: s?.rows ?? null, fresh: s?.fresh ?? false })
    byBlock.set(i, list)
  })
  return byBlock
}

/** Downloads the self-contained HTML report. */
export async function exportReport(host: ExportHost): Promise<void> {
  const text = host.text()
  const html = buildReport({
    title: shownTitle(text), text, segments: host.segments(), checks: await reportChecks(host),
    prose: (src) => renderProse(src, true), sha256: await digest(text), created: new Date(),
  })
  download(fileName(shownTitle(text), '.report.html'), 'text/html;charset=utf-8', html)
}
