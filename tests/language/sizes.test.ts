// Big and deep input (issue 10, items 14 and 17): analysis is linear in the number of enum labels,
// and every size limit of limits.ts is refused at the construct with its line and column. No
// timing: linearity is checked on the checker's own count of label work (`labelWork`), which a
// quadratic label lookup or enum comparison would make grow fourfold when the enum doubles.
import { readFileSync } from 'node:fs'
import { describe, expect, test } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import { MAX_DIAGNOSTICS, MAX_ENUM_LABELS, MAX_NESTING, MAX_NOTEBOOK_CHARS } from '../../kernels/language/limits'
import { LineMap } from '../../kernels/language/positions'
import { labelWork } from '../../kernels/language/sorts'

const labels = (n: number, from = 0) => Array.from({ length: n }, (_, i) => `l${i + from}`)

/**
 * A protocol with enum variables `c` and `d` of the given labels, `c` assigned `set` and `d` set
 * from a message field of the same enum when `field` (a field holds at most 65536 values), and a
 * property on both.
 */
function enumNotebook(ls: string[], set: string, watched: string, field = false): string {
  const list = ls.join(', ')
  return '```protocol\nprotocol sorter {\n  timing asynchronous\n  state c: {' + list + '} = ' + ls[0] +
    '\n  state d: {' + list + '} = ' + ls[0] + '\n' +
    (field ? '  message bin(k: {' + list + '})\n  on bin(k) from q { d := k }\n  step { c := ' + set + '  broadcast bin(c) }\n'
      : '  step { c := ' + set + '  d := c }\n') + '}\n```\n\n' +
    '```property\nproperty never = forall p: always p.c != ' + watched + ' and p.d != ' + watched + '\n```\n'
}

function errors(text: string): [number, number, string][] {
  return analyzeNotebook(text).diagnostics.filter((d) => d.severity === 'error').map((d) => [d.line, d.column, d.message])
}

function work(n: number): { steps: number; model: ReturnType<typeof analyzeNotebook> } {
  const ls = labels(n)
  const before = labelWork.steps
  const model = analyzeNotebook(enumNotebook(ls, ls[n - 1], ls[n >> 1]))
  return { steps: labelWork.steps - before, model }
}

describe('long enums (item 14)', () => {
  test('a 100,000-label enum is analysed with label work linear in its size', () => {
    const half = work(MAX_ENUM_LABELS / 2)
    const full = work(MAX_ENUM_LABELS)
    expect(full.model.diagnostics.filter((d) => d.severity === 'error')).toEqual([])
    const c = full.model.protocols[0].vars[0]
    expect(c.type.k === 'enum' && c.type.labels.length).toBe(MAX_ENUM_LABELS)
    // Equal enums share one labels array.
    const d = full.model.protocols[0].vars[1]
    expect(d.type.k === 'enum' && c.type.k === 'enum' && d.type.labels === c.type.labels).toBe(true)
    // The label assigned in the step is the last one: its value is its position.
    const step = full.model.protocols[0].step[0]
    expect(step.k === 'assign' && step.value.k === 'lit' && step.value.value).toBe(MAX_ENUM_LABELS - 1)
    // Linear: a few steps per label, and doubling the enum doubles the work.
    expect(full.steps).toBeLessThan(12 * MAX_ENUM_LABELS)
    expect(full.steps / half.steps).toBeGreaterThan(1.9)
    expect(full.steps / half.steps).toBeLessThan(2.1)
  })

  test('an enum with more labels than the limit is refused at the first label past it', () => {
    const ls = labels(MAX_ENUM_LABELS + 1)
    const text = enumNotebook(ls, 'l1', 'l0')
    const errs = errors(text)
    const at = new LineMap(text).position(text.indexOf(` l${MAX_ENUM_LABELS}}`) + 1)
    expect(errs[0]).toEqual([at.line, at.column, `the enum type of \`c\` has more than ${MAX_ENUM_LABELS} labels, the most an enum may have; use a range type for this many values`])
    // Nothing claims that the variable refused with it is something else.
    expect(errs.filter((e) => /cannot be assigned/.test(e[2]))).toEqual([])
  })

  test('equal enums of variables and a field are one enum; a long one is abbreviated in messages', () => {
    const ls = labels(40)
    const m = analyzeNotebook(enumNotebook(ls, 'l39', 'l3', true))
    expect(m.diagnostics).toEqual([])
    const [c, d] = m.protocols[0].vars, k = m.protocols[0].messages[0].fields[0]
    expect(c.type.k === 'enum' && d.type.k === 'enum' && k.type.k === 'enum' && d.type.labels === c.type.labels && k.type.labels === c.type.labels).toBe(true)
    expect(errors(enumNotebook(ls, '3', 'l0', true))).toEqual([[8, 15, '`c` holds one of {l0, l1, l2, l3, l4, l5, ..., l39} (40 labels), but this value is an integer; assign a value of its type']])
  })
})

describe('notebook size and diagnostics (item 14)', () => {
  test('a notebook longer than the limit gets one error where it passes the limit, and nothing else is read', () => {
    const line = 'The depot keeps a ledger of every crate that leaves the yard.\n'
    const text = '# Ledger\n\n' + line.repeat(Math.ceil(MAX_NOTEBOOK_CHARS / line.length) + 10) + '```protocol\nprotocol p {\n}\n```\n'
    const m = analyzeNotebook(text)
    const at = new LineMap(text).position(MAX_NOTEBOOK_CHARS)
    expect(m.diagnostics.map((d) => [d.line, d.column, d.message])).toEqual([
      [at.line, at.column, `the notebook is longer than ${MAX_NOTEBOOK_CHARS} characters (4 MiB), the most twofold reads, and passes that here; split it into smaller notebooks`],
    ])
    expect(m.title).toBe('Ledger')
    expect(m.blocks).toEqual([])
  })

  test('a notebook just within the limit is read', () => {
    const head = '```protocol\nprotocol p {\n  timing asynchronous\n  state x: bool = false\n  step { x := not x }\n}\n```\n'
    const text = head + ' '.repeat(MAX_NOTEBOOK_CHARS - head.length)
    const m = analyzeNotebook(text)
    expect(m.diagnostics).toEqual([])
    expect(m.protocols.map((p) => p.name)).toEqual(['p'])
  })

  test('at most MAX_DIAGNOSTICS diagnostics, the last saying how many more and where they start', () => {
    const steps = MAX_DIAGNOSTICS + 250
    const text = '```protocol\nprotocol p {\n  timing asynchronous\n  state x: bool = false\n' + '  step { x := not x }\n'.repeat(steps) + '}\n```\n'
    const ds = analyzeNotebook(text).diagnostics
    expect(ds.length).toBe(MAX_DIAGNOSTICS + 1)
    // Every step block after the first is an error: steps - 1 of them, MAX_DIAGNOSTICS listed.
    const last = ds[ds.length - 1]
    expect(last.message).toBe(`${steps - 1 - MAX_DIAGNOSTICS} more problems from here on are not listed (a notebook lists at most ${MAX_DIAGNOSTICS}); fix the ones above and check again`)
    expect([last.line, last.column]).toEqual([6 + MAX_DIAGNOSTICS, 3])
  })
})

describe('many unknown names among many names (item 14)', () => {
  test('the first problems are listed with suggestions, the rest counted; suggestions stop within their budget', () => {
    const n = 5000
    const text = '```protocol\nprotocol yard {\n  timing asynchronous\n' +
      Array.from({ length: n }, (_, i) => `  state crate${i}: bool = false\n`).join('') + '  step {\n' +
      Array.from({ length: n }, (_, i) => `    crate${i} := crat${i}\n`).join('') + '  }\n}\n```\n'
    const ds = analyzeNotebook(text).diagnostics
    expect(ds.length).toBe(MAX_DIAGNOSTICS + 1)
    expect(ds[0].message).toBe('unknown name `crat0` (did you mean `crate0`?); declare it as a constant or a state variable')
    expect(ds[ds.length - 1].message).toMatch(new RegExp(`^${n - MAX_DIAGNOSTICS} more problems from here on are not listed`))
  })
})

/** `x := E` nested `levels` deep in parentheses inside `ifs` nested `if` statements. */
function deepProtocol(ifs: number, parens: number): string {
  return '```protocol\nprotocol deep {\n  timing asynchronous\n  state x: 0..3 = 0\n  state b: bool = false\n  step {\n' +
    '    ' + 'if b { '.repeat(ifs) + 'x := ' + '('.repeat(parens) + '1' + ')'.repeat(parens) + ' }'.repeat(ifs) + '\n  }\n}\n```\n'
}

describe('deep nesting (item 17)', () => {
  const tooDeep = (kind: string) => `the ${kind} block nests more than ${MAX_NESTING} levels deep here (parentheses, operators, \`if\` and \`for\`), the most a block may; split the expression or the statements, e.g. with helper variables or separate properties`

  test('protocol: the deepest allowed nesting is read; one level more is one located error', () => {
    expect(errors(deepProtocol(40, MAX_NESTING - 40))).toEqual([])
    for (const [ifs, parens] of [[40, MAX_NESTING - 39], [MAX_NESTING + 1, 0], [1000, 0], [0, 1000], [500, 500]]) {
      const text = deepProtocol(ifs, parens)
      // The construct at level MAX_NESTING + 1: an `if` or a parenthesis.
      const offset = ifs > MAX_NESTING
        ? text.split('if b').slice(0, MAX_NESTING + 1).join('if b').length
        : text.indexOf('x := ') + 5 + (MAX_NESTING - ifs)
      const at = new LineMap(text).position(offset)
      expect(errors(text), `${ifs} ifs, ${parens} parentheses`).toEqual([[at.line, at.column, tooDeep('protocol')]])
    }
  })

  test('property: deep formulas give one error, and a check naming them no other', () => {
    const proto = '```protocol\nprotocol deep {\n  timing asynchronous\n  state b: bool = false\n  step { b := not b }\n}\n```\n'
    const prop = (nots: number) => '```property\nproperty flip = forall p: ' + 'not '.repeat(nots) + 'p.b\n```\n\n```check\ncheck deep: flip at N = 1\n```\n'
    // `forall` is one level; each `not` one more.
    expect(errors(proto + prop(MAX_NESTING - 1))).toEqual([])
    for (const nots of [MAX_NESTING, 3000]) {
      const text = proto + prop(nots)
      const at = new LineMap(text).position(text.indexOf('forall p: ') + 10 + 4 * (MAX_NESTING - 1))
      expect(errors(text)).toEqual([[at.line, at.column, tooDeep('property')]])
    }
  })

  test('broken input that the parser repairs into a deep tree gets its syntax errors, not a nesting error', () => {
    const text = '```protocol\nprotocol deep {\n  timing asynchronous\n  state x: 0..3 = 0\n  step { ' + 'x := := '.repeat(300) + '}\n}\n```\n'
    const errs = errors(text)
    expect(errs.length).toBeGreaterThan(0)
    expect(errs.filter((e) => /nests more than/.test(e[2]))).toEqual([])
    expect(errs[0].slice(0, 2)).toEqual([5, 15])
  })

  test('a syntax error in one declaration does not hide deep nesting in the next', () => {
    const text = '```protocol\nprotocol deep {\n  timing asynchronous\n  state x: 0..3 = = 0\n  step { x := ' + '('.repeat(2000) + '1' + ')'.repeat(2000) + ' }\n}\n```\n'
    expect(errors(text).map((e) => e.slice(0, 2))).toEqual([[4, 19], [5, 15 + MAX_NESTING]])
  })

  test('long chains of one operator count each operator (the parser breaks them past a few hundred)', () => {
    const chain = (terms: number) => '```protocol\nprotocol deep {\n  timing asynchronous\n  state x: 0..3 = 0\n  step { x := ' +
      Array.from({ length: terms }, () => 'x').join(' + ') + ' }\n}\n```\n'
    expect(errors(chain(MAX_NESTING + 1))).toEqual([])
    expect(errors(chain(MAX_NESTING + 2)).map((e) => e[2])).toEqual([tooDeep('protocol')])
    expect(errors(chain(2000)).map((e) => e[2])).toEqual([tooDeep('protocol')])
  })
})

describe('the README and the guide state these limits', () => {
  const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8')
  const limits = readme.slice(readme.indexOf('## Limits'), readme.indexOf('\n## ', readme.indexOf('## Limits') + 1))
  const guide = readFileSync(new URL('../../notebooks/guide.md', import.meta.url), 'utf8').replace(/\s+/g, ' ')
  test.each([
    ['longest notebook', MAX_NOTEBOOK_CHARS],
    ['longest enum', MAX_ENUM_LABELS],
    ['deepest nesting', MAX_NESTING],
    ['diagnostics', MAX_DIAGNOSTICS],
  ])('%s: %i', (what, value) => {
    const item = limits.split('\n- ').find((l) => l.toLowerCase().startsWith(what))
    expect(item, `README Limits has an item "${what}"`).toBeDefined()
    expect(item!.replace(/\s+/g, ' ')).toContain(String(value))
    expect(guide).toContain(String(value))
  })
})
