// A seeded generator of small, valid protocol notebooks for the differential tests. Every
// statement, expression form, handler shape, initial-value form, timing model and fault mode of
// language.md appears with some probability; domains are tight (bool, 0..1, 0..2, two-label enums)
// and there are one or two message kinds, so that G_3 usually stays within a few thousand states.
//
// Generated protocols may raise model errors (a value outside its type, division by zero); they are
// placed only where every reading of the contract agrees that they happen: at the store of an
// assignment, a choice or a message field, and at a division that is the whole assigned value
// (never inside `and`/`or`/`if-then-else`, whose evaluation order the contract leaves open).

/** A small deterministic generator (mulberry32), so a failing seed can be replayed. */
export class Random {
  private s: number
  constructor(seed: number) {
    this.s = seed >>> 0
  }
  /** A float in [0, 1). */
  next(): number {
    this.s = (this.s + 0x6d2b79f5) >>> 0
    let t = this.s
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
  /** An integer in lo..hi inclusive. */
  int(lo: number, hi: number): number {
    return lo + Math.floor(this.next() * (hi - lo + 1))
  }
  chance(p: number): boolean {
    return this.next() < p
  }
  pick<T>(xs: readonly T[]): T {
    return xs[Math.floor(this.next() * xs.length)]
  }
}

type GType = { k: 'bool' } | { k: 'range'; lo: number; hi: number; text: string } | { k: 'enum'; labels: string[] }

interface GVar {
  name: string
  perPeer: boolean
  type: GType
}

interface GMessage {
  name: string
  fields: { name: string; type: GType }[]
}

/** What a statement or expression may mention where it is generated. */
interface Scope {
  /** Peer binders in scope, innermost last. */
  binders: string[]
  /** Bound message fields in scope (handler bodies that bind fields). */
  fields: { name: string; type: GType }[]
  depth: number
}

const ENUMS: string[][] = [
  ['calm', 'storm'],
  ['ebb', 'flood'],
]

/** Generates the text of one notebook holding one protocol; the same seed gives the same text. */
export function generateNotebook(seed: number): string {
  return new ProtocolWriter(new Random(seed), seed).notebook()
}

class ProtocolWriter {
  private vars: GVar[] = []
  private messages: GMessage[] = []
  private consts: { name: string; value: number }[] = []
  private binderNames = ['q', 'r', 's']

  constructor(
    private rnd: Random,
    private seed: number,
  ) {}

  notebook(): string {
    const body = this.protocol()
    return `# Generated harbour protocol ${this.seed}\n\n\`\`\`protocol\n${body}\`\`\`\n`
  }

  private protocol(): string {
    const r = this.rnd
    const lines: string[] = [`protocol harbour${this.seed} {`]
    // Constants: a cap used in types, and a delay used by the timing declaration.
    const cap = r.int(1, 2)
    this.consts.push({ name: 'cap', value: cap })
    lines.push(`  const cap = ${cap}`)
    const timing = r.pick(['synchronous', 'eventually synchronous', 'asynchronous'] as const)
    if (timing === 'asynchronous') lines.push('  timing asynchronous')
    else {
      const delay = r.int(1, 2)
      const idle = r.int(1, 2)
      if (r.chance(0.5)) {
        this.consts.push({ name: 'lag', value: delay })
        lines.push(`  const lag = ${delay}`)
        lines.push(`  timing ${timing}(delay: lag, idle: ${idle})`)
      } else lines.push(`  timing ${timing}(delay: ${delay}, idle: ${idle})`)
    }
    const faults = r.chance(0.5) ? 'crash' : 'none'
    if (faults === 'crash' || r.chance(0.5)) lines.push(`  faults ${faults}`)

    const kinds = r.chance(0.6) ? 1 : 2
    const names = ['ping', 'tide']
    for (let k = 0; k < kinds; k++) {
      const nf = r.chance(0.45) ? 0 : r.chance(0.85) ? 1 : 2
      const fields: GMessage['fields'] = []
      for (let f = 0; f < nf; f++) fields.push({ name: ['a', 'b'][f], type: this.smallType(false) })
      this.messages.push({ name: names[k], fields })
      lines.push(
        fields.length === 0
          ? `  message ${names[k]}`
          : `  message ${names[k]}(${fields.map((f) => `${f.name}: ${this.typeText(f.type)}`).join(', ')})`,
      )
    }

    const nv = r.int(1, 3)
    const varNames = ['lamp', 'mark', 'seen']
    let perPeerCount = 0
    for (let v = 0; v < nv; v++) {
      const perPeer = perPeerCount < 1 && r.chance(0.4)
      if (perPeer) perPeerCount++
      const type = this.smallType(true)
      this.vars.push({ name: varNames[v], perPeer, type })
      const init = r.chance(0.25) ? 'any' : this.initText(type)
      lines.push(`  state ${varNames[v]}${perPeer ? '[peer]' : ''}: ${this.typeText(type)} = ${init}`)
    }

    for (const m of this.messages) {
      if (!r.chance(0.8)) continue
      const bind = m.fields.length > 0 && r.chance(0.7)
      const fieldNames = m.fields.map((f) => `f${f.name}`)
      const scope: Scope = {
        binders: ['q'],
        fields: bind ? m.fields.map((f, i) => ({ name: fieldNames[i], type: f.type })) : [],
        depth: 0,
      }
      const head = bind ? `${m.name}(${fieldNames.join(', ')})` : m.name
      lines.push(`  on ${head} from q {`)
      lines.push(...this.block(scope, r.int(1, 2), '    '))
      lines.push('  }')
    }
    lines.push('  step {')
    const stepScope: Scope = { binders: [], fields: [], depth: 0 }
    lines.push(...this.block(stepScope, r.int(1, 2), '    '))
    // Most protocols talk: end the step with a broadcast or a reply to each peer.
    const m = r.pick(this.messages)
    if (r.chance(0.5)) lines.push(`    broadcast ${m.name}${this.args(m, stepScope)}`)
    else if (r.chance(0.4)) {
      const inner: Scope = { binders: ['q'], fields: [], depth: 1 }
      lines.push(`    for q {`, `      if ${this.boolExpr(inner, 1)} { send ${m.name}${this.args(m, inner)} to q }`, `    }`)
    }
    lines.push('  }')
    lines.push('}')
    return lines.join('\n') + '\n'
  }

  private smallType(forVar: boolean): GType {
    const r = this.rnd.next()
    if (r < 0.35) return { k: 'bool' }
    if (r < 0.55) return { k: 'range', lo: 0, hi: 1, text: '0..1' }
    if (r < 0.75 && forVar) return { k: 'range', lo: 0, hi: this.consts[0].value, text: '0..cap' }
    if (r < 0.8 && forVar) return { k: 'range', lo: 0, hi: 2, text: '0..2' }
    return { k: 'enum', labels: this.rnd.pick(ENUMS) }
  }

  private typeText(t: GType): string {
    if (t.k === 'bool') return 'bool'
    if (t.k === 'range') return t.text
    return `{${t.labels.join(', ')}}`
  }

  private initText(t: GType): string {
    if (t.k === 'bool') return this.rnd.pick(['true', 'false'])
    if (t.k === 'enum') return this.rnd.pick(t.labels)
    if (t.hi === this.consts[0].value && this.rnd.chance(0.3)) return 'cap'
    return String(this.rnd.int(t.lo, t.hi))
  }

  private block(scope: Scope, count: number, indent: string): string[] {
    const out: string[] = []
    for (let i = 0; i < count; i++) out.push(...this.statement(scope, indent))
    return out
  }

  /** Targets assignable here: scalars, and per-peer entries at a bound peer. */
  private targets(scope: Scope): { text: string; type: GType }[] {
    const out: { text: string; type: GType }[] = []
    for (const v of this.vars) {
      if (!v.perPeer) out.push({ text: v.name, type: v.type })
      else for (const b of scope.binders) out.push({ text: `${v.name}[${b}]`, type: v.type })
    }
    return out
  }

  private statement(scope: Scope, indent: string): string[] {
    const r = this.rnd
    const deep = scope.depth >= 2
    const roll = r.next()
    const targets = this.targets(scope)
    if (roll < 0.3 && targets.length > 0) {
      const t = r.pick(targets)
      return [`${indent}${t.text} := ${this.assignedValue(t.type, scope)}`]
    }
    if (roll < 0.42 && !deep) {
      const inner = { ...scope, depth: scope.depth + 1 }
      const lines = [`${indent}if ${this.boolExpr(inner, 1)} {`, ...this.block(inner, r.int(1, 2), indent + '  ')]
      if (r.chance(0.3)) {
        lines.push(`${indent}} else if ${this.boolExpr(inner, 1)} {`, ...this.block(inner, 1, indent + '  '))
      }
      if (r.chance(0.4)) lines.push(`${indent}} else {`, ...this.block(inner, 1, indent + '  '))
      lines.push(`${indent}}`)
      return lines
    }
    if (roll < 0.52 && !deep && scope.binders.length < this.binderNames.length) {
      const b = this.binderNames.find((x) => !scope.binders.includes(x))!
      const inner = { ...scope, binders: [...scope.binders, b], depth: scope.depth + 1 }
      return [`${indent}for ${b} {`, ...this.block(inner, r.int(1, 2), indent + '  '), `${indent}}`]
    }
    if (roll < 0.64) {
      const m = r.pick(this.messages)
      return [`${indent}broadcast ${m.name}${this.args(m, scope)}`]
    }
    if (roll < 0.74 && scope.binders.length > 0) {
      const m = r.pick(this.messages)
      return [`${indent}send ${m.name}${this.args(m, scope)} to ${r.pick(scope.binders)}`]
    }
    if (roll < 0.86 && targets.length > 0) {
      const t = r.pick(targets)
      if (t.type.k === 'range' && r.chance(0.5)) {
        // Mostly within the type; sometimes one past it, a model error when chosen.
        const hi = r.chance(0.85) ? t.type.hi : t.type.hi + 1
        const lo = r.int(t.type.lo, Math.min(hi, t.type.lo + 1))
        return [`${indent}${t.text} := one of ${lo}..${hi}`]
      }
      const n = r.int(2, 3)
      const opts: string[] = []
      for (let i = 0; i < n; i++) opts.push(this.expr(t.type, scope, 1))
      return [`${indent}${t.text} := one of {${opts.join(', ')}}`]
    }
    return [`${indent}skip`]
  }

  private args(m: GMessage, scope: Scope): string {
    if (m.fields.length === 0) return ''
    return `(${m.fields.map((f) => this.fieldValue(f.type, scope)).join(', ')})`
  }

  /** A field value: mostly within the field's type, sometimes an unclamped sum (a possible model error). */
  private fieldValue(t: GType, scope: Scope): string {
    if (t.k === 'range' && this.rnd.chance(0.15)) return `${this.intExpr(scope, 0)} + 1`
    return this.expr(t, scope, 1)
  }

  /** The value of an assignment: the top level may be an unguarded division or an unclamped step. */
  private assignedValue(t: GType, scope: Scope): string {
    const r = this.rnd
    if (t.k === 'range') {
      const roll = r.next()
      if (roll < 0.06) return `${this.intExpr(scope, 1)} / ${this.intAtom(scope)}`
      if (roll < 0.1) return `${this.intExpr(scope, 1)} % ${this.intAtom(scope)}`
      if (roll < 0.35) return `${this.intAtom(scope)} + 1`
      if (roll < 0.5) return `min(${this.intAtom(scope)} + 1, ${t.hi === 2 ? '2' : t.text === '0..cap' ? 'cap' : '1'})`
    }
    return this.expr(t, scope, 2)
  }

  private expr(t: GType, scope: Scope, depth: number): string {
    if (t.k === 'bool') return this.boolExpr(scope, depth)
    if (t.k === 'enum') return this.enumExpr(t, scope, depth)
    // A value that stays in lo..hi: clamped, or an atom already known to be in range.
    const r = this.rnd
    const roll = r.next()
    const hiText = t.text === '0..cap' ? 'cap' : String(t.hi)
    if (roll < 0.4) return String(r.int(t.lo, t.hi))
    if (roll < 0.7) return `max(${t.lo}, min(${this.intExpr(scope, depth)}, ${hiText}))`
    return `(if ${this.boolExpr(scope, depth - 1)} then ${r.int(t.lo, t.hi)} else ${hiText})`
  }

  /** Integer-valued operands: literals, `cap`, int vars, int fields. */
  private intAtom(scope: Scope): string {
    const r = this.rnd
    const opts: string[] = [String(r.int(0, 2))]
    if (r.chance(0.3)) opts.push('cap')
    for (const v of this.vars) {
      if (v.type.k !== 'range') continue
      if (!v.perPeer) opts.push(v.name, v.name, v.name)
      else for (const b of scope.binders) opts.push(`${v.name}[${b}]`, `${v.name}[${b}]`)
    }
    for (const f of scope.fields) if (f.type.k === 'range') opts.push(f.name, f.name, f.name)
    return r.pick(opts)
  }

  private intExpr(scope: Scope, depth: number): string {
    const r = this.rnd
    if (depth <= 0) return this.intAtom(scope)
    const roll = r.next()
    const sub = () => this.intExpr(scope, depth - 1)
    if (roll < 0.3) return this.intAtom(scope)
    if (roll < 0.45) return `(${sub()} ${r.pick(['+', '-', '*'])} ${sub()})`
    // Division only by a positive literal: never a model error inside a larger expression.
    if (roll < 0.52) return `(${sub()} ${r.pick(['/', '%'])} ${r.int(1, 2)})`
    if (roll < 0.64) return `${r.pick(['min', 'max'])}(${sub()}, ${sub()})`
    if (roll < 0.72) return `(-${this.intAtom(scope)} + 2)`
    if (roll < 0.84) return `(if ${this.boolExpr(scope, depth - 1)} then ${sub()} else ${sub()})`
    const b = this.binderNames.find((x) => !scope.binders.includes(x))
    if (b) return `(count ${b}: ${this.boolExpr({ ...scope, binders: [...scope.binders, b] }, depth - 1)})`
    return this.intAtom(scope)
  }

  private boolAtom(scope: Scope): string {
    const r = this.rnd
    const opts: string[] = [r.pick(['true', 'false'])]
    for (const v of this.vars) {
      if (v.type.k !== 'bool') continue
      if (!v.perPeer) opts.push(v.name, v.name, v.name)
      else for (const b of scope.binders) opts.push(`${v.name}[${b}]`, `${v.name}[${b}]`, `${v.name}[${b}]`)
    }
    for (const f of scope.fields) if (f.type.k === 'bool') opts.push(f.name, f.name, f.name)
    return r.pick(opts)
  }

  private boolExpr(scope: Scope, depth: number): string {
    const r = this.rnd
    const roll = r.next()
    if (depth <= 0 || roll < 0.25) {
      return r.chance(0.5) ? this.boolAtom(scope) : this.comparison(scope, 0)
    }
    const sub = () => this.boolExpr(scope, depth - 1)
    if (roll < 0.5) return this.comparison(scope, depth - 1)
    if (roll < 0.65) return `(${sub()} ${r.pick(['and', 'or', 'implies'])} ${sub()})`
    if (roll < 0.72) return `(not ${sub()})`
    if (roll < 0.78) return `(if ${sub()} then ${sub()} else ${sub()})`
    const b = this.binderNames.find((x) => !scope.binders.includes(x))
    if (b) return `(${r.pick(['some', 'every'])} ${b}: ${this.boolExpr({ ...scope, binders: [...scope.binders, b] }, depth - 1)})`
    return this.boolAtom(scope)
  }

  private comparison(scope: Scope, depth: number): string {
    const r = this.rnd
    const enumThings = this.enumOperands(scope)
    if (enumThings.length > 0 && r.chance(0.3)) {
      const [labels, text] = r.pick(enumThings)
      return `(${text} ${r.pick(['=', '!='])} ${r.pick(labels)})`
    }
    return `(${this.intExpr(scope, depth)} ${r.pick(['=', '!=', '<', '<=', '>', '>='])} ${this.intExpr(scope, depth)})`
  }

  private enumOperands(scope: Scope): [string[], string][] {
    const out: [string[], string][] = []
    for (const v of this.vars) {
      if (v.type.k !== 'enum') continue
      if (!v.perPeer) out.push([v.type.labels, v.name])
      else for (const b of scope.binders) out.push([v.type.labels, `${v.name}[${b}]`])
    }
    for (const f of scope.fields) if (f.type.k === 'enum') out.push([f.type.labels, f.name])
    return out
  }

  private enumExpr(t: { k: 'enum'; labels: string[] }, scope: Scope, depth: number): string {
    const r = this.rnd
    const same = this.enumOperands(scope).filter(([labels]) => labels === t.labels)
    const roll = r.next()
    if (same.length > 0 && roll < 0.35) return r.pick(same)[1]
    if (depth > 0 && roll < 0.55) {
      return `(if ${this.boolExpr(scope, depth - 1)} then ${r.pick(t.labels)} else ${r.pick(t.labels)})`
    }
    return r.pick(t.labels)
  }
}

/**
 * Property and check blocks for a generated protocol (given its typed model), for temporal
 * differential tests: each temporal operator, `forall p` and `forall p, q`, atoms over scalars,
 * entries, `alive`, `crashed` and `pending`, with `correct`/`faulty` premises. Checked for
 * 2 processes (and 1 for the one-variable properties), within `limit` states.
 */
export function generateProperties(
  protocol: { name: string; vars: { name: string; perPeer: boolean; type: { k: string; labels?: string[] } }[]; messages: { name: string }[] },
  seed: number,
  limit = 3000,
): string {
  const r = new Random(seed * 7919 + 13)
  const atomOf = (p: string, q: string | null): string => {
    const choices = protocol.vars.filter((v) => v.perPeer === (q !== null))
    if (choices.length === 0) return q === null ? `alive(${p})` : `pending(${r.pick(protocol.messages).name}, ${q} -> ${p})`
    const v = r.pick(choices)
    const ref = q === null ? `${p}.${v.name}` : `${p}.${v.name}[${q}]`
    if (v.type.k === 'bool') return r.chance(0.5) ? ref : `not ${ref}`
    if (v.type.k === 'enum') return `${ref} = ${r.pick(v.type.labels!)}`
    return `${ref} ${r.pick(['=', '>=', '<'])} ${r.int(0, 1)}`
  }
  const one = [
    `forall p: always eventually (${atomOf('p', null)})`,
    `forall p: eventually always (${atomOf('p', null)})`,
    `forall p: always (${atomOf('p', null)})`,
    `forall p: (${atomOf('p', null)}) unless crashed(p)`,
  ]
  const two = [
    `forall p, q: correct(p) and correct(q) implies always eventually (${atomOf('p', 'q')})`,
    `forall p, q: faulty(q) implies eventually always (${atomOf('p', 'q')})`,
    `forall p, q: (${atomOf('p', null)}) until (${atomOf('p', 'q')} or crashed(q))`,
    `forall p, q: always (pending(${r.pick(protocol.messages).name}, q -> p) implies eventually (${atomOf('p', 'q')} or crashed(p)))`,
  ]
  const a = r.pick(one)
  const b = r.pick(two)
  return [
    '```property',
    `property solo = ${a}`,
    `property pair = ${b}`,
    '```',
    '',
    '```check',
    `check ${protocol.name}: solo at N = 1..2 within ${limit} states`,
    `check ${protocol.name}: pair at N = 2 within ${limit} states`,
    '```',
    '',
  ].join('\n')
}
