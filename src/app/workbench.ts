// The workbench: one open notebook, its block views, the kernel, the shelf and the findings.
// The notebook text is the single source of truth. Block edits replace a content span; structural
// edits (insert, move, remove, prose that gains a heading) re-segment the text and rebuild the
// views. Typing never waits for the kernel: analysis is debounced and runs in its own worker, and
// results are marked out of date synchronously from the dependencies of the last analysis.
import type { NotebookModel } from '../../kernels/language/model'
import type { CheckRow, Report } from '../../kernels/result'
import { FormalView, ProseView, type BlockHost, type BlockView, CheckLineView } from './blocks'
import { button, el } from './dom'
import { digest, exportMarkdown, exportRecord, exportReport, type ExportHost } from './exports'
import { ImportRefused, decodeText, importProblems } from './import-file'
import { Keeper } from './keeper'
import { Kernel, StoppedError } from './kernel'
import { Notices, type NoticeAction } from './notices'
import { deleteBlock, insertBlock, lineStarts, moveBlock, replaceContent, segment, type Segment, type SegmentKind } from './segments'
import { Shelf, newId, shownTitle, type StoredNotebook } from './store'
import { ShelfPanel } from './shelf-panel'
import { shortcutsDialog } from './shortcuts'
import { summaryMarkup } from './summary'
import { toFragment } from './markdown'
import { withTitle } from './title'

const ANALYZE_DELAY = 250

/** What one check line depends on and what it showed last. */
interface CheckState {
  /** The exact inputs (protocol block, property blocks, check source) as one string. */
  inputs: string
  /** SHA-256 of `inputs` (or the inputs themselves where Web Crypto is unavailable). */
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

/** What a stopped check says about its plan: which rows did not finish. */
function unfinishedWords(rows: CheckRow[], planned: number): string {
  const done = rows.filter((r) => r.complete || r.verdict === 'violated').length
  const open = planned - done
  return `stopped by you: ${open} of ${planned} planned row${planned === 1 ? '' : 's'} did not finish and count as inconclusive`
}

/** The page. */
export class Workbench {
  private text = ''
  private id = ''
  private segs: Segment[] = []
  private views: BlockView[] = []
  private model: NotebookModel | null = null
  private modelText: string | null = null
  private analyzeTimer = 0
  private checks: CheckState[] = []
  private memo = new Map<string, CheckRow[]>()
  private running: { check: number; stop: boolean } | null = null
  private kernel = new Kernel()
  private shelfPanel: ShelfPanel
  private docEl = el('article', { class: 'notebook', 'aria-label': 'notebook' })
  private notesEl = el('div', { class: 'notebook-problems', role: 'alert' })
  private saveEl = el('span', { class: 'save-state', role: 'status', 'aria-live': 'polite' })
  private notices = new Notices()
  private summaryEl = el('div', { class: 'summary-box' })
  private keeper: Keeper
  private titleEl = el('h1', { class: 'doc-title' })
  private analysisWaiters: (() => void)[] = []

  constructor(private root: HTMLElement, private shelf: Shelf, private guide: string) {
    this.shelfPanel = new ShelfPanel(shelf, {
      open: (id) => this.openNotebook(id),
      current: () => this.id,
      rename: (id, title) => this.rename(id, title),
      duplicated: (entry) => this.openNotebook(entry.id),
      deleted: (entry) => this.afterDelete(entry),
      created: () => this.newNotebook(),
      imported: (file) => this.importFile(file),
      restoreGuide: () => this.addGuide(),
      notice: (m, action) => this.notice(m, action),
      exportText: (text) => exportMarkdown(text),
    })
    this.keeper = new Keeper(shelf, {
      id: () => this.id,
      text: () => this.text,
      adopt: (text) => this.adopt(text),
      status: (t) => { this.saveEl.textContent = t },
      notice: (m, a) => this.notice(m, a),
      exportNow: () => exportMarkdown(this.text),
      shelfChanged: () => void this.shelfPanel.refresh(),
    })
    this.layout()
  }

  private layout(): void {
    const runChanged = button('run what changed', () => void this.runChanged(), { class: 'primary', 'aria-label': 'run every check whose inputs changed' })
    const runAll = button('run every check', () => void this.runAll(), { 'aria-label': 'run every check in the notebook again' })
    const closeMenu = (e: Event) => { (e.currentTarget as HTMLElement).closest('details')!.open = false }
    const exports = el('details', { class: 'exports' },
      el('summary', { 'aria-label': 'save the notebook, its record or a report as a file' }, 'save as…'),
      el('div', { class: 'exports-menu', role: 'group', 'aria-label': 'export' },
        button('notebook .md', (e) => { closeMenu(e); exportMarkdown(this.text) }, { 'aria-label': 'export the notebook as Markdown' }),
        button('record .json', (e) => { closeMenu(e); void exportRecord(this.exportHost) }, { 'aria-label': 'export the verification record as JSON' }),
        button('report .html', (e) => { closeMenu(e); void exportReport(this.exportHost) }, { 'aria-label': 'export a self-contained HTML report' })))
    const keys = shortcutsDialog()
    const bar = el('header', { class: 'topbar' },
      el('div', { class: 'brand' }, 'twofold'),
      this.titleEl,
      el('div', { class: 'actions' }, runChanged, runAll, exports, keys.opener, this.saveEl))
    const main = el('main', { class: 'page' }, this.notices.root, this.notesEl, this.summaryEl, this.docEl)
    this.root.replaceChildren(bar, el('div', { class: 'columns' }, this.shelfPanel.root, main), keys.dialog)
    document.addEventListener('keydown', (e) => {
      const t = e.target as HTMLElement
      if (e.key === '?' && !t.closest('input, textarea, .cm-editor, [contenteditable]')) { e.preventDefault(); keys.open() }
    })
    this.summaryEl.addEventListener('click', (e) => this.onSummaryClick(e))
    this.docEl.addEventListener('click', (e) => this.onDocClick(e))
    this.docEl.addEventListener('mouseover', (e) => this.onHover(e))
    this.docEl.addEventListener('focusin', (e) => this.onHover(e))
  }

  /** Opens the notebook kept as open last time, or the guide on a first visit. */
  async start(): Promise<void> {
    let entry: StoredNotebook | undefined
    try {
      const id = await this.shelf.openId()
      if (id) entry = await this.shelf.load(id)
      if (!entry) {
        const list = await this.shelf.list()
        entry = list.length ? await this.shelf.load(list[0].id) : await this.shelf.save(newId(), this.guide)
      }
      await this.shelf.setOpenId(entry!.id)
    } catch (e) {
      this.notice(`This browser refused to store notebooks (${(e as Error).message || e}); changes will be lost when the page closes.`)
      entry = { id: newId(), text: this.guide, changed: Date.now() }
    }
    this.load(entry!)
    await this.shelfPanel.refresh()
  }

  private load(stored: StoredNotebook): void {
    const entry = this.keeper.opened(stored)
    this.id = entry.id
    this.text = entry.text
    this.checks = []
    this.model = null
    this.modelText = null
    this.rebuild()
    this.saveEl.textContent = `kept in this browser · ${new Date(entry.changed).toLocaleString()}`
  }

  // ---- what block views ask for (BlockHost, through `host`) -------------------------------------------------------------------------

  lineOf(offset: number): number {
    const starts = lineStarts(this.text)
    let lo = 0
    let hi = starts.length - 1
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1
      if (starts[mid] <= offset) lo = mid
      else hi = mid - 1
    }
    return lo + 1
  }

  edited(view: BlockView, edited: string): void {
    const index = this.views.indexOf(view)
    if (index < 0) return
    const seg = this.segs[index]
    // A formal block's text must end with a line break, or its closing fence would join its last line.
    const content = view instanceof FormalView && !edited.endsWith('\n') ? edited + '\n' : edited
    const before = this.text.slice(seg.contentFrom, seg.contentTo)
    if (before === content) return
    const delta = content.length - before.length
    const linesChanged = before.split('\n').length !== content.split('\n').length
    this.text = replaceContent(this.text, seg, content)
    seg.contentTo += delta
    seg.to += delta
    for (let j = index + 1; j < this.segs.length; j++) {
      const s = this.segs[j]
      s.from += delta; s.to += delta; s.contentFrom += delta; s.contentTo += delta
      if (linesChanged) this.views[j].moved()
    }
    if (view instanceof FormalView) view.refresh(content)
    for (const c of this.checks) if (c.deps.has(index)) this.lineView(this.checks.indexOf(c))?.markStale()
    this.changed()
    // A fence typed inside a formal block, or a title change, changes the structure.
    if (view instanceof FormalView && /^\s*(```|~~~)/m.test(content)) this.rebuild()
    if (seg.kind === 'front') this.showTitle()
  }

  proseDone(_view: BlockView): void {
    const next = segment(this.text)
    const same = next.length === this.segs.length && next.every((s, i) => s.kind === this.segs[i].kind && s.from === this.segs[i].from)
    if (!same) this.rebuild()
    this.showTitle()
  }

  move(view: BlockView, direction: -1 | 1): void {
    const i = this.views.indexOf(view)
    this.structural(moveBlock(this.text, i, direction), i + direction)
  }

  remove(view: BlockView): void {
    const i = this.views.indexOf(view)
    const before = this.text
    this.structural(deleteBlock(this.text, i), Math.max(0, i - 1))
    this.notice('Block removed.', { label: 'put it back', run: () => this.structural(before, i) })
  }

  addAfter(view: BlockView, kind: Exclude<SegmentKind, 'front'>): void {
    const i = this.views.indexOf(view)
    this.structural(insertBlock(this.text, i + 1, kind), i + 1, true)
  }

  runCheck(check: number): void { void this.runChecks([check]) }

  stop(): void {
    if (!this.running) return
    this.running.stop = true
    this.kernel.stop()
  }

  // ---- structure -------------------------------------------------------------------------

  private structural(next: string, focusIndex: number, edit = false): void {
    if (next === this.text) return
    this.text = next
    this.rebuild()
    this.changed()
    const view = this.views[Math.min(focusIndex, this.views.length - 1)]
    if (view) {
      view.root.scrollIntoView({ block: 'nearest' })
      if (edit && view instanceof ProseView) view.edit()
      else if (view instanceof FormalView) view.editor.view.focus()
      else (view.root.querySelector('button') as HTMLElement | null)?.focus()
    }
  }

  /** Re-segments the text and rebuilds every view. */
  private rebuild(): void {
    for (const v of this.views) v.destroy()
    this.segs = segment(this.text)
    const keys = [{ key: 'Alt-Shift-c', run: () => { this.runFocusedCheck(); return true } }]
    this.views = this.segs.map((seg) =>
      seg.kind === 'prose' || seg.kind === 'front' ? new ProseView(this.host, seg, seg.kind === 'front') : new FormalView(this.host, seg, seg.kind, keys))
    this.docEl.replaceChildren(...this.views.map((v) => v.root))
    this.showTitle()
    // Earlier findings stay (out of date when their inputs changed) until the analysis re-sorts them.
    this.scheduleAnalysis(0)
  }

  /** The object handed to views: `text()` must be a method. */
  private get host(): BlockHost {
    const self = this // eslint-disable-line @typescript-eslint/no-this-alias
    return {
      text: () => self.text,
      edited: (v, c) => self.edited(v, c),
      proseDone: (v) => self.proseDone(v),
      move: (v, d) => self.move(v, d),
      remove: (v) => self.remove(v),
      addAfter: (v, k) => self.addAfter(v, k),
      lineOf: (o) => self.lineOf(o),
      runCheck: (c) => self.runCheck(c),
      stop: () => self.stop(),
    }
  }

  private showTitle(): void {
    const title = shownTitle(this.text)
    this.titleEl.textContent = title
    document.title = `${title} · twofold`
  }

  private changed(): void {
    this.scheduleAnalysis()
    this.keeper.changed()
  }

  /** Takes in a text from elsewhere (another tab, a merge), keeping the cursor's block and place. */
  private adopt(text: string): void {
    const active = document.activeElement
    const index = this.views.findIndex((v) => v.root.contains(active))
    const view = this.views[index]
    const at = view instanceof FormalView ? view.editor.view.state.selection.main.head : -1
    this.text = text
    this.rebuild()
    const again = this.views[index]
    if (at >= 0 && again instanceof FormalView) again.editor.jumpTo(at, false)
  }

  // ---- analysis and findings ---------------------------------------------------------------

  private scheduleAnalysis(delay = ANALYZE_DELAY): void {
    window.clearTimeout(this.analyzeTimer)
    this.analyzeTimer = window.setTimeout(() => void this.analyze(), delay)
  }

  /** Resolves once a model of the current text is in place. */
  private async analysis(): Promise<NotebookModel> {
    if (this.model && this.modelText === this.text) return this.model
    await new Promise<void>((resolve) => { this.analysisWaiters.push(resolve); this.scheduleAnalysis(0) })
    return this.analysis()
  }

  private async analyze(): Promise<void> {
    const text = this.text
    let model: NotebookModel
    try {
      model = await this.kernel.analyze(text)
    } catch (e) {
      this.notesEl.replaceChildren(el('p', {}, `The kernel could not read this notebook: ${(e as Error)?.message ?? e}`))
      return
    }
    if (text !== this.text) return // a newer analysis is already scheduled
    this.model = model
    this.modelText = text
    this.showDiagnostics(model)
    await this.updateChecks(model, text)
    const waiters = this.analysisWaiters.splice(0)
    for (const w of waiters) w()
  }

  private segmentAt(offset: number): number {
    return this.segs.findIndex((s) => offset >= s.contentFrom && offset <= s.contentTo)
  }

  private showDiagnostics(model: NotebookModel): void {
    const per = new Map<number, typeof model.diagnostics>()
    const loose: typeof model.diagnostics = []
    for (const d of model.diagnostics) {
      const i = this.segmentAt(d.from)
      if (i >= 0 && this.views[i] instanceof FormalView) {
        const list = per.get(i) ?? []
        list.push(d)
        per.set(i, list)
      } else loose.push(d)
    }
    this.views.forEach((v, i) => { if (v instanceof FormalView) v.diagnostics(per.get(i) ?? []) })
    this.notesEl.replaceChildren(...loose.map((d) =>
      el('p', { class: `diag diag-${d.severity}` }, `Line ${d.line}, column ${d.column}: ${d.message}`)))
  }

  private lineView(check: number): CheckLineView | undefined {
    for (const v of this.views) if (v instanceof FormalView) for (const l of v.checkLines) if (l.check === check) return l
    return undefined
  }

  private async updateChecks(model: NotebookModel, text: string): Promise<void> {
    const errors = model.diagnostics.some((d) => d.severity === 'error')
    const next: CheckState[] = []
    for (let c = 0; c < model.checks.length; c++) {
      const check = model.checks[c]
      const protocol = model.protocols[check.protocol]
      const propBlocks = [...new Map(check.properties.map((p) => [p.block.from, p.block])).values()]
      const inputs = JSON.stringify({ protocol: protocol.block.text, properties: propBlocks.map((b) => b.text), check: check.source })
      const deps = new Set([protocol.block.from, ...propBlocks.map((b) => b.from), check.block.from].map((o) => this.segmentAt(o)))
      const key = await digest(inputs)
      let rows = this.memo.get(key) ?? null
      if (!rows) {
        try { rows = (await this.shelf.result(key)) ?? null } catch { rows = null }
        if (rows) this.memo.set(key, rows)
      }
      const previous = this.checks.find((p) => p.source === check.source) ?? this.checks[c]
      const fresh = rows !== null
      const stopped = !fresh && previous?.key === key ? previous.stopped : null
      if (!rows && previous?.rows) rows = previous.rows
      next.push({ inputs, key, deps, source: check.source, rows, fresh, stopped })
    }
    if (text !== this.text) return
    this.checks = next
    this.showSummary()
    // Lay out check lines under their blocks.
    this.views.forEach((v, i) => {
      if (!(v instanceof FormalView) || !v.checksBox) return
      const mine = model.checks.map((c, k) => ({ c, k })).filter(({ c }) => this.segmentAt(c.block.from) === i)
      const keep = v.checkLines.length === mine.length && v.checkLines.every((l, j) => l.check === mine[j].k && l.root.dataset.source === mine[j].c.source)
      if (!keep) {
        v.checkLines = mine.map(({ c, k }) => {
          const line = new CheckLineView(this.host, k, c.source)
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

  private runFocusedCheck(): void {
    const active = document.activeElement?.closest('.block-check')
    const view = this.views.find((v) => v.root === active)
    if (view instanceof FormalView && view.checkLines.length) void this.runChecks(view.checkLines.map((l) => l.check))
  }

  /** Runs every check whose findings are missing or out of date (quietly when there are none: exports call it). */
  async runChanged(quiet = false): Promise<void> {
    await this.analysis()
    const todo = this.checks.map((c, i) => (c.fresh ? -1 : i)).filter((i) => i >= 0)
    if (!todo.length) { if (!quiet) this.notice('Every check is up to date.'); return }
    await this.runChecks(todo)
  }

  /** Runs every check again, up to date or not. */
  async runAll(): Promise<void> {
    await this.analysis()
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
    const model = await this.analysis()
    const problems = importProblems(model)
    if (problems.length) { this.notice(`Fix the errors first: ${problems[0]}`); return }
    const text = this.text
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
          const plan = await this.kernel.plan(text, c)
          planned = plan.length
          for (let r = 0; r < plan.length && !this.running.stop; r++) {
            rows.push(await this.kernel.run(text, plan[r], (p) => this.lineView(c)?.progress(p, r, plan.length)))
          }
        } catch (e) {
          this.lineView(c)?.running(false)
          if (!(e instanceof StoppedError)) { this.lineView(c)?.note(`the kernel failed: ${(e as Error)?.message ?? e}`); continue }
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
      if (this.text !== text) this.scheduleAnalysis(0)
    }
  }

  /** Shows and keeps the rows of a check that ran (a stopped check is shown, not cached). */
  private finished(c: number, key: string, rows: CheckRow[], stopped: string | null): void {
    if (!stopped) {
      this.memo.set(key, rows)
      this.shelf.putResult(key, rows).catch((e) => this.notice(`Could not keep the findings in the browser: ${(e as Error)?.message ?? e}`))
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
    const errors = this.model?.diagnostics.some((d) => d.severity === 'error') ?? false
    for (const v of this.views) if (v instanceof FormalView) for (const l of v.checkLines) l.setRunnable(on && !errors, on ? 'fix the errors in the notebook first' : 'another check is running')
  }

  // ---- page events -----------------------------------------------------------------------

  private onDocClick(e: MouseEvent): void {
    const a = (e.target as HTMLElement).closest<HTMLAnchorElement>('a.jump')
    if (!a) return
    e.preventDefault()
    this.jumpToLine(Number(a.dataset.line), Number(a.dataset.column))
  }

  /** Puts the cursor at a notebook line and column, in the editor of the block that holds it. */
  jumpToLine(line: number, column: number): void {
    const starts = lineStarts(this.text)
    const offset = Math.min((starts[line - 1] ?? this.text.length) + Math.max(column - 1, 0), this.text.length)
    const i = this.segmentAt(offset)
    const view = this.views[i]
    if (view instanceof FormalView) view.editor.jumpTo(offset - view.seg.contentFrom)
    else view?.root.scrollIntoView({ block: 'center' })
  }

  private onHover(e: Event): void {
    const target = (e.target as Element).closest?.('[data-tick]')
    const witness = (e.target as Element).closest?.('.witness')
    if (!witness) return
    const tick = target?.getAttribute('data-tick') ?? null
    for (const n of witness.querySelectorAll('.lit')) n.classList.remove('lit')
    if (tick !== null) for (const n of witness.querySelectorAll(`[data-tick="${CSS.escape(tick)}"]`)) n.classList.add('lit')
  }

  private notice(message: string, action?: NoticeAction): void { this.notices.show(message, action) }

  // ---- notebooks -------------------------------------------------------------------------

  private flushSave(): Promise<void> { return this.keeper.flush() }

  async openNotebook(id: string): Promise<void> {
    await this.flushSave()
    try {
      const entry = await this.shelf.load(id)
      if (!entry) { this.notice('That notebook is no longer kept in this browser.'); return }
      // Which notebook is open is a convenience for the next visit; a refused write must not stop the opening.
      await this.shelf.setOpenId(id).catch(() => undefined)
      this.load(entry)
      await this.shelfPanel.refresh()
    } catch (e) {
      this.notice(`Could not open the notebook: ${(e as Error)?.message ?? e}`)
    }
  }

  private async rename(id: string, title: string): Promise<void> {
    if (id === this.id) {
      this.text = withTitle(this.text, title)
      this.rebuild()
      this.changed()
      await this.flushSave()
      return
    }
    const entry = await this.shelf.load(id)
    if (entry) await this.shelf.save(id, withTitle(entry.text, title))
    await this.shelfPanel.refresh()
  }

  private async afterDelete(entry: StoredNotebook): Promise<void> {
    if (entry.id === this.id) {
      // The deleted notebook stays stored through its undo window: never reopen it here.
      const list = (await this.shelf.list()).filter((n) => n.id !== entry.id)
      if (list.length) await this.openNotebook(list[0].id)
      else await this.newNotebook(this.guide)
    }
  }

  // No front matter: the title follows the first heading until the notebook is renamed.
  private async newNotebook(text = '# Untitled notebook\n\nWrite what the protocol is for here.\n\n'): Promise<void> {
    try {
      await this.createNotebook(text)
    } catch (e) {
      this.notice(`Could not create a notebook in this browser: ${(e as Error)?.message ?? e}`)
    }
  }

  /** Stores a new notebook and opens it; rejects when the browser refuses to store it. */
  private async createNotebook(text: string): Promise<void> {
    await this.flushSave()
    const entry = await this.shelf.save(newId(), text)
    await this.openNotebook(entry.id)
  }

  private async addGuide(): Promise<void> { await this.newNotebook(this.guide) }

  /** Imports a `.md` file: adds it only when it is text and reads without errors. */
  async importFile(file: File): Promise<boolean> {
    try {
      const text = decodeText(new Uint8Array(await file.arrayBuffer()))
      const problems = importProblems(await this.kernel.analyze(text))
      if (problems.length) throw new ImportRefused(problems)
      await this.createNotebook(text)
      this.notice(`Imported ${file.name}.`)
      return true
    } catch (e) {
      const reasons = e instanceof ImportRefused ? e.reasons : [`this browser refused to store it (${(e as Error)?.message ?? e})`]
      const shown = reasons.slice(0, 3).join('; ') + (reasons.length > 3 ? `; and ${reasons.length - 3} more` : '')
      this.notice(`Nothing was imported from ${file.name}: ${shown}.`)
      return false
    }
  }

  // ---- exports ---------------------------------------------------------------------------

  private get exportHost(): ExportHost {
    return {
      text: () => this.text,
      segments: () => this.segs,
      segmentAt: (o) => this.segmentAt(o),
      checks: () => this.checks,
      kernel: this.kernel,
      analysis: () => this.analysis(),
      runChanged: () => this.runChanged(true),
      notice: (m) => this.notice(m),
    }
  }
}
