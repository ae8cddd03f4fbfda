// The findings of the open notebook: what each check line depends on and showed last, running
// checks in the kernel (one at a time, stoppable), caching rows by the hash of their inputs, and
// the notebook summary at the top, and the run that makes a verification record (in the kernel
// worker, which also gives the cache keys their SHA-256). The page owns the text and the views;
// this owns the checks.
import { errorText, type CheckRow, type NotebookModel } from '../../kernels/api'
import { CheckLineView, FormalView, type BlockHost, type BlockView } from './blocks'
import { el } from './dom'
import { importProblems } from './import-file'
import { StoppedError, type Kernel } from './kernel'
import { toFragment } from './markdown'
import type { Shelf } from './store'
import { summaryMarkup } from './summary'

/** What one check line depends on and what it showed last. */
export interface CheckState {
  /** The exact inputs (protocol block, property blocks, check source) as one string. */
  inputs: string
  /** The kernel's SHA-256 of `inputs` (or the inputs themselves where Web Crypto is unavailable). */
  key: string
  /** Indices of the segments whose text the inputs come from. */
  deps: Set<number>
  /** The check line's text, to find its earlier findings after blocks move. */
  source: string
  rows: CheckRow[] | null
  fresh: boolean
  /** Set when the user stopped the check: what did not finish. */
  stopped: string | null
}

/** What the findings need from the page. */
export interface FindingsHost {
  text(): string
  views(): BlockView[]
  segmentAt(offset: number): number
  analysis(): Promise<NotebookModel>
  model(): NotebookModel | null
  kernel: Kernel
  shelf: Shelf
  notice(message: string): void
  blockHost(): BlockHost
  /** Read the notebook again soon (its text changed while a check ran). */
  reanalyze(): void
}

/** What a stopped check says about its plan: which rows did not finish. */
function unfinishedWords(rows: CheckRow[], planned: number): string {
  const done = rows.filter((r) => r.complete || r.verdict === 'violated').length
  const open = planned - done
  return `stopped by you: ${open} of ${planned} planned row${planned === 1 ? '' : 's'} did not finish and count as inconclusive`
}

/** The checks of the open notebook and their findings. */
export class Findings {
  checks: CheckState[] = []
  readonly summaryEl = el('div', { class: 'summary-box' })
  private memo = new Map<string, CheckRow[]>()
  private running: { check: number; stop: boolean } | null = null

  constructor(private host: FindingsHost) {
    this.summaryEl.addEventListener('click', (e) => this.onSummaryClick(e))
  }

  /** Forgets the checks of the notebook that was open (cached rows stay). */
  reset(): void { this.checks = [] }

  /** Marks the findings of checks that depend on segment `index` out of date at once. */
  segmentEdited(index: number): void {
    this.checks.forEach((c, i) => { if (c.deps.has(index)) this.lineView(i)?.markStale() })
  }

  /** Runs one check line. */
  run(check: number): void { void this.runChecks([check]) }

  /** Stops the running check. */
  stop(): void {
    if (!this.running) return
    this.running.stop = true
    this.host.kernel.stop()
  }

  lineView(check: number): CheckLineView | undefined {
    for (const v of this.host.views()) if (v instanceof FormalView) for (const l of v.checkLines) if (l.check === check) return l
    return undefined
  }

  async update(model: NotebookModel, text: string): Promise<void> {
    const errors = model.diagnostics.some((d) => d.severity === 'error')
    const found = model.checks.map((check) => {
      const protocol = model.protocols[check.protocol]
      const propBlocks = [...new Map(check.properties.map((p) => [p.block.from, p.block])).values()]
      const inputs = JSON.stringify({ protocol: protocol.block.text, properties: propBlocks.map((b) => b.text), check: check.source })
      const deps = new Set([protocol.block.from, ...propBlocks.map((b) => b.from), check.block.from].map((o) => this.host.segmentAt(o)))
      return { inputs, deps, source: check.source }
    })
    const keys = await this.host.kernel.digests(found.map((f) => f.inputs))
    const next: CheckState[] = []
    for (let c = 0; c < found.length; c++) {
      const { inputs, deps, source } = found[c]
      const key = keys[c]
      let rows = this.memo.get(key) ?? null
      if (!rows) {
        try { rows = (await this.host.shelf.result(key)) ?? null } catch { rows = null }
        if (rows) this.memo.set(key, rows)
      }
      const previous = this.checks.find((p) => p.source === source) ?? this.checks[c]
      const fresh = rows !== null
      const stopped = !fresh && previous?.key === key ? previous.stopped : null
      if (!rows && previous?.rows) rows = previous.rows
      next.push({ inputs, key, deps, source, rows, fresh, stopped })
    }
    if (text !== this.host.text()) return
    this.checks = next
    this.showSummary()
    // Lay out check lines under their blocks.
    this.host.views().forEach((v, i) => {
      if (!(v instanceof FormalView) || !v.checksBox) return
      const mine = model.checks.map((c, k) => ({ c, k })).filter(({ c }) => this.host.segmentAt(c.block.from) === i)
      const keep = v.checkLines.length === mine.length && v.checkLines.every((l, j) => l.check === mine[j].k && l.root.dataset.source === mine[j].c.source)
      if (!keep) {
        v.checkLines = mine.map(({ c, k }) => {
          const line = new CheckLineView(this.host.blockHost(), k, c.source)
          line.root.dataset.source = c.source
          return line
        })
        v.checksBox.replaceChildren(...v.checkLines.map((l) => l.root))
        if (!mine.length) v.checksBox.append(el('p', { class: 'quiet' }, 'No check here reads clean yet.'))
      }
      for (const l of v.checkLines) {
        const s = next[l.check]
        if (this.running?.check !== l.check) l.show(s.rows, s.fresh, s.stopped)
        l.setRunnable(!errors && !this.running, errors ? 'fix the errors in the notebook first' : 'another check is running')
      }
    })
  }

  runFocused(): void {
    const active = document.activeElement?.closest('.block-check')
    const view = this.host.views().find((v) => v.root === active)
    if (view instanceof FormalView && view.checkLines.length) void this.runChecks(view.checkLines.map((l) => l.check))
  }

  /** Runs every check whose findings are missing or out of date. */
  async runChanged(): Promise<void> {
    await this.host.analysis()
    const todo = this.checks.map((c, i) => (c.fresh ? -1 : i)).filter((i) => i >= 0)
    if (!todo.length) { this.host.notice('Every check is up to date.'); return }
    await this.runChecks(todo)
  }

  /**
   * Makes the verification record of the notebook: the kernel worker runs every check and builds
   * the record as `twofold check --record` does; the rows it ran are shown and kept as findings.
   * Resolves to the record's file text, or null (with a notice saying why) when none was made.
   */
  async record(path: string): Promise<string | null> {
    if (this.running) { this.host.notice('A check is running; make the record once it has finished.'); return null }
    const model = await this.host.analysis()
    const problems = importProblems(model)
    if (problems.length) { this.host.notice(`Fix the errors first: ${problems[0]}`); return null }
    const text = this.host.text()
    this.running = { check: -1, stop: false }
    this.setAllRunnable(false)
    const lines = this.checks.map((_, c) => this.lineView(c))
    for (const l of lines) l?.running(true, 'running for the record…')
    try {
      const made = await this.host.kernel.record(text, path, (p) => this.lineView(p.check)?.progress(p, 'for the record'))
      for (const l of lines) l?.running(false)
      if (!made) { this.host.notice('No record was made: stopped by you.'); return null }
      if (this.host.text() === text) this.adopt(made.rows)
      return made.json
    } catch (e) {
      for (const l of lines) l?.running(false)
      this.host.notice(`No record was made: ${e instanceof StoppedError ? 'stopped by you' : `the kernel failed (${errorText(e)})`}.`)
      return null
    } finally {
      this.running = null
      this.setAllRunnable(true)
      if (this.host.text() !== text) this.host.reanalyze()
    }
  }

  /** Shows and keeps the rows of a whole-notebook run (a record) as each check's findings. */
  private adopt(rows: CheckRow[]): void {
    const byCheck = new Map<number, CheckRow[]>()
    for (const r of rows) byCheck.set(r.check, [...(byCheck.get(r.check) ?? []), r])
    for (const [c, mine] of byCheck) if (this.checks[c]) this.finished(c, this.checks[c].key, mine, null)
  }

  /** Runs every check again, up to date or not. */
  async runAll(): Promise<void> {
    await this.host.analysis()
    await this.runChecks(this.checks.map((_, i) => i))
  }

  /** The summary at the top: the tally of every row shown, links to the rows that do not hold. */
  private showSummary(): void {
    const markup = summaryMarkup(this.checks.map((c, i) => ({ check: i, source: c.source, rows: c.rows, fresh: c.fresh, stopped: c.stopped !== null })))
    this.summaryEl.replaceChildren(toFragment(markup))
  }

  private onSummaryClick(e: MouseEvent): void {
    const a = (e.target as HTMLElement).closest<HTMLAnchorElement>('a.to-row')
    if (!a) return
    e.preventDefault()
    const target = (a.dataset.row ? document.getElementById(`row-${a.dataset.row}`) : null) ?? document.getElementById(`check-${a.dataset.check}`)
    if (!target) return
    target.scrollIntoView({ block: 'center' })
    const focusable = target.closest('.check-line')?.querySelector<HTMLElement>('button.run') ?? null
    target.tabIndex = -1
    target.focus({ preventScroll: true })
    if (!focusable) return
  }

  private async runChecks(list: number[]): Promise<void> {
    if (this.running) return
    const model = await this.host.analysis()
    const problems = importProblems(model)
    if (problems.length) { this.host.notice(`Fix the errors first: ${problems[0]}`); return }
    const text = this.host.text()
    const states = this.checks.slice()
    this.running = { check: -1, stop: false }
    this.setAllRunnable(false)
    try {
      for (const c of list) {
        if (this.running.stop) break
        this.running.check = c
        const line = this.lineView(c)
        line?.running(true, 'planning…')
        const rows: CheckRow[] = []
        let planned = 0
        try {
          const plan = await this.host.kernel.plan(text, c)
          planned = plan.length
          for (let r = 0; r < plan.length && !this.running.stop; r++) {
            rows.push(await this.host.kernel.run(text, plan[r], (p) => this.lineView(c)?.progress(p, `row ${r + 1} of ${plan.length}`)))
          }
        } catch (e) {
          this.lineView(c)?.running(false)
          if (!(e instanceof StoppedError)) { this.lineView(c)?.note(`the kernel failed: ${errorText(e)}`); continue }
          if (!rows.length) { this.lineView(c)?.note('stopped before any row finished: inconclusive'); break }
        }
        const stopped = this.running.stop
        this.lineView(c)?.running(false)
        if (stopped && !rows.length) { this.lineView(c)?.note('stopped before any row finished: inconclusive'); break }
        this.finished(c, states[c].key, rows, stopped ? unfinishedWords(rows, planned) : null)
      }
    } finally {
      this.running = null
      this.setAllRunnable(true)
      if (this.host.text() !== text) this.host.reanalyze()
    }
  }

  /** Shows and keeps the rows of a check that ran (a stopped check is shown, not cached). */
  private finished(c: number, key: string, rows: CheckRow[], stopped: string | null): void {
    if (!stopped) {
      this.memo.set(key, rows)
      this.host.shelf.putResult(key, rows).catch((e) => this.host.notice(`Could not keep the findings in the browser: ${errorText(e)}`))
    }
    const now = this.checks[c]
    if (!now) return
    const same = now.key === key
    now.rows = rows
    now.fresh = same && !stopped
    now.stopped = same ? stopped : null
    this.lineView(c)?.show(rows, now.fresh, now.stopped)
    this.showSummary()
  }

  private setAllRunnable(on: boolean): void {
    const errors = this.host.model()?.diagnostics.some((d) => d.severity === 'error') ?? false
    for (const v of this.host.views()) if (v instanceof FormalView) for (const l of v.checkLines) l.setRunnable(on && !errors, on ? 'fix the errors in the notebook first' : 'another check is running')
  }

}
