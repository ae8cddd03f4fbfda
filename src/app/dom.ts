// Small DOM helpers. Text always goes in through textContent; markup only through `toFragment`
// (DOMPurify), so no notebook text reaches innerHTML.

/** Creates an element with attributes and children (strings become text nodes). */
export function el<K extends keyof HTMLElementTagNameMap>(
  tag: K,
  attrs: Record<string, string | boolean | undefined> = {},
  ...children: (Node | string | null | undefined | false)[]
): HTMLElementTagNameMap[K] {
  const node = document.createElement(tag)
  for (const [k, v] of Object.entries(attrs)) {
    if (v === undefined || v === false) continue
    if (k === 'class') node.className = String(v)
    else node.setAttribute(k, v === true ? '' : v)
  }
  for (const c of children) if (c !== null && c !== undefined && c !== false) node.append(c)
  return node
}

/** A button with a visible label and, when the label is a symbol, an accessible name. */
export function button(label: string, onClick: (e: MouseEvent) => void, attrs: Record<string, string | boolean | undefined> = {}): HTMLButtonElement {
  const b = el('button', { type: 'button', ...attrs }, label)
  b.addEventListener('click', onClick)
  return b
}

/** Saves text as a file through a temporary link (no server involved). */
export function download(name: string, type: string, content: string): void {
  const url = URL.createObjectURL(new Blob([content], { type }))
  const a = el('a', { href: url, download: name })
  document.body.append(a)
  a.click()
  a.remove()
  setTimeout(() => URL.revokeObjectURL(url), 10_000)
}

/** A file name made from a title: letters, digits and dashes only. */
export function fileName(title: string, ext: string): string {
  const base = title.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 60)
  return (base || 'notebook') + ext
}
