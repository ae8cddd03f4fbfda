// Reading a notebook file chosen by the user. A file is taken only when it is UTF-8 text and the
// kernel reads it without errors; otherwise nothing is added and the reasons name line and column.
import type { NotebookModel } from '../../kernels/api'

/** Why an import was refused. */
export class ImportRefused extends Error {
  constructor(readonly reasons: string[]) {
    super(reasons.join('; '))
  }
}

/** Decodes file bytes as UTF-8 text, refusing binary files (NUL bytes or invalid UTF-8). */
export function decodeText(bytes: Uint8Array): string {
  let text: string
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes)
  } catch {
    throw new ImportRefused(['the file is not UTF-8 text'])
  }
  const nul = text.indexOf('\u0000')
  if (nul >= 0) {
    const before = text.slice(0, nul)
    const line = before.split('\n').length
    const column = nul - before.lastIndexOf('\n')
    throw new ImportRefused([`the file is not text: it holds a NUL byte at line ${line}, column ${column}`])
  }
  return text.replace(/^\uFEFF/, '')
}

/** The errors that keep a notebook text from being imported, each with line and column. */
export function importProblems(model: NotebookModel): string[] {
  return model.diagnostics
    .filter((d) => d.severity === 'error')
    .map((d) => `line ${d.line}, column ${d.column}: ${d.message}`)
}
