// The list of keyboard shortcuts: a dialog opened from the header's "keys" button or by `?`
// anywhere outside an editor. One table, so the page and the list never disagree.
import { button, el } from './dom'

/** Every shortcut the workbench binds, as [keys, what they do]. */
export const SHORTCUTS: [string, string][] = [
  ['?', 'show this list (outside an editor)'],
  ['Tab, Shift-Tab', 'move through the page; Tab never changes the notebook'],
  ['Enter', 'new line, indented like the block around it; in a text block shown rendered, edit it'],
  ['}', 'typed at the start of a line, dedents it'],
  ['Ctrl-] / Ctrl-[  (⌘ on a Mac)', 'indent or dedent the selected lines in a formal block'],
  ['Ctrl-F  (⌘-F)', 'search inside the focused formal block; Enter and Shift-Enter find the next and previous match'],
  ['Alt-Shift-C', 'in a check block, run its checks'],
  ['Escape', 'leave a text block’s Markdown source'],
  ['arrow keys, Home, End', 'move between the controls of a block’s toolbar'],
  ['Ctrl-Z, Ctrl-Shift-Z', 'undo and redo inside a formal block'],
]

/** The dialog and the button that opens it. */
export function shortcutsDialog(): { dialog: HTMLDialogElement; opener: HTMLButtonElement; open: () => void } {
  const dialog = el('dialog', { class: 'shortcuts', 'aria-label': 'keyboard shortcuts' })
  const rows = SHORTCUTS.map(([k, what]) => el('tr', {}, el('th', { scope: 'row' }, el('kbd', {}, k)), el('td', {}, what)))
  dialog.append(
    el('h2', {}, 'Keyboard shortcuts'),
    el('table', {}, el('tbody', {}, ...rows)),
    button('close', () => dialog.close(), { class: 'close-shortcuts' }))
  const open = () => { if (!dialog.open) dialog.showModal() }
  const opener = button('keys', open, { 'aria-label': 'keyboard shortcuts (press ?)', 'aria-keyshortcuts': '?', class: 'keys' })
  return { dialog, opener, open }
}
