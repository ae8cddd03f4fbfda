// The two cutoff notebooks: they parse with no diagnostics at all, the tool decides as their prose
// says, and their claims hold. Oracles: the projection/symmetry witness for the granted one (as in
// witness.test.ts), and the reference interpreter for the storm that separates G_2 from G_3.
import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { compileInstance } from '../../kernels/model/instance'
import { decideCutoff } from '../../kernels/symmetry/cutoff'
import { referenceReachable } from '../reference/interpreter'
import { permutations, projectText, reachable, renameText } from './oracle'

const read = (name: string) => analyzeNotebook(readFileSync(new URL(`../../notebooks/${name}`, import.meta.url), 'utf8'))

describe('notebooks/cutoff-applies.md', () => {
  const m = read('cutoff-applies.md')
  it('parses with no diagnostics', () => {
    expect(m.diagnostics).toEqual([])
  })
  it('gets the cutoff at two processes for every property checked', () => {
    for (const c of m.checks) {
      for (const p of c.properties) {
        const info = decideCutoff(m.protocols[c.protocol], p)
        expect(info.reasons).toEqual([])
        expect(info.processes).toBe(2)
      }
    }
  })
  it('has a small G_3 that projects onto G_2 and is closed under renaming', () => {
    const p = m.protocols[0]
    const consts = p.consts.map((c) => c.value)
    const g3 = reachable(compileInstance(p, 3, consts), 100000)!
    const g2 = reachable(compileInstance(p, 2, consts), 100000)!
    const projected = new Set([...g3.texts].map((t) => projectText(t, 2)))
    expect([...projected].filter((t) => !g2.texts.has(t))).toEqual([])
    expect(projected.size).toBe(g2.texts.size)
    const open = permutations(3).flatMap((perm) => [...g3.texts].filter((t) => !g3.texts.has(renameText(t, perm))))
    expect(open).toEqual([])
  })
})

describe('notebooks/cutoff-refused.md', () => {
  const m = read('cutoff-refused.md')
  it('parses with no diagnostics', () => {
    expect(m.diagnostics).toEqual([])
  })
  it('is refused under rules 5 and 2, at the aggregate and at the flag', () => {
    const text = readFileSync(new URL('../../notebooks/cutoff-refused.md', import.meta.url), 'utf8')
    const lineOf = (needle: string) => text.slice(0, text.indexOf(needle)).split('\n').length
    const info = decideCutoff(m.protocols[0], m.checks[0].properties[0])
    expect(info.applies).toBe(false)
    expect(info.reasons.map((r) => [r.rule, r.line])).toEqual([[5, lineOf('count q: suspect[q]')], [2, lineOf('if flag')]])
    expect(info.statement).toContain('explicit sizes')
  })
  it('has a storm in G_3 but none in G_2 (reference interpreter)', () => {
    const p = m.protocols[0]
    const storm = (n: number) => [...referenceReachable(p, n).states].some((s) => s.includes('"storm'))
    expect(storm(2)).toBe(false)
    expect(storm(3)).toBe(true)
  })
})
