// Notices: short messages in the corner of the page, each with an optional action (undo, save as)
// and a dismiss button. They fade after a while; the action's window is the notice's lifetime.
import { button, el } from './dom'

/** How long a notice with an action stays (the undo window), in milliseconds. */
export const ACTION_WINDOW = 15_000
const PLAIN_WINDOW = 12_000

/** An action offered in a notice. */
export interface NoticeAction { label: string; run: () => void }

/** The notice area of the page. */
export class Notices {
  readonly root = el('div', { class: 'notices', 'aria-live': 'polite' })

  /** Shows a message; `action` adds a button that runs it and closes the notice. */
  show(message: string, action?: NoticeAction): void {
    const close = button('dismiss', () => item.remove(), { class: 'dismiss', 'aria-label': 'dismiss this message' })
    const item = el('div', { class: 'notice', role: 'status' }, el('span', {}, message))
    if (action) item.append(button(action.label, () => { item.remove(); action.run() }, { class: 'undo' }))
    item.append(close)
    this.root.append(item)
    window.setTimeout(() => item.remove(), action ? ACTION_WINDOW : PLAIN_WINDOW)
  }
}
