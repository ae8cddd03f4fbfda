// Three-way merge of notebook texts (two tabs on one notebook). Oracle: hand-worked expected texts
// for small cases, and for generated cases the defining property of a merge of disjoint edits:
// applying both sides' edits in either order gives the same text, which is what mergeTexts returns.
import fc from 'fast-check'
import { describe, expect, it } from 'vitest'
import { mergeTexts } from '../../src/app/merge'

const base = ['# Ferry', '', 'north slip', 'south slip', 'east slip', ''].join('\n')

describe('mergeTexts', () => {
  it('merges edits on different lines', () => {
    const ours = base.replace('north slip', 'north slip (lamp)')
    const theirs = base.replace('east slip', 'east slip (bell)')
    expect(mergeTexts(base, ours, theirs)).toBe(['# Ferry', '', 'north slip (lamp)', 'south slip', 'east slip (bell)', ''].join('\n'))
  })
  it('refuses edits of the same line that differ', () => {
    expect(mergeTexts(base, base.replace('south', 'SOUTH'), base.replace('south', 'South'))).toBeNull()
  })
  it('accepts the same edit made on both sides', () => {
    const both = base.replace('south', 'SOUTH')
    expect(mergeTexts(base, both, both)).toBe(both)
  })
  it('refuses two different insertions at the same place', () => {
    expect(mergeTexts(base, base.replace('south slip', 'south slip\nquay A'), base.replace('south slip', 'south slip\nquay B'))).toBeNull()
  })
  it('keeps one side when the other did not change', () => {
    const ours = base + 'west slip\n'
    expect(mergeTexts(base, ours, base)).toBe(ours)
    expect(mergeTexts(base, base, ours)).toBe(ours)
  })
  it('merges a deletion with an edit elsewhere', () => {
    const ours = base.replace('north slip\n', '')
    const theirs = base.replace('east slip', 'east slip (bell)')
    expect(mergeTexts(base, ours, theirs)).toBe(['# Ferry', '', 'south slip', 'east slip (bell)', ''].join('\n'))
  })
  it('gives every line edit of one half and every line edit of the other half, for generated edits', () => {
    const lines = Array.from({ length: 12 }, (_, i) => `line ${i}`)
    fc.assert(fc.property(fc.array(fc.integer({ min: 0, max: 5 }), { maxLength: 4 }), fc.array(fc.integer({ min: 6, max: 11 }), { maxLength: 4 }), (mine, theirs) => {
      const ours = lines.map((l, i) => (mine.includes(i) ? l + ' ours' : l))
      const other = lines.map((l, i) => (theirs.includes(i) ? l + ' theirs' : l))
      const expected = lines.map((l, i) => (mine.includes(i) ? l + ' ours' : theirs.includes(i) ? l + ' theirs' : l))
      expect(mergeTexts(lines.join('\n'), ours.join('\n'), other.join('\n'))).toBe(expected.join('\n'))
    }), { numRuns: 200, seed: 13 })
  })
})
