// Placing the kernel's diagnostics: each goes to the formal block that holds it (underlined in its
// editor and listed under it); the rest (prose, front matter) are listed above the notebook.
import type { NotebookModel } from '../../kernels/language/model'
import { FormalView, type BlockView } from './blocks'
import { el } from './dom'

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
