// Synthetic reports and models for the record tests: small, hand-written values whose every field
// is known, so records, replay and merge can be tested without running the kernel.
import type { BlockRef, NotebookModel } from '../../kernels/language/model'
import type { CheckRow, Report } from '../../kernels/result'

export const harbourText = [
  '# Harbour cranes',
  '',
  '```protocol',
  'protocol cranes {',
  '  const reach = 2',
  '  timing asynchronous',
  '  message hoist',
  '  state busy: bool = false',
  '  step { broadcast hoist }',
  '}',
  '```',
  '',
  '```property',
  'property idle = forall p: always not p.busy',
  'property calm = forall p, q: always not p.busy',
  '```',
  '',
  '```check',
  'check cranes: idle, calm with reach in 1..4',
  '```',
  '',
].join('\n')

function block(kind: BlockRef['kind'], first: string, last: string, line: number): BlockRef {
  const from = harbourText.indexOf(first)
  const to = harbourText.indexOf(last, from) + last.length
  return { kind, from, to, line, text: harbourText.slice(from, to) }
}

const protocolBlock = block('protocol', 'protocol cranes', '\n}', 4)
const propertyBlock = block('property', 'property idle', 'p.busy\n', 14)
const checkBlock = block('check', 'check cranes', '1..4', 19)

/** A typed model with just the parts records read (blocks, names, limits, the plan); the rest is not consulted. */
export const harbourModel = {
  title: null,
  blocks: [protocolBlock, propertyBlock, checkBlock],
  protocols: [{ name: 'cranes', block: protocolBlock, consts: [{ name: 'reach', value: 2 }] }],
  properties: [
    { name: 'idle', block: propertyBlock },
    { name: 'calm', block: propertyBlock },
  ],
  checks: [{ protocol: 0, block: checkBlock, limit: null, sizes: null, sweep: [{ constIndex: 0, values: [1, 2, 3, 4] }], properties: [{ name: 'idle' }, { name: 'calm' }] }],
  diagnostics: [],
} as unknown as NotebookModel

/** One row of the sweep: property `idle` or `calm` at reach 1..4. */
export function row(index: number, overrides: Partial<CheckRow> = {}): CheckRow {
  const property = index < 4 ? 'idle' : 'calm'
  return {
    row: index,
    check: 0,
    protocol: 'cranes',
    property,
    processes: property === 'idle' ? 1 : 2,
    constants: { reach: (index % 4) + 1 },
    timing: 'asynchronous',
    verdict: 'holds',
    states: 10 + index,
    transitions: 30 + index,
    seconds: 0.01 * (index + 1),
    complete: true,
    cutoff: { applies: true, processes: property === 'idle' ? 1 : 2, statement: 'for every N: ...', tex: '', passed: ['1', '2'], reasons: [] },
    counterexample: null,
    assignment: property === 'idle' ? { p: 1 } : { p: 1, q: 2 },
    method: 'exploration',
    search: 'invariant',
    ...overrides,
  }
}

/** A report of the eight rows (or of those `keep` selects), with the notebook hash left for the record to fill. */
export function report(keep: (row: number) => boolean = () => true): Report {
  return {
    notebook: { path: 'notebooks/harbour.md', sha256: '' },
    errors: [],
    checks: [0, 1, 2, 3, 4, 5, 6, 7].filter(keep).map((i) => row(i)),
  }
}
