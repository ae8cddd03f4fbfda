// A notebook's title, read from the text the same way everywhere: the front matter's `title:`,
// else the first heading. Renaming rewrites the front matter, because the text is the only truth.
import { frontMatterLength } from './segments'

/** The title of a notebook text, or null when it has neither front-matter title nor heading. */
export function titleOf(text: string): string | null {
  const front = text.slice(0, frontMatterLength(text))
  const m = /^title:[ \t]*(.*)$/m.exec(front)
  if (m) {
    const t = m[1].trim().replace(/^(["'])(.*)\1$/, '$2').trim()
    if (t) return t
  }
  let fence: string | null = null
  for (const line of text.slice(front.length).split('\n')) {
    const f = /^\s{0,3}(`{3,}|~{3,})/.exec(line)
    if (f) {
      if (fence === null) fence = f[1][0]
      else if (f[1][0] === fence) fence = null
      continue
    }
    if (fence !== null) continue
    const h = /^\s{0,3}#{1,6}[ \t]+(.*?)[ \t#]*$/.exec(line)
    if (h && h[1]) return h[1]
  }
  return null
}

/** Sets the front-matter title, adding front matter when there is none. */
export function withTitle(text: string, title: string): string {
  const clean = title.replace(/[\r\n]+/g, ' ').trim()
  const n = frontMatterLength(text)
  if (n) {
    const front = text.slice(0, n)
    const next = /^title:.*$/m.test(front)
      ? front.replace(/^title:.*$/m, () => `title: ${clean}`)
      : front.replace(/^---[ \t]*\r?\n/, (open) => `${open}title: ${clean}\n`)
    return next + text.slice(n)
  }
  return `---\ntitle: ${clean}\n---\n\n` + text
}
