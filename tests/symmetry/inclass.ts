// A seeded generator of small protocols that are in the class by construction: handlers write only
// the handled peer's entries and reply only to it, the step block writes own scalars from own
// values, broadcasts under own conditions with own fields, and loops write and send only about their
// own peer. No scalar is ever mixed, so the whole state of G_N is covered by the witnesses. Domains
// are tight (bool, 0..1) so that G_3 stays within a few thousand states.
import { Random } from '../reference/generate'

interface Gen {
  r: Random
  entries: string[]
  scalars: string[]
  messages: { name: string; field: boolean }[]
}

function bool(g: Gen, peer: string | null, field: string | null, depth = 0): string {
  const atoms: string[] = ['true', 'false', ...g.scalars.map((s) => `${s} = 1`)]
  if (peer) atoms.push(...g.entries.map((e) => `${e}[${peer}]`))
  if (field) atoms.push(`${field} = 1`)
  const a = g.r.pick(atoms)
  if (depth < 1 && g.r.chance(0.3)) return `(${a} ${g.r.pick(['and', 'or'])} ${bool(g, peer, field, depth + 1)})`
  if (g.r.chance(0.2)) return `not ${a}`
  return a
}

function bit(g: Gen, peer: string | null, field: string | null): string {
  const opts: string[] = ['0', '1', ...g.scalars, ...g.scalars.map((s) => `1 - ${s}`)]
  if (field) opts.push(field)
  if (peer) opts.push(`if ${bool(g, peer, field)} then 1 else 0`)
  return g.r.pick(opts)
}

function send(g: Gen, to: string | null, peer: string | null, field: string | null): string {
  const m = g.r.pick(g.messages)
  const args = m.field ? `(${bit(g, peer, field)})` : ''
  return to ? `send ${m.name}${args} to ${to}` : `broadcast ${m.name}${args}`
}

/** Statements about peer `peer` (null: own scalars only), inside a handler binding `field` or not. */
function stmts(g: Gen, peer: string | null, field: string | null, inHandler: boolean, count: number, ind: string): string[] {
  const out: string[] = []
  for (let k = 0; k < count; k++) {
    const roll = g.r.next()
    if (peer && roll < 0.45) {
      const e = g.r.pick(g.entries)
      out.push(g.r.chance(0.15) ? `${ind}${e}[${peer}] := one of {true, false}` : `${ind}${e}[${peer}] := ${bool(g, peer, field)}`)
    } else if (!peer && !inHandler && roll < 0.45 && g.scalars.length) {
      const s = g.r.pick(g.scalars)
      out.push(g.r.chance(0.3) ? `${ind}${s} := one of 0..1` : `${ind}${s} := ${bit(g, null, null)}`)
    } else if (roll < 0.7) {
      out.push(`${ind}${send(g, peer, peer, field)}`)
    } else {
      out.push(`${ind}if ${bool(g, peer, field)} {`)
      out.push(...stmts(g, peer, field, inHandler, 1, ind + '  '))
      out.push(`${ind}}`)
    }
  }
  return out
}

/** The text of one in-class protocol notebook; the same seed gives the same text. */
export function generateInClass(seed: number): string {
  const r = new Random(seed * 7919 + 17)
  const g: Gen = { r, entries: ['e0'], scalars: [], messages: [{ name: 'm0', field: r.chance(0.4) }] }
  if (r.chance(0.4)) g.entries.push('e1')
  if (r.chance(0.6)) g.scalars.push('s0')
  if (r.chance(0.3)) g.messages.push({ name: 'm1', field: false })
  const timing = r.pick(['timing asynchronous', 'timing synchronous(delay: 1, idle: 1)', 'timing synchronous(delay: 1, idle: 2)'])
  const lines = [`protocol grove${seed} {`, `  ${timing}`, `  faults ${r.pick(['crash', 'none'])}`]
  for (const m of g.messages) lines.push(`  message ${m.name}${m.field ? '(v: 0..1)' : ''}`)
  for (const e of g.entries) lines.push(`  state ${e}[peer]: bool = ${r.chance(0.2) ? 'any' : 'false'}`)
  for (const s of g.scalars) lines.push(`  state ${s}: 0..1 = 0`)
  for (const m of g.messages) {
    if (!r.chance(0.8)) continue
    lines.push(`  on ${m.name}${m.field ? '(x)' : ''} from q {`)
    lines.push(...stmts(g, 'q', m.field ? 'x' : null, true, r.int(1, 2), '    '))
    lines.push('  }')
  }
  lines.push('  step {')
  lines.push(...stmts(g, null, null, false, r.int(1, 2), '    '))
  lines.push('    for q {')
  lines.push(...stmts(g, 'q', null, false, r.int(1, 2), '      '))
  lines.push('    }')
  lines.push('  }', '}')
  const prop = `property watch = forall p, q: always (correct(q) implies not p.e0[q])`
  return `# Grove ${seed}\n\n\`\`\`protocol\n${lines.join('\n')}\n\`\`\`\n\n\`\`\`property\n${prop}\n\`\`\`\n\n\`\`\`check\ncheck grove${seed}: watch\n\`\`\`\n`
}
