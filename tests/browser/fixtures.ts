// Fixture objects that follow kernels/result.ts exactly, for the pure rendering tests. The values
// are made up for the tests (no kernel produced them); each test says what it checks them against.
import type { CheckRow, Counterexample, CutoffInfo } from '../../kernels/result'

export const cutoffApplies: CutoffInfo = {
  applies: true,
  processes: 2,
  statement: 'for every N >= 2: G_N |= forall p != q. phi(p, q) iff G_2 |= phi(1, 2)',
  tex: '\\forall N \\geq 2:\\; G_N \\models \\forall p \\neq q.\\, \\varphi(p, q) \\iff G_2 \\models \\varphi(1, 2)',
  passed: ['peer-entries (rule 1): per-peer entries written only from their own peer'],
  reasons: [],
}

export const cutoffRefused: CutoffInfo = {
  applies: false,
  processes: null,
  statement: 'the protocol reads an aggregate',
  tex: '',
  passed: [],
  reasons: [{ rule: 5, name: 'no-aggregate', line: 14, column: 7, message: "'alarm' is mixed: it is assigned from count q" }],
}

/** A lasso in two processes: 1 sends a beat to 2, 2 crashes, 1 keeps suspecting. */
export const lasso: Counterexample = {
  kind: 'lasso',
  message: 'process 1 suspects process 2 forever',
  initial: [
    { process: 1, values: { 'suspect[2]': false } },
    { process: 2, values: { 'suspect[1]': false } },
  ],
  ticks: [
    { tick: 1, crashed: [], stepped: [1, 2], received: [], sent: [{ from: 1, to: 2, message: 'beat' }, { from: 2, to: 1, message: 'beat' }], changes: [] },
    { tick: 2, crashed: [2], stepped: [1], received: [{ from: 2, to: 1, message: 'beat' }], sent: [{ from: 1, to: 2, message: 'beat' }], changes: [] },
    { tick: 3, crashed: [], stepped: [1], received: [], sent: [], changes: [{ process: 1, variable: 'suspect[2]', from: false, to: true }] },
  ],
  loopStart: 2,
  atoms: [
    { text: 'alive(q)', values: [true, true, false, false] },
    { text: 'p.suspect[q]', values: [false, false, false, true] },
  ],
}

export function row(over: Partial<CheckRow>): CheckRow {
  return {
    row: 0, check: 0, protocol: 'harbour', property: 'settles', processes: 2,
    constants: { delay: 2, patience: 2 }, timing: 'synchronous', verdict: 'holds',
    states: 1234, transitions: 5678, seconds: 0.04, complete: true, cutoff: cutoffApplies,
    counterexample: null, assignment: { p: 1, q: 2 }, ...over,
  }
}
