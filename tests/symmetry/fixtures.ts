// Shared fixtures for the symmetry tests: short notebooks built inline, positions found by searching
// the notebook text (an oracle for line and column that does not go through the parser's spans).
import { expect } from 'vitest'
import { analyzeNotebook } from '../../kernels/language/analyze'
import type { PropertyModel, ProtocolModel } from '../../kernels/language/model'

export interface Case {
  text: string
  protocol: ProtocolModel
  properties: PropertyModel[]
}

/**
 * One notebook with `protocol` (full text) and `properties` (one `property ...` line each), checked
 * by one check block. Fails the test if the notebook has errors (warnings are allowed).
 */
export function notebook(protocol: string, properties: string[]): Case {
  const name = /protocol\s+(\w+)/.exec(protocol)![1]
  const names = properties.map((p) => /property\s+(\w+)/.exec(p)![1])
  // A property without `forall` may only be checked at explicit sizes.
  const sizes = properties.some((p) => !/=\s*forall/.test(p)) ? ' at N = 2' : ''
  const text = `# Case\n\n\`\`\`protocol\n${protocol.trim()}\n\`\`\`\n\n\`\`\`property\n${properties.join('\n')}\n\`\`\`\n\n\`\`\`check\ncheck ${name}: ${names.join(', ')}${sizes}\n\`\`\`\n`
  const m = analyzeNotebook(text)
  const errors = m.diagnostics.filter((d) => d.severity === 'error')
  expect(errors, text).toEqual([])
  return { text, protocol: m.protocols[0], properties: m.checks[0].properties }
}

/** The 1-based line and column of the `occurrence`-th occurrence of `needle` in `text`. */
export function position(text: string, needle: string, occurrence = 1): { line: number; column: number } {
  let at = -1
  for (let k = 0; k < occurrence; k++) {
    at = text.indexOf(needle, at + 1)
    if (at < 0) throw new Error(`\`${needle}\` occurs fewer than ${occurrence} times`)
  }
  const before = text.slice(0, at)
  const line = before.split('\n').length
  return { line, column: at - before.lastIndexOf('\n') }
}

/**
 * A depot protocol skeleton: two messages, a per-peer flag, a per-peer counter and two scalars;
 * `body` holds the handlers and the step block, `extra` more declarations.
 */
export function depot(body: string, extra = ''): string {
  return `protocol depot {
  const cap = 2
  timing asynchronous
  faults crash
  message ping
  message ack(v: 0..2)
  state seen[peer]: bool = false
  state hits[peer]: 0..2 = 0
  state level: 0..2 = 0
  state heard: bool = false
${extra}
${body}
}`
}

/** The default property of the depot cases (in the class by itself). */
export const SEEN = 'property seenok = forall p, q: always (correct(q) implies not p.seen[q])'

/** The orchard pumps of the language guide (language.md), in the class for its three properties. */
export const PUMPS = `protocol pumps {
  const delay = 2
  const patience = 2
  const cap = 4
  timing synchronous(delay: delay, idle: 1)
  faults crash
  message beat
  state suspect[peer]: bool = false
  state wait[peer]: 1..cap = patience
  state quiet[peer]: 0..cap = 0
  on beat from q {
    quiet[q] := 0
    if suspect[q] {
      suspect[q] := false
      wait[q] := min(wait[q] + 1, cap)
    }
  }
  step {
    broadcast beat
    for q {
      quiet[q] := min(quiet[q] + 1, cap)
      if quiet[q] >= wait[q] { suspect[q] := true }
    }
  }
}`
