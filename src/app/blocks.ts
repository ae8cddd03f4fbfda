// The views of the notebook's blocks: prose (rendered, edited as Markdown on demand) and formal
// blocks (a CodeMirror editor, its diagnostics, typeset properties, and for checks the findings).
// A view holds its segment (offsets into the notebook text) and reports edits to its host; it
// never keeps a copy of the text that could drift from the notebook.
import { printProperties, type CheckRow, type Progress } from '../../kernels/api'
import { button, el } from './dom'
import { atomColour, counterexampleSvg, filledIn } from './diagram'
import { parser } from '../../kernels/language/parser.js'
import { BlockEditor, type NotebookDiagnostic } from './editor'
import { renderProse, toFragment } from './markdown'
import { findingsMarkdown, findingsMarkup } from './results'
import type { Segment, SegmentKind } from './segments'
import { texToHtml } from './tex'

/** What a block view asks of the workbench. */
export interface BlockHost {
  /** The notebook text now. */
  text(): string
  /** The block's content changed to `content`. */
  edited(view: BlockView, content: string): void
  /** A prose block left editing (its segment may now split or merge). */
  proseDone(view: BlockView): void
  move(view: BlockView, direction: -1 | 1): void
  remove(view: BlockView): void
  addAfter(view: BlockView, kind: Exclude<SegmentKind, 'front'>): void
  /** The notebook line number of an offset. */
  lineOf(offset: number): number
  runCheck(check: number): void
  stop(): void
}

/** Either kind of block view. */
export type BlockView = ProseView | FormalView

const DECL_OF: Partial<Record<SegmentKind, string>> = { protocol: 'ProtocolDecl', property: 'PropertyDecl', check: 'CheckDecl' }

/** What a formal block defines, read with the kernel's parser: its protocol, its properties, or the protocols it checks. */
function describeBlock(kind: SegmentKind, content: string): string {
  const decl = DECL_OF[kind]
  if (!decl) return ''
  const names: string[] = []
  for (let d = parser.parse(content).topNode.firstChild; d; d = d.nextSibling) {
    const id = d.name === decl ? d.getChild('Identifier') : null
    if (id) names.push(content.slice(id.from, id.to))
  }
  return (kind === 'protocol' ? names.slice(0, 1) : [...new Set(names)]).join(', ')
}

const KIND_WORDS: Record<SegmentKind, string> = { front: 'front matter', prose: 'text', protocol: 'protocol', property: 'properties', check: 'checks' }

function tools(host: BlockHost, view: BlockView, kind: SegmentKind, name: () => string): HTMLElement {
  const label = () => `${KIND_WORDS[kind]} block${name() ? ' ' + name() : ''}`
  const add = el('details', { class: 'add' },
    el('summary', { 'aria-label': 'insert a block after this one' }, 'insert after'),
    el('div', { class: 'add-menu' },
      ...(['prose', 'protocol', 'property', 'check'] as const).map((k) =>
        button(KIND_WORDS[k], (e) => { (e.currentTarget as HTMLElement).closest('details')!.open = false; host.addAfter(view, k) }, { 'aria-label': `insert a ${KIND_WORDS[k]} block after this one` }))))
  const bar = el('div', { class: 'block-tools' },
    button('↑', () => host.move(view, -1), { 'aria-label': 'move this block up', title: 'move up' }),
    button('↓', () => host.move(view, 1), { 'aria-label': 'move this block down', title: 'move down' }),
    button('remove', () => host.remove(view), { 'aria-label': 'remove this block' }),
    add)
  bar.setAttribute('aria-label', 'block controls')
  bar.addEventListener('focusin', () => bar.setAttribute('aria-label', `controls of the ${label()}`))
  roving(bar)
  return bar
}

/**
 * Makes a toolbar one tab stop: the arrow keys (and Home, End) move between its controls, and Tab
 * leaves it. The control focused last is the one Tab comes back to.
 */
export function roving(bar: HTMLElement): void {
  bar.setAttribute('role', 'toolbar')
  const items = () => [...bar.querySelectorAll<HTMLElement>('button, summary')].filter((b) => b.getClientRects().length > 0 || b.tagName === 'SUMMARY')
  const settle = (current: HTMLElement | undefined) => {
    for (const b of bar.querySelectorAll<HTMLElement>('button, summary')) b.tabIndex = b === current ? 0 : -1
  }
  // Until the first focus, the first control is the tab stop.
  queueMicrotask(() => settle(bar.querySelector<HTMLElement>('button, summary') ?? undefined))
  bar.addEventListener('focusin', (e) => { if (e.target instanceof HTMLElement && e.target.matches('button, summary')) settle(e.target) })
  bar.addEventListener('keydown', (e) => {
    const list = items()
    const i = list.indexOf(document.activeElement as HTMLElement)
    if (i < 0) return
    const next = e.key === 'ArrowRight' || e.key === 'ArrowDown' ? (i + 1) % list.length
      : e.key === 'ArrowLeft' || e.key === 'ArrowUp' ? (i - 1 + list.length) % list.length
        : e.key === 'Home' ? 0 : e.key === 'End' ? list.length - 1 : -1
    if (next < 0) return
    e.preventDefault()
    list[next].focus()
  })
}

/** A prose block: Markdown shown rendered; editing swaps in a text area until done. */
export class ProseView {
  readonly kind = 'prose' as const
  readonly root: HTMLElement
  private shown = el('div', { class: 'prose-rendered' })
  private area: HTMLTextAreaElement | null = null

  constructor(private host: BlockHost, public seg: Segment, readonly front = false) {
    this.root = el('section', { class: front ? 'block block-front' : 'block block-prose' })
    this.shown.tabIndex = 0
    this.shown.setAttribute('role', 'region')
    this.shown.setAttribute('aria-label', front ? 'front matter (press Enter to edit)' : 'text block (press Enter to edit)')
    this.shown.addEventListener('dblclick', () => this.edit())
    this.shown.addEventListener('keydown', (e) => { if (e.key === 'Enter' && e.target === this.shown) { e.preventDefault(); this.edit() } })
    const editButton = button('edit', () => this.edit(), { class: 'edit-prose', 'aria-label': front ? 'edit the front matter' : 'edit this text' })
    this.root.append(front ? el('div', { class: 'block-tools' }, editButton) : tools(host, this, 'prose', () => ''), this.shown)
    if (!front) this.root.querySelector('.block-tools')!.prepend(editButton)
    this.render()
  }

  private content(): string {
    return this.host.text().slice(this.seg.contentFrom, this.seg.contentTo)
  }

  /** Renders the Markdown (sanitized) into the block. */
  render(): void {
    const src = this.content()
    if (this.front) {
      // The front matter reads as a quiet line of metadata; its `---` fences are syntax, not content.
      const lines = src.split('\n').filter((l) => l.trim() && !/^---\s*$/.test(l))
      this.shown.replaceChildren(el('div', { class: 'front-text' }, lines.join(' · ') || 'front matter'))
      return
    }
    this.shown.replaceChildren(toFragment(renderProse(src)))
    if (!src.trim()) this.shown.append(el('p', { class: 'quiet' }, 'Empty text block.'))
  }

  get editing(): boolean { return this.area !== null }

  /** Switches to the Markdown source. */
  edit(): void {
    if (this.area) return
    const area = el('textarea', { class: 'prose-source', 'aria-label': this.front ? 'front matter source' : 'Markdown source of this text block', spellcheck: 'true' })
    area.value = this.content()
    const fit = () => { area.style.height = 'auto'; area.style.height = area.scrollHeight + 4 + 'px' }
    area.addEventListener('input', () => { this.host.edited(this, area.value); fit() })
    area.addEventListener('keydown', (e) => { if (e.key === 'Escape') { e.preventDefault(); this.done() } })
    area.addEventListener('blur', () => this.done())
    this.area = area
    this.shown.replaceWith(area)
    fit()
    area.focus()
  }

  /** Leaves the source and shows the rendered text again. */
  done(): void {
    if (!this.area) return
    const area = this.area
    this.area = null
    area.replaceWith(this.shown)
    this.render()
    this.host.proseDone(this)
  }

  moved(): void {}
  destroy(): void {}
}

/** The status and findings of one check line inside a check block. */
export class CheckLineView {
  readonly root: HTMLElement
  private status = el('span', { class: 'check-status', role: 'status', 'aria-live': 'polite' })
  private findings = el('div', { class: 'check-findings' })
  private runButton: HTMLButtonElement
  private stopButton: HTMLButtonElement
  private shownRows: CheckRow[] | null = null
  private shownFresh = false
  private shownStopped: string | null = null
  private staleNote = el('p', { class: 'stale-note' }, 'Out of date: the check, its protocol or a property it uses changed since this ran.')

  constructor(host: BlockHost, readonly check: number, source: string) {
    this.runButton = button('check it', () => host.runCheck(this.check), { class: 'run', 'aria-label': `run: ${source}`, 'aria-keyshortcuts': 'Alt+Shift+C', title: 'Alt-Shift-C in the check editor runs its checks' })
    this.stopButton = button('stop', () => host.stop(), { class: 'stop', 'aria-label': `stop: ${source}`, hidden: true })
    this.root = el('div', { class: 'check-line', 'data-check': String(check), id: `check-${check}` },
      el('div', { class: 'check-head' }, el('code', { class: 'check-source' }, source), this.runButton, this.stopButton, this.status),
      this.staleNote, this.findings)
    this.staleNote.hidden = true
  }

  /** Shows rows (or nothing yet), fresh or out of date. */
  show(rows: CheckRow[] | null, fresh: boolean, stopped: string | null = null): void {
    // Every analysis re-shows every line; drawing the same rows again would only cost time.
    if (rows === this.shownRows && fresh === this.shownFresh && stopped === this.shownStopped && rows) return
    this.shownRows = rows
    this.shownFresh = fresh
    this.shownStopped = stopped
    // A stopped check is not out of date: its inputs did not change, it did not finish.
    this.root.classList.toggle('stale', !!rows && !fresh && !stopped)
    this.root.classList.toggle('fresh', !!rows && fresh)
    this.root.classList.toggle('stopped', !!rows && !!stopped)
    this.staleNote.hidden = !rows || fresh || !!stopped
    if (!rows) {
      this.findings.replaceChildren()
      if (!this.root.classList.contains('running')) this.status.textContent = 'not checked yet'
      return
    }
    if (!this.root.classList.contains('running')) this.status.textContent = stopped ? stoppedWords(rows) : fresh ? 'checked' : 'out of date'
    const copy = button('copy the table as Markdown', () => void this.copyTable(rows), { class: 'copy-md', 'aria-label': 'copy this result table as Markdown' })
    this.findings.replaceChildren(toFragment(findingsMarkup(rows, { unfinished: stopped ?? undefined })), el('div', { class: 'findings-tools' }, copy))
    for (const tr of this.findings.querySelectorAll<HTMLElement>('tr[data-tick]')) tr.tabIndex = 0
    for (const w of this.findings.querySelectorAll<HTMLElement>('.witness[data-row]')) {
      const row = rows.find((r) => String(r.row) === w.dataset.row)
      if (row?.counterexample?.atoms?.length) w.querySelector('.witness-message')!.after(this.atomChooser(row, w.querySelector('.diagram')!))
    }
  }

  private async copyTable(rows: CheckRow[]): Promise<void> {
    const text = findingsMarkdown(rows)
    try { await navigator.clipboard.writeText(text); this.status.textContent = 'table copied as Markdown' } catch {
      // No clipboard permission: show the text selected, for the user to copy.
      const area = el('textarea', { class: 'copy-text', readonly: true, 'aria-label': 'the result table as Markdown' })
      area.value = text
      this.findings.append(area)
      area.select()
    }
  }

  /** Checkboxes that choose which atoms the diagram shades. */
  private atomChooser(row: CheckRow, diagram: Element): HTMLElement {
    const cx = row.counterexample!
    const chosen = new Set(cx.atoms!.map((_, i) => i))
    const boxes = cx.atoms!.map((a, i) => {
      const box = el('input', { type: 'checkbox', checked: true })
      box.addEventListener('change', () => {
        if (box.checked) chosen.add(i)
        else chosen.delete(i)
        diagram.replaceChildren(toFragment(counterexampleSvg(cx, row.processes, { atoms: [...chosen], assignment: row.assignment })))
      })
      return el('label', { class: 'atom-choice' }, box, el('span', { class: 'swatch', style: `background:${atomColour(i)}` }), filledIn(a.text, row.assignment))
    })
    return el('fieldset', { class: 'atom-chooser' }, el('legend', {}, 'shade where these hold'), ...boxes)
  }

  /** Marks the shown rows out of date at once (before the kernel has re-read the notebook). */
  markStale(): void {
    if (!this.root.classList.contains('fresh')) return
    this.shownFresh = false
    this.root.classList.replace('fresh', 'stale')
    this.staleNote.hidden = false
    if (!this.root.classList.contains('running')) this.status.textContent = 'out of date'
  }

  setRunnable(ok: boolean, why: string): void {
    this.runButton.disabled = !ok
    this.runButton.title = ok ? 'Alt-Shift-C in the check editor runs its checks' : why
  }

  running(on: boolean, text = ''): void {
    this.root.classList.toggle('running', on)
    this.runButton.hidden = on
    this.stopButton.hidden = !on
    this.status.textContent = text
  }

  /** Shows a running row's counts; `where` says which row (`row 2 of 5`, `for the record`). */
  progress(p: Progress, where: string): void {
    const n = (x: number) => Math.round(x).toLocaleString('en-US')
    const workers = p.workers ?? 1
    this.status.textContent = `${where}: ${p.property} with ${p.processes} ${p.processes === 1 ? 'process' : 'processes'} · ${n(p.states)} states · ${n(p.statesPerSecond)} states/s · ${p.seconds.toFixed(1)} s · on ${workers} ${workers === 1 ? 'worker' : 'workers'}`
  }

  note(text: string): void { this.status.textContent = text }
}

/** The status of a stopped check: "stopped after N states: inconclusive". */
export function stoppedWords(rows: CheckRow[]): string {
  const states = rows.reduce((n, r) => n + r.states, 0)
  return `stopped after ${states.toLocaleString('en-US')} states: inconclusive`
}

/** A formal block: its editor, diagnostics list, and what its kind adds. */
export class FormalView {
  readonly root: HTMLElement
  readonly editor: BlockEditor
  private diagList = el('ul', { class: 'diagnostics', 'aria-label': 'problems in this block' })
  private typeset: HTMLElement | null = null
  readonly checksBox: HTMLElement | null = null
  private nameEl = el('span', { class: 'block-name' })
  checkLines: CheckLineView[] = []

  constructor(private host: BlockHost, public seg: Segment, readonly kind: 'protocol' | 'property' | 'check', checkKeys: { key: string; run: () => boolean }[]) {
    const content = host.text().slice(seg.contentFrom, seg.contentTo)
    this.root = el('section', { class: `block block-formal block-${kind}` })
    const label = el('div', { class: 'block-label' }, el('span', { class: 'block-kind' }, KIND_WORDS[kind]), this.nameEl)
    const editorBox = el('div', { class: 'editor' })
    const body = el('div', { class: 'formal-body' }, editorBox)
    this.root.append(tools(host, this, kind, () => this.nameEl.textContent ?? ''), label, body, this.diagList)
    this.diagList.hidden = true
    this.editor = new BlockEditor(editorBox, content, {
      onChange: (c) => host.edited(this, c),
      firstLine: () => host.lineOf(this.seg.contentFrom),
      label: `${KIND_WORDS[kind]} block source`,
      keys: kind === 'check' ? checkKeys : undefined,
    })
    if (kind === 'property') {
      this.typeset = el('div', { class: 'typeset', 'aria-label': 'the properties typeset' })
      body.append(this.typeset)
    }
    if (kind === 'check') {
      this.checksBox = el('div', { class: 'checks' })
      this.root.append(this.checksBox)
    }
    this.refresh(content)
  }

  /** Updates what is derived from the block text alone (name, typeset formulas). */
  refresh(content = this.host.text().slice(this.seg.contentFrom, this.seg.contentTo)): void {
    this.nameEl.textContent = describeBlock(this.kind, content)
    if (this.typeset) {
      const props = printProperties(content)
      this.typeset.replaceChildren(...props.map((p) => {
        const item = el('div', { class: 'typeset-item' }, el('span', { class: 'typeset-name' }, p.name))
        if (p.tex) item.append(toFragment(texToHtml(p.tex)))
        else item.append(el('span', { class: 'quiet' }, ' (not typeset until it reads as a formula)'))
        return item
      }))
    }
  }

  /** The block moved in the notebook (text above it changed length or lines). */
  moved(): void { this.editor.renumber() }

  /** Shows the kernel's diagnostics for this block (notebook offsets). */
  diagnostics(list: (NotebookDiagnostic & { line: number; column: number })[]): void {
    this.editor.showDiagnostics(list, this.seg.contentFrom)
    this.diagList.hidden = list.length === 0
    this.diagList.replaceChildren(...list.map((d) => {
      const jump = button(`line ${d.line}, column ${d.column}`, () => this.editor.jumpTo(d.from - this.seg.contentFrom), { class: 'jump-inline' })
      return el('li', { class: `diag diag-${d.severity}` }, jump, ` ${d.severity === 'error' ? 'error' : 'note'}: `, d.message)
    }))
  }

  destroy(): void { this.editor.destroy() }
}
