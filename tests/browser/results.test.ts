// Rendering of check rows. Oracle: the fixture rows themselves (every verdict, count and reason
// they hold must appear, escaped, in the markup).
import { describe, expect, it } from 'vitest'
import { findingsMarkup, sweptConstants } from '../../src/app/results'
import { cutoffRefused, lasso, row } from './fixtures'

describe('findingsMarkup', () => {
  it('puts several properties side by side as columns', () => {
    const out = findingsMarkup([row({ row: 0, property: 'settles' }), row({ row: 1, property: 'calm', verdict: 'violated', counterexample: lasso })])
    const table = out.slice(0, out.indexOf('</table>'))
    expect(table.match(/<th scope="col">/g)).toHaveLength(3)
    expect(out.match(/<tbody><tr>/g)).toHaveLength(1)
    expect(out).toContain('v-holds')
    expect(out).toContain('v-violated')
  })
  it('gives each size and swept constant setting its own line', () => {
    const rows = [1, 2, 3].map((d, i) => row({ row: i, constants: { delay: d, patience: 2 } }))
    const out = findingsMarkup(rows)
    expect(out.match(/<tr><th scope="row">/g)).toHaveLength(3)
    expect(out).toContain('<th scope="col">delay</th>')
    expect(out).toContain('with patience = 2')
  })
  it('shows state and transition counts', () => {
    expect(findingsMarkup([row({ states: 1234567, transitions: 89 })])).toContain('1,234,567 states · 89 transitions')
  })
  it('typesets the cutoff statement with KaTeX', () => {
    expect(findingsMarkup([row({})])).toContain('class="katex')
  })
  it('links every reason to its line and column', () => {
    const out = findingsMarkup([row({ cutoff: cutoffRefused, verdict: 'inconclusive', note: 'give sizes' })])
    expect(out).toContain('data-line="14" data-column="7"')
    expect(out).toContain('rule 5')
    expect(out).toContain('&#39;alarm&#39; is mixed')
  })
  it('raises the soundness alarm when sizes disagree', () => {
    expect(findingsMarkup([row({ agreement: false })])).toContain('soundness alarm')
  })
  it('draws the counterexample of a violated row', () => {
    const out = findingsMarkup([row({ verdict: 'violated', counterexample: lasso })])
    expect(out).toContain('<svg')
    expect(out).toContain('What happens, tick by tick')
  })
  it('escapes names from the notebook', () => {
    const out = findingsMarkup([row({ property: '<img src=x onerror=alert(1)>', note: '<b>' })])
    expect(out).not.toContain('<img')
    expect(out).not.toContain('<b>')
  })
})

describe('sweptConstants', () => {
  it('names only the constants that vary', () => {
    expect(sweptConstants([row({ constants: { a: 1, b: 1 } }), row({ constants: { a: 2, b: 1 } })])).toEqual(['a'])
  })
})

describe('size agreement', () => {
  it('says so when explicit sizes agree with the cutoff instance', () => {
    expect(findingsMarkup([row({ agreement: true })])).toContain('agrees with the cutoff instance')
    expect(findingsMarkup([row({})])).not.toContain('agrees with the cutoff instance')
  })
})
