// A notebook's title, read from the text the same way everywhere: the kernel's title rule
// (kernels/language/spans.ts: the front matter's `title:`, else the first top-level heading outside
// code). Renaming rewrites the front matter, because the text is the only truth.
import { frontMatterSpan, titleOf } from '../../kernels/api'

export { titleOf }

/** Sets the front-matter title, adding front matter when there is none. */
export function withTitle(text: string, title: string): string {
  const clean = title.replace(/[\r\n]+/g, ' ').trim()
  const n = frontMatterSpan(text)?.to ?? 0
  if (n) {
    const front = text.slice(0, n)
    const next = /^title:.*$/m.test(front)
      ? front.replace(/^title:.*$/m, () => `title: ${clean}`)
      : front.replace(/^---[ \t]*\r?\n/, (open) => `${open}title: ${clean}\n`)
    return next + text.slice(n)
  }
  return `---\ntitle: ${clean}\n---\n\n` + text
}
