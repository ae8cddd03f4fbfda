// What the workbench exports: the notebook as Markdown, the verification record as JSON, and the
// self-contained HTML report. Each reads the page's state through `ExportHost` and raises no
// notices of its own beyond what the export itself needs to say. The record is made whole in the
// kernel worker (Findings.record); the page only names and downloads it.
import type { CheckRow, NotebookModel } from '../../kernels/api'
import { download, fileName } from './dom'
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
  analysis(): Promise<NotebookModel>
  /** The kernel's SHA-256 of a text. */
  digest(text: string): Promise<string>
  /** Runs every check in the kernel and resolves to the record's file text (null when none was made). */
  record(path: string): Promise<string | null>
}

/** Downloads the notebook text as `.md`. */
export function exportMarkdown(text: string): void {
  download(fileName(shownTitle(text), '.md'), 'text/markdown;charset=utf-8', text)
}

/** Makes the verification record in the kernel and downloads it. */
export async function exportRecord(host: ExportHost): Promise<void> {
  const text = host.text()
  const json = await host.record(fileName(shownTitle(text), '.md'))
  if (json !== null) download(fileName(shownTitle(text), '.record.json'), 'application/json', json)
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
    prose: (src) => renderProse(src, true), sha256: await host.digest(text), created: new Date(),
  })
  download(fileName(shownTitle(text), '.report.html'), 'text/html;charset=utf-8', html)
}
