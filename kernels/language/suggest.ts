/**
 * Edit distance with adjacent transpositions (optimal string alignment), used only to suggest a
 * near name. Three rolling rows, allocated once.
 */
let rows = [new Int32Array(64), new Int32Array(64), new Int32Array(64)]
function distance(a: string, b: string): number {
  const m = b.length
  if (rows[0].length <= m) rows = [new Int32Array(m + 1), new Int32Array(m + 1), new Int32Array(m + 1)]
  let [before, prev, cur] = rows
  for (let j = 0; j <= m; j++) prev[j] = j
  for (let i = 1; i <= a.length; i++) {
    cur[0] = i
    for (let j = 1; j <= m; j++) {
      const cost = a.charCodeAt(i - 1) === b.charCodeAt(j - 1) ? 0 : 1
      let d = Math.min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost)
      if (i > 1 && j > 1 && a.charCodeAt(i - 1) === b.charCodeAt(j - 2) && a.charCodeAt(i - 2) === b.charCodeAt(j - 1)) d = Math.min(d, before[j - 2] + 1)
      cur[j] = d
    }
    const t = before; before = prev; prev = cur; cur = t
  }
  return prev[m]
}

/**
 * The " (did you mean `x`?)" tail of a diagnostic, or "" when no candidate is close enough.
 * Close means at most one edit for short names and two for longer ones.
 */
export function didYouMean(name: string, candidates: Iterable<string>): string {
  if (budget.left <= 0) return ''
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

/**
 * The names of the lists, lazily: a suggestion past its budget costs nothing, however long the
 * lists are (building an array of every name per unknown name would be quadratic).
 */
export function* namesOf(...lists: Iterable<{ name: string } | string>[]): Generator<string> {
  for (const list of lists) for (const x of list) yield typeof x === 'string' ? x : x.name
}
