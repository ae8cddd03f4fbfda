// Placing the kernel's diagnostics: each goes to the formal block that holds it (underlined in its
// editor and listed under it); the rest (prose, front matter) are listed above the notebook. Links
// to a line (diagnostics, reasons, model errors) bring that line into view in its editor.
import type { NotebookModel } from '../../kernels/api'
import { FormalView, type BlockView } from './blocks'
import { el } from './dom'
import { offsetOf } from './segments'

/** Hands each formal view its diagnostics; returns the lines for the ones no formal block holds. */
export function placeDiagnostics(diagnostics: NotebookModel['diagnostics'], views: BlockView[], segmentAt: (offset: number) => number): HTMLElement[] {
  const per = new Map<number, NotebookModel['diagnostics']>()
  const loose: NotebookModel['diagnostics'] = []
  for (const d of diagnostics) {
    const i = segmentAt(d.from)
    if (i >= 0 && views[i] instanceof FormalView) per.set(i, [...(per.get(i) ?? []), d])
    else loose.push(d)
  }
  views.forEach((v, i) => { if (v instanceof FormalView) v.diagnostics(per.get(i) ?? []) })
  return loose.map((d) => el('p', { class: `diag diag-${d.severity}` }, `Line ${d.line}, column ${d.column}: ${d.message}`))
}

/** Puts the cursor at a notebook line and column, in the editor of the block that holds it. */
export function jumpTo(text: string, views: BlockView[], segmentAt: (offset: number) => number, line: number, column: number): void {
  const offset = offsetOf(text, line, column)
  const view = views[segmentAt(offset)]
  if (view instanceof FormalView) view.editor.jumpTo(offset - view.seg.contentFrom)
  else view?.root.scrollIntoView({ block: 'center' })
}

/** Follows a click on a `a.jump` link (data-line, data-column) instead of navigating. */
export function onJumpClick(e: MouseEvent, jump: (line: number, column: number) => void): void {
  const a = (e.target as HTMLElement).closest<HTMLAnchorElement>('a.jump')
  if (!a) return
  e.preventDefault()
  jump(Number(a.dataset.line), Number(a.dataset.column))
}
