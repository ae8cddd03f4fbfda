/** Edit distance (Levenshtein), used only to suggest a near name in a diagnostic. */
function distance(a: string, b: string): number {
  const row = Array.from({ length: b.length + 1 }, (_, i) => i)
  for (let i = 1; i <= a.length; i++) {
    let prev = row[0]
    row[0] = i
    for (let j = 1; j <= b.length; j++) {
      const keep = row[j]
      row[j] = Math.min(row[j] + 1, row[j - 1] + 1, prev + (a[i - 1] === b[j - 1] ? 0 : 1))
      prev = keep
    }
  }
  return row[b.length]
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
    const d = distance(name, c)
    if (d < bestDistance || (d === bestDistance && best !== null && c < best)) { best = c; bestDistance = d }
  }
  return best !== null && bestDistance <= allowed ? ` (did you mean \`${best}\`?)` : ''
}
