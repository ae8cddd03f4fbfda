// Parse-and-check throughput: a generated notebook of about 5,000 lines through the whole front
// end, against a baseline of the CommonMark parse of the same text alone.
import MarkdownIt from 'markdown-it'
import { analyzeNotebook } from '../kernels/language/analyze'

/** A notebook of `blocks` protocol/property/check groups, about 60 lines each. */
export function generatedNotebook(targetLines = 5000): string {
  const parts: string[] = ['---', 'title: Generated orchard', '---', '# Generated orchard', '']
  for (let k = 0; parts.length < targetLines; k++) {
    parts.push(
      `Pump station ${k} watches its neighbours with heartbeats, with a sum $x_{${k}} + 1$.`, '',
      '```protocol',
      `protocol station${k} {`,
      '  const delay = 2',
      '  const patience = 2',
      '  const cap = 4',
      '  timing synchronous(delay: delay, idle: 1)',
      '  faults crash',
      '  message beat',
      '  message level(v: 0..cap, ok: bool)',
      '  state suspect[peer]: bool = false',
      '  state wait[peer]: 1..cap = patience',
      '  state quiet[peer]: 0..cap = 0',
      '  state mode: {idle, pumping, drained} = idle',
      '  state seen: 0..cap = any',
      '  on beat from q {',
      '    quiet[q] := 0',
      '    if suspect[q] {',
      '      suspect[q] := false',
      '      wait[q] := min(wait[q] + 1, cap)',
      '    } else if quiet[q] > 0 {',
      '      skip',
      '    } else {',
      '      wait[q] := max(1, wait[q] - 0)',
      '    }',
      '  }',
      '  on level(v, ok) from q {',
      '    seen := if ok then v else seen',
      '    send beat to q',
      '  }',
      '  step {',
      '    broadcast beat',
      '    broadcast level(seen, mode = pumping)',
      '    mode := one of {idle, pumping, drained}',
      '    for q {',
      '      quiet[q] := min(quiet[q] + 1, cap)',
      '      if quiet[q] >= wait[q] and not (seen * 2 / 2 % 5 < 0) { suspect[q] := true }',
      '    }',
      '  }',
      '}',
      '```', '',
      '```property',
      `property detects${k} = forall p, q: correct(p) and faulty(q) implies eventually always p.suspect[q]`,
      `property settles${k} = forall p, q: correct(p) and correct(q) implies eventually always not p.suspect[q]`,
      `property bounded${k} = forall p, q: always (p.wait[q] <= cap and p.quiet[q] >= 0)`,
      '```', '',
      '```check',
      `check station${k}: detects${k}, settles${k}`,
      `check station${k}: bounded${k} at N = 2..3 with delay in 1..2 within 100000 states`,
      '```', '',
    )
  }
  return parts.join('\n')
}

/**
 * One protocol with a 100,000-label enum (the most an enum may list) in two variables and a step
 * naming 2,000 of its labels: linear analysis reads it at about the lines-per-second of ordinary
 * text, a label lookup by scanning would not.
 */
export function longEnumNotebook(labels = 100_000, uses = 2000): string {
  const ls = Array.from({ length: labels }, (_, i) => `crate${i}`)
  const list = ls.join(',\n    ')
  const step = Array.from({ length: uses }, (_, i) => `    if here = ${ls[(i * 7919) % labels]} { here := ${ls[(i * 104729) % labels]} }`).join('\n')
  return '# Depot crates\n\n```protocol\nprotocol depot {\n  timing asynchronous\n  state here: {\n    ' + list + '\n  } = crate0\n' +
    '  state last: {\n    ' + list + '\n  } = crate0\n  step {\n' + step + '\n    last := here\n  }\n}\n```\n'
}

export interface ParseCase { name: string; lines: number; seconds: number; linesPerSecond: number; diagnostics: number }

function timeIt(runs: number, f: () => unknown): number {
  f() // warm-up
  const t0 = performance.now()
  for (let i = 0; i < runs; i++) f()
  return (performance.now() - t0) / 1000 / runs
}

/** Lines per second of analyzeNotebook on the generated notebook, and of markdown-it alone. */
export function parseCases(): { cases: ParseCase[]; baseline: ParseCase } {
  const text = generatedNotebook()
  const lines = text.split('\n').length
  const diagnostics = analyzeNotebook(text).diagnostics.length
  const seconds = timeIt(5, () => analyzeNotebook(text))
  const md = new MarkdownIt('commonmark')
  const base = timeIt(5, () => md.parse(text, {}))
  const enumText = longEnumNotebook()
  const enumLines = enumText.split('\n').length
  const enumSeconds = timeIt(2, () => analyzeNotebook(enumText))
  return {
    cases: [
      { name: 'parse and check a generated notebook', lines, seconds, linesPerSecond: lines / seconds, diagnostics },
      { name: 'parse and check a 100,000-label enum', lines: enumLines, seconds: enumSeconds, linesPerSecond: enumLines / enumSeconds, diagnostics: analyzeNotebook(enumText).diagnostics.length },
    ],
    baseline: { name: 'CommonMark parse of the same text (markdown-it)', lines, seconds: base, linesPerSecond: lines / base, diagnostics: 0 },
  }
}
