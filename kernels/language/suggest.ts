/** Edit distance with adjacent transpositions (optimal string alignment), used only to suggest a near name. */
function distance(a: string, b: string): number {
  const d: number[][] = Array.from({ length: a.length + 1 }, (_, i) => Array.from({ length: b.length + 1 }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)))
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost)
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1)
    }
  }
  return d[a.length][b.length]
}

/**
 * The " (did you mean `x`?)" tail of a diagnostic, or "" when no candidate is close enough.
 * Close means at most one edit for short names and two for longer ones.
 */
export function didYouMean(name: string, candidates: Iterable<string>): string {
  let best: string | null = null
  let bestDistance = Infinity
  const allowed = name.length <= 4 ? 1 : 2
  for (const c of candidates) {
    if (c === name) continue
    // Beyond the budget (a notebook with a huge number of unknown names and of names), no more
    // suggestions: each would scan every name, and analysis must stay linear.
    if (--budget.left < 0) return ''
    // A name whose length differs by more than the edits allowed cannot be close enough.
    if (Math.abs(c.length - name.length) > allowed) continue
    const d = distance(name, c)
    if (d < bestDistance || (d === bestDistance && best !== null && c < best)) { best = c; bestDistance = d }
  }
  return best !== null && bestDistance <= allowed ? ` (did you mean \`${best}\`?)` : ''
}

/** Candidate names examined by `didYouMean`, over one analysis. */
const budget = { left: Infinity }

/** Sets the number of candidate names that suggestions may examine from now on (per analysis). */
export function budgetSuggestions(candidates: number): void {
  budget.left = candidates
}
