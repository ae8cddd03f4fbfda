// Three-way merge of notebook texts by lines, for two tabs that edited the same notebook. Each
// side's edits against the common base become hunks (a base line range and its replacement);
// hunks that touch disjoint base ranges are applied together, and any overlap is a conflict the
// caller resolves by keeping both versions (it never picks one silently).

/** A replaced range of base lines `[from, to)` and the lines that replace it. */
interface Hunk { from: number; to: number; lines: string[] }

/** The hunks that turn `base` into `next`, in order (longest common subsequence of lines). */
function hunks(base: string[], next: string[]): Hunk[] {
  let pre = 0
  while (pre < base.length && pre < next.length && base[pre] === next[pre]) pre++
  let suf = 0
  while (suf < base.length - pre && suf < next.length - pre && base[base.length - 1 - suf] === next[next.length - 1 - suf]) suf++
  const a = base.slice(pre, base.length - suf)
  const b = next.slice(pre, next.length - suf)
  // lcs[i][j]: length of the longest common subsequence of a[i..] and b[j..].
  const w = b.length + 1
  const lcs = new Uint32Array((a.length + 1) * w)
  for (let i = a.length - 1; i >= 0; i--) {
    for (let j = b.length - 1; j >= 0; j--) {
      lcs[i * w + j] = a[i] === b[j] ? lcs[(i + 1) * w + j + 1] + 1 : Math.max(lcs[(i + 1) * w + j], lcs[i * w + j + 1])
    }
  }
  const out: Hunk[] = []
  let i = 0
  let j = 0
  let open: Hunk | null = null
  const flush = () => { if (open) { out.push(open); open = null } }
  while (i < a.length || j < b.length) {
    if (i < a.length && j < b.length && a[i] === b[j]) { flush(); i++; j++; continue }
    open ??= { from: pre + i, to: pre + i, lines: [] }
    if (j < b.length && (i >= a.length || lcs[i * w + j + 1] >= lcs[(i + 1) * w + j])) { open.lines.push(b[j]); j++ }
    else { i++; open.to = pre + i }
  }
  flush()
  return out
}

function overlaps(x: Hunk, y: Hunk): boolean {
  // Two insertions at the same place, or ranges that share a line, or an insertion inside a range.
  if (x.from === x.to && y.from === y.to) return x.from === y.from
  return x.from < y.to && y.from < x.to || (x.from === x.to && x.from > y.from && x.from < y.to) || (y.from === y.to && y.from > x.from && y.from < x.to) || x.from === y.from
}

/**
 * Merges `ours` and `theirs`, both edited from `base`. Returns the merged text, or null when the
 * two sides changed the same lines (differently).
 */
export function mergeTexts(base: string, ours: string, theirs: string): string | null {
  if (ours === theirs || theirs === base) return ours
  if (ours === base) return theirs
  const b = base.split('\n')
  const mine = hunks(b, ours.split('\n'))
  const other = hunks(b, theirs.split('\n'))
  const all: Hunk[] = []
  for (const h of mine) {
    const clash = other.find((o) => overlaps(h, o))
    if (clash && !(clash.from === h.from && clash.to === h.to && clash.lines.join('\n') === h.lines.join('\n'))) return null
    all.push(h)
  }
  for (const o of other) if (!mine.some((h) => h.from === o.from && h.to === o.to && h.lines.join('\n') === o.lines.join('\n'))) all.push(o)
  all.sort((x, y) => x.from - y.from || x.to - y.to)
  const out: string[] = []
  let at = 0
  for (const h of all) {
    out.push(...b.slice(at, h.from), ...h.lines)
    at = h.to
  }
  out.push(...b.slice(at))
  return out.join('\n')
}
