// The workbench: one open notebook, its block views, the kernel, the shelf and the findings.
// The notebook text is the single source of truth. Block edits replace a content span; structural
// edits (insert, move, remove, prose that gains a heading) re-segment the text and rebuild the
// views. Typing never waits for the kernel: analysis is debounced and runs in its own worker, and
// results are marked out of date synchronously from the dependencies of the last analysis.
import { errorText, type NotebookModel } from '../../kernels/api'
import { FormalView, ProseView, type BlockHost, type BlockView } from './blocks'
import { el } from './dom'
import { exportMarkdown, exportRecord, exportReport, type ExportHost } from './exports'
import { Keeper } from './keeper'
import { Kernel } from './kernel'
import { Notices, type NoticeAction } from './notices'
import { deleteBlock, insertBlock, lineAt, moveBlock, replaceContent, segment, type Segment, type SegmentKind } from './segments'
import { Shelf, shownTitle, type StoredNotebook } from './store'
import { ShelfPanel } from './shelf-panel'
import { lightTick, topBar } from './header'
import { Findings } from './findings'
import { jumpTo, onJumpClick, placeDiagnostics } from './diagnostics'
import { Notebooks } from './notebooks'
import { withTitle } from './title'

const ANALYZE_DELAY = 250

/** The page. */
export class Workbench {
  private text = ''
  private id = ''
  private segs: Segment[] = []
  private views: BlockView[] = []
  private model: NotebookModel | null = null
  private modelText: string | null = null
  private analyzeTimer = 0
  private kernel = new Kernel()
  private findings: Findings
  private notebooks: Notebooks
  private shelfPanel: ShelfPanel
  private docEl = el('article', { class: 'notebook', 'aria-label': 'notebook' })
  private notesEl = el('div', { class: 'notebook-problems', role: 'alert' })
  private saveEl = el('span', { class: 'save-state', role: 'status', 'aria-live': 'polite' })
  private notices = new Notices()
  private keeper: Keeper
  private titleEl = el('h1', { class: 'doc-title' })
  private analysisWaiters: (() => void)[] = []

  constructor(private root: HTMLElement, private shelf: Shelf, private guide: string) {
    this.shelfPanel = new ShelfPanel(shelf, {
      open: (id) => void this.notebooks.openNotebook(id),
      current: () => this.id,
      rename: (id, title) => this.notebooks.rename(id, title),
      duplicated: (entry) => void this.notebooks.openNotebook(entry.id),
      deleted: (entry) => this.notebooks.afterDelete(entry),
      created: () => void this.notebooks.newNotebook(),
      imported: (file) => this.notebooks.importFile(file),
      restoreGuide: () => void this.notebooks.addGuide(),
      notice: (m, action) => this.notice(m, action),
      exportText: (text) => exportMarkdown(text),
    })
    this.notebooks = new Notebooks(shelf, guide, {
      id: () => this.id,
      load: (entry) => this.load(entry),
      retitle: (title) => { this.text = withTitle(this.text, title); this.rebuild(); this.changed() },
      flush: () => this.keeper.flush(),
      analyze: (text) => this.kernel.analyze(text),
      notice: (m) => this.notice(m),
      shelfChanged: () => this.shelfPanel.refresh(),
    })
    this.findings = new Findings({
      text: () => this.text,
      views: () => this.views,
      segmentAt: (o) => this.segmentAt(o),
      analysis: () => this.analysis(),
      model: () => this.model,
      kernel: this.kernel,
      shelf,
      notice: (m) => this.notice(m),
      blockHost: () => this.host,
      reanalyze: () => this.scheduleAnalysis(0),
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
    const { bar, dialog } = topBar(this.titleEl, this.saveEl, {
      runChanged: () => void this.findings.runChanged(),
      runAll: () => void this.findings.runAll(),
      exportMarkdown: () => exportMarkdown(this.text),
      exportRecord: () => void exportRecord(this.exportHost),
      exportReport: () => void exportReport(this.exportHost),
    })
    const main = el('main', { class: 'page' }, this.notices.root, this.notesEl, this.findings.summaryEl, this.docEl)
    this.root.replaceChildren(bar, el('div', { class: 'columns' }, this.shelfPanel.root, main), dialog)
    this.docEl.addEventListener('click', (e) => onJumpClick(e, (line, column) => this.jumpToLine(line, column)))
    this.docEl.addEventListener('mouseover', lightTick)
    this.docEl.addEventListener('focusin', lightTick)
  }

  /** Opens the notebook kept as open last time, or the guide on a first visit. */
  start(): Promise<void> { return this.notebooks.start() }

  private load(stored: StoredNotebook): void {
    const entry = this.keeper.opened(stored)
    this.id = entry.id
    this.text = entry.text
    this.findings.reset()
    this.model = null
    this.modelText = null
    this.rebuild()
    this.saveEl.textContent = `kept in this browser · ${new Date(entry.changed).toLocaleString()}`
  }

  // ---- what block views ask for (BlockHost, through `host`) -------------------------------------------------------------------------

  lineOf(offset: number): number { return lineAt(this.text, offset) }


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
    this.findings.segmentEdited(index)
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

  runCheck(check: number): void { this.findings.run(check) }

  stop(): void { this.findings.stop() }

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
    const keys = [{ key: 'Alt-Shift-c', run: () => { this.findings.runFocused(); return true } }]
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
      this.notesEl.replaceChildren(el('p', {}, `The kernel could not read this notebook: ${errorText(e)}`))
      return
    }
    if (text !== this.text) return // a newer analysis is already scheduled
    this.model = model
    this.modelText = text
    this.showDiagnostics(model)
    await this.findings.update(model, text)
    const waiters = this.analysisWaiters.splice(0)
    for (const w of waiters) w()
  }

  private segmentAt(offset: number): number {
    return this.segs.findIndex((s) => offset >= s.contentFrom && offset <= s.contentTo)
  }

  private showDiagnostics(model: NotebookModel): void {
    this.notesEl.replaceChildren(...placeDiagnostics(model.diagnostics, this.views, (o) => this.segmentAt(o)))
  }


  // ---- page events -----------------------------------------------------------------------



  /** Puts the cursor at a notebook line and column, in the editor of the block that holds it. */
  jumpToLine(line: number, column: number): void { jumpTo(this.text, this.views, (o) => this.segmentAt(o), line, column) }




  private notice(message: string, action?: NoticeAction): void { this.notices.show(message, action) }

  // ---- exports ---------------------------------------------------------------------------

  private get exportHost(): ExportHost {
    return {
      text: () => this.text,
      segments: () => this.segs,
      segmentAt: (o) => this.segmentAt(o),
      checks: () => this.findings.checks,
      analysis: () => this.analysis(),
      digest: async (text) => (await this.kernel.digests([text]))[0],
      record: (path) => this.findings.record(path),
    }
  }
}
