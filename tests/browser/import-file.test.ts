// Import refusals. Oracle: byte strings whose status as UTF-8 text is known by construction.
import { describe, expect, it } from 'vitest'
import { ImportRefused, decodeText, importProblems } from '../../src/app/import-file'
import type { NotebookModel } from '../../kernels/language/model'

describe('decodeText', () => {
  it('accepts UTF-8 text and drops a byte-order mark', () => {
    expect(decodeText(new TextEncoder().encode('\uFEFF# Depot ✓\n'))).toBe('# Depot ✓\n')
  })
  it('refuses bytes that are not UTF-8', () => {
    expect(() => decodeText(new Uint8Array([0x23, 0xff, 0xfe, 0x00]))).toThrow(ImportRefused)
  })
  it('refuses text with a NUL byte and says where', () => {
    expect(() => decodeText(new TextEncoder().encode('ab\ncd\u0000'))).toThrow('line 2, column 3')
  })
})

describe('importProblems', () => {
  it('lists errors with line and column and ignores warnings', () => {
    const span = { line: 3, column: 5, endLine: 3, endColumn: 9, from: 20, to: 24 }
    const model = {
      title: null, blocks: [], protocols: [], properties: [], checks: [],
      diagnostics: [{ ...span, severity: 'error', message: "unknown variable 'wiat'" }, { ...span, line: 4, severity: 'warning', message: 'unused' }],
    } as NotebookModel
    expect(importProblems(model)).toEqual(["line 3, column 5: unknown variable 'wiat'"])
  })
})
