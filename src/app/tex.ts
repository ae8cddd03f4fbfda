// KaTeX, configured once for the whole workbench: no trusted commands (no \href, \htmlClass,
// \includegraphics), errors shown in place rather than thrown. Notebook math and kernel TeX both
// go through here; its output is later passed through DOMPurify like all other markup.
import katex from 'katex'

/** Renders TeX to HTML (or to MathML only, for the self-contained report, which has no fonts). */
export function texToHtml(tex: string, display = false, mathmlOnly = false): string {
  return katex.renderToString(tex, {
    displayMode: display,
    throwOnError: false,
    trust: false,
    strict: 'ignore',
    maxExpand: 200,
    output: mathmlOnly ? 'mathml' : 'htmlAndMathml',
  })
}
