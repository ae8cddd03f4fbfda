// The page's top line: the name, the open notebook's title, the run buttons, the export menu, the
// shortcut list and the save state. At 800 px it stays one row (see style.css).
import { button, el } from './dom'
import { shortcutsDialog } from './shortcuts'

/** What the header's controls do. */
export interface HeaderActions {
  runChanged(): void
  runAll(): void
  exportMarkdown(): void
  exportRecord(): void
  exportReport(): void
}

/** Builds the header (and the shortcut dialog it opens, to be placed in the page). */
export function topBar(title: HTMLElement, saveState: HTMLElement, act: HeaderActions): { bar: HTMLElement; dialog: HTMLDialogElement } {
  const runChanged = button('run what changed', () => act.runChanged(), { class: 'primary', 'aria-label': 'run every check whose inputs changed' })
  const runAll = button('run every check', () => act.runAll(), { 'aria-label': 'run every check in the notebook again' })
  const closeMenu = (e: Event) => { (e.currentTarget as HTMLElement).closest('details')!.open = false }
  const exports = el('details', { class: 'exports' },
    el('summary', { 'aria-label': 'save the notebook, its record or a report as a file' }, 'save as…'),
    el('div', { class: 'exports-menu', role: 'group', 'aria-label': 'export' },
      button('notebook .md', (e) => { closeMenu(e); act.exportMarkdown() }, { 'aria-label': 'export the notebook as Markdown' }),
      button('record .json', (e) => { closeMenu(e); act.exportRecord() }, { 'aria-label': 'export the verification record as JSON' }),
      button('report .html', (e) => { closeMenu(e); act.exportReport() }, { 'aria-label': 'export a self-contained HTML report' })))
  const keys = shortcutsDialog()
  const bar = el('header', { class: 'topbar' },
    el('div', { class: 'brand' }, 'twofold'),
    title,
    el('div', { class: 'actions' }, runChanged, runAll, exports, keys.opener, saveState))
  document.addEventListener('keydown', (e) => {
    const t = e.target as HTMLElement
    if (e.key === '?' && !t.closest('input, textarea, .cm-editor, [contenteditable]')) { e.preventDefault(); keys.open() }
  })
  return { bar, dialog: keys.dialog }
}

/** Lights the diagram band and the table row of the tick under the pointer or focus, in one counterexample. */
export function lightTick(e: Event): void {
  const target = (e.target as Element).closest?.('[data-tick]')
  const witness = (e.target as Element).closest?.('.witness')
  if (!witness) return
  const tick = target?.getAttribute('data-tick') ?? null
  for (const n of witness.querySelectorAll('.lit')) n.classList.remove('lit')
  if (tick !== null) for (const n of witness.querySelectorAll(`[data-tick="${CSS.escape(tick)}"]`)) n.classList.add('lit')
}
