// Safe HTML and SVG text by construction: every interpolated value is escaped unless it is an
// explicit `Markup` value that this code (not the notebook) produced. Result tables, diagrams and
// the exported report are built as strings so that one renderer serves the live page, the
// self-contained report and the Node unit tests.

/** Markup that has already been escaped or sanitized; the only thing `html` inserts verbatim. */
export class Markup {
  constructor(readonly text: string) {}
  toString(): string { return this.text }
}

/** Escapes text for use in element content and in double-quoted attribute values. */
export function esc(text: string | number | boolean): string {
  return String(text)
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;')
}

/** Marks a string as trusted markup. Use only for output of this module, KaTeX or DOMPurify. */
export function raw(text: string): Markup { return new Markup(text) }

type Part = Markup | string | number | boolean | null | undefined | Part[]

function flatten(part: Part): string {
  if (part === null || part === undefined || part === false) return ''
  if (part instanceof Markup) return part.text
  if (Array.isArray(part)) return part.map(flatten).join('')
  return esc(part)
}

/**
 * Tagged template for markup: `html\`<td>${name}</td>\`` escapes `name`; arrays are joined;
 * `null`, `undefined` and `false` vanish (so conditionals read naturally).
 */
export function html(strings: TemplateStringsArray, ...parts: Part[]): Markup {
  let out = strings[0]
  for (let i = 0; i < parts.length; i++) out += flatten(parts[i]) + strings[i + 1]
  return new Markup(out)
}
