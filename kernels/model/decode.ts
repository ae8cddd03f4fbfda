// Packed states back to the canonical text of DEVELOPERS.md, the common ground with the reference
// interpreter: canonical JSON (base/canonical.ts: keys sorted at every level), processes 1-based in
// keys, values as integers.
import { canonicalJson } from '../base/canonical'
import { readField } from './layout'
import type { Instance } from './instance'
import { canonicalMessage } from './show'

/**
 * The canonical form of the state at words[off..]:
 * `{procs: [{alive, idle?, vars: {name: v}, peers: {name: {"j": v}}}], channels: {"j->i": [...]}, stable?}`.
 * Every channel is listed (empty ones as []); a message reads `kind(v1,v2)@age` (no `@age` under
 * asynchronous), one entry per (value, age) in flight, sorted as strings.
 */
export function canonicalState(inst: Instance, words: Uint32Array, off: number): string {
  const { layout, n } = inst
  const procs: unknown[] = []
  for (let p = 0; p < n; p++) {
    const vars: Record<string, number> = {}
    const peers: Record<string, Record<string, number>> = {}
    layout.vars.forEach((info, v) => {
      if (!info.perPeer) vars[info.name] = readField(words, off, layout.scalar[p][v]!) + info.lo
      else {
        const m: Record<string, number> = {}
        for (let q = 0; q < n; q++) if (q !== p) m[String(q + 1)] = readField(words, off, layout.entry[p][v][q]!) + info.lo
        peers[info.name] = m
      }
    })
    const o: Record<string, unknown> = { alive: readField(words, off, layout.alive[p]), vars, peers }
    if (layout.idle) o.idle = readField(words, off, layout.idle[p])
    procs.push(o)
  }
  const channels: Record<string, string[]> = {}
  for (let c = 0; c < layout.channel.length; c++) {
    const list: string[] = []
    for (let v = 0; v < layout.messageValues; v++) {
      const mask = readField(words, off, layout.channel[c][v])
      if (mask === 0) continue
      const text = canonicalMessage(layout, v)
      if (!layout.tracksAges) list.push(text)
      else for (let a = 1; a <= layout.delay; a++) if (mask & (1 << (a - 1))) list.push(`${text}@${a}`)
    }
    channels[`${layout.channelFrom[c] + 1}->${layout.channelTo[c] + 1}`] = list.sort()
  }
  const o: Record<string, unknown> = { procs, channels }
  if (layout.stable) o.stable = readField(words, off, layout.stable)
  return canonicalJson(o)
}
