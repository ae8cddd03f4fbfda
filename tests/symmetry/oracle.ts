// An independent view of states for the witnesses: the canonical JSON text of DEVELOPERS.md, renamed
// and projected as plain objects. It shares nothing with kernels/symmetry/canon.ts (which works on
// packed words), so a test comparing the two catches a misplaced field in either.
import { canonicalState } from '../../kernels/model/decode'
import type { Instance } from '../../kernels/model/instance'
import { explore } from '../../kernels/explore/reach'

interface Proc {
  alive: number
  idle?: number
  vars: Record<string, number>
  peers: Record<string, Record<string, number>>
}
interface State {
  procs: Proc[]
  channels: Record<string, string[]>
  stable?: number
}

/** JSON with keys sorted at every level (the canonical text's own rule). */
export function sortedJson(v: unknown): string {
  if (Array.isArray(v)) return '[' + v.map(sortedJson).join(',') + ']'
  if (v !== null && typeof v === 'object') {
    const o = v as Record<string, unknown>
    return '{' + Object.keys(o).sort().map((k) => JSON.stringify(k) + ':' + sortedJson(o[k])).join(',') + '}'
  }
  return JSON.stringify(v)
}

/** Renames processes in a canonical state: process i (1-based) becomes perm[i-1] + 1. */
export function renameText(text: string, perm: readonly number[]): string {
  const s = JSON.parse(text) as State
  const to = (j: string) => String(perm[Number(j) - 1] + 1)
  const procs: Proc[] = new Array(s.procs.length)
  s.procs.forEach((p, i) => {
    const peers: Proc['peers'] = {}
    for (const [name, m] of Object.entries(p.peers)) {
      peers[name] = {}
      for (const [j, v] of Object.entries(m)) peers[name][to(j)] = v
    }
    procs[perm[i]] = { ...p, peers }
  })
  const channels: State['channels'] = {}
  for (const [key, list] of Object.entries(s.channels)) {
    const [j, i] = key.split('->')
    channels[`${to(j)}->${to(i)}`] = list
  }
  return sortedJson({ ...s, procs, channels })
}

/** Projects a canonical state of G_n onto processes 1..k: their parts and the channels among them. */
export function projectText(text: string, k: number): string {
  const s = JSON.parse(text) as State
  const keep = (j: string) => Number(j) <= k
  const procs = s.procs.slice(0, k).map((p) => {
    const peers: Proc['peers'] = {}
    for (const [name, m] of Object.entries(p.peers)) peers[name] = Object.fromEntries(Object.entries(m).filter(([j]) => keep(j)))
    return { ...p, peers }
  })
  const channels = Object.fromEntries(Object.entries(s.channels).filter(([key]) => key.split('->').every(keep)))
  return sortedJson({ ...s, procs, channels })
}

/** Every permutation of 0..n-1. */
export function permutations(n: number): number[][] {
  if (n === 0) return [[]]
  const out: number[][] = []
  for (const p of permutations(n - 1)) for (let k = 0; k <= p.length; k++) out.push([...p.slice(0, k), n - 1, ...p.slice(k)])
  return out
}

/** The reachable states of an instance (packed explorer), or null when more than `limit`. */
export function reachable(inst: Instance, limit: number): { texts: Set<string>; words: Uint32Array; count: number } | null {
  const r = explore(inst, { limit })
  if (!r.complete) return null
  const words = r.store.data.slice(0, r.states * inst.words)
  const texts = new Set<string>()
  for (let k = 0; k < r.states; k++) texts.add(canonicalState(inst, words, k * inst.words))
  return { texts, words, count: r.states }
}
