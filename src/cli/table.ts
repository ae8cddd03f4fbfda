// The readable form of a report: one table row per checked row, then what a reader needs below it:
// counterexamples tick by tick in a compact form, the reasons a cutoff was refused, notes, and the
// cutoff statements the verdicts stand for.
import type { CheckRow, Counterexample, InductionState, Report, ShownValue, TickRecord, Verdict } from '../../kernels/result'
import { ruleLabel } from '../../kernels/symmetry/rules'

/** `file:line:column: message`, the form editors and CI logs link from. */
export function diagnosticLine(path: string, line: number, column: number, message: string): string {
  return `${path}:${line}:${column}: ${message}`
}

const HEADER = ['property', 'instance', 'constants', 'verdict', 'states', 'transitions', 'time']
const NUMERIC = new Set([4, 5, 6])
const VERDICT = 3

/** The instance a row was checked on, e.g. `G_2 (cutoff)` when the cutoff picked the size. */
export function instanceLabel(row: CheckRow): string {
  if (row.processes < 1) return '-'
  const cutoff = row.cutoff.applies && row.cutoff.processes === row.processes ? ' (cutoff)' : ''
  return `G_${row.processes}${cutoff}`
}

function constantsLabel(constants: Record<string, number>): string {
  const parts = Object.entries(constants).map(([name, value]) => `${name}=${value}`)
  return parts.length ? parts.join(' ') : '-'
}

function count(n: number, complete: boolean): string {
  return n.toLocaleString('en-US') + (complete ? '' : '+')
}

/** How the table is drawn: `paint` wraps a padded verdict cell (colour), when given. */
export interface RenderOptions {
  paint?: (verdict: Verdict, cell: string) => string
}

/** The table and details for a report, as printed by `twofold check`. Ends with a newline. */
export function renderReport(report: Report, options: RenderOptions = {}): string {
  const path = report.notebook.path
  const out: string[] = []
  if (report.checks.length === 0) {
    out.push(report.errors.length ? 'nothing was checked: the notebook has errors' : 'the notebook has no checks to run')
    return out.join('\n') + '\n'
  }
  // Name the protocol only when the notebook checks more than one.
  const oneProtocol = report.checks.every((r) => r.protocol === report.checks[0].protocol)
  const cells = report.checks.map((row) => [
    oneProtocol ? row.property : `${row.protocol}/${row.property}`,
    instanceLabel(row),
    constantsLabel(row.constants),
    row.verdict + (row.method === 'induction' ? ' by induction' : '') + (row.agreement === false ? ' (sizes disagree)' : ''),
    // A row with no instance (the cutoff was refused and no sizes were given) explored nothing.
    row.processes < 1 ? '-' : count(row.states, row.complete),
    row.processes < 1 ? '-' : count(row.transitions, row.complete),
    `${row.seconds.toFixed(2)} s`,
  ])
  const widths = HEADER.map((h, c) => Math.max(h.length, ...cells.map((r) => r[c].length)))
  // Colour is added after padding, so escape codes never count towards a column's width.
  const line = (r: string[], verdict?: Verdict) =>
    r
      .map((cell, c) => {
        const padded = NUMERIC.has(c) ? cell.padStart(widths[c]) : cell.padEnd(widths[c])
        return c === VERDICT && verdict && options.paint ? options.paint(verdict, cell) + padded.slice(cell.length) : padded
      })
      .join('  ')
      .trimEnd()
  out.push(line(HEADER))
  out.push(line(widths.map((w) => '-'.repeat(w))))
  cells.forEach((r, i) => out.push(line(r, report.checks[i].verdict)))

  const details: string[] = []
  for (const row of report.checks) {
    const title = `${row.protocol}/${row.property} ${row.processes < 1 ? '(no instance checked)' : `on ${instanceLabel(row)}`}${Object.keys(row.constants).length ? ` with ${constantsLabel(row.constants)}` : ''}`
    const lines: string[] = []
    if (row.note) lines.push(`  ${row.note}`)
    // A proof by induction that explored nothing has no counts to qualify.
    const explored = row.method !== 'induction' || row.states > 0
    if (!row.complete && row.verdict !== 'violated' && row.processes >= 1 && explored) lines.push('  stopped before exploring every state (counts are a lower bound)')
    if (!row.cutoff.applies && row.cutoff.reasons.length) {
      lines.push('  cutoff refused:')
      for (const reason of row.cutoff.reasons) lines.push('    ' + diagnosticLine(path, reason.line, reason.column, `${ruleLabel(reason.rule, reason.name)}: ${reason.message}`))
    }
    if (row.counterexample) lines.push(...renderCounterexample(row.counterexample, row.assignment))
    if (lines.length) details.push('', `${title}: ${row.verdict}`, ...lines)
  }
  out.push(...details)

  const statements = [...new Set(report.checks.filter((r) => r.cutoff.applies && r.cutoff.statement).map((r) => r.cutoff.statement))]
  if (statements.length) {
    out.push('', 'cutoff statements used:')
    for (const s of statements) out.push(`  ${s}`)
  }
  const tally = (v: string) => report.checks.filter((r) => r.verdict === v).length
  out.push('', `${report.checks.length} row${report.checks.length === 1 ? '' : 's'}: ${tally('holds')} hold, ${tally('violated')} violated, ${tally('inconclusive')} inconclusive, ${tally('error')} error`)
  return out.join('\n') + '\n'
}

function shown(v: ShownValue): string {
  return String(v)
}

/** A counterexample, one line per tick: `t3  crash #2 | step #1 | #1<-#2 beat | #1->#2 beat | #1 quiet[2] 0->1`. */
export function renderCounterexample(cx: Counterexample, assignment: Record<string, number>): string[] {
  const bound = Object.entries(assignment).map(([v, n]) => `${v}=#${n}`).join(', ')
  const ticks = `${cx.ticks.length} tick${cx.ticks.length === 1 ? '' : 's'}`
  const shape = cx.kind === 'lasso' ? `lasso, ${ticks}, loop from tick index ${cx.loopStart}` : `${cx.kind}, ${ticks}`
  const lines = [`  counterexample (${shape}${bound ? `; ${bound}` : ''}): ${cx.message}`]
  if (cx.kind === 'induction' && cx.induction) {
    // A counterexample to induction is one tick from a state s that need not be reachable.
    lines.push(...renderInductionState('s ', cx.induction.before))
    cx.ticks.forEach((tick) => lines.push(`    t${tick.tick}  ${renderTick(tick)}`))
    if (cx.induction.after) lines.push(...renderInductionState("s'", cx.induction.after))
    if (cx.induction.conjunct) lines.push(`    fails in s': ${cx.induction.conjunct}`)
    return lines
  }
  if (cx.initial.length) {
    const start = cx.initial.map((p) => `#${p.process} ` + Object.entries(p.values).map(([k, v]) => `${k}=${shown(v)}`).join(' '))
    lines.push(`    start  ${start.join(' | ')}`)
  }
  cx.ticks.forEach((tick, i) => {
    if (cx.kind === 'lasso' && i === cx.loopStart) lines.push('    -- from here the ticks repeat forever --')
    lines.push(`    t${tick.tick}  ${renderTick(tick)}`)
  })
  // The property's atoms as written, with the assignment's processes filled in (`#1.suspect[#2]`).
  if (cx.atoms?.length) {
    lines.push('    atoms at the start, then after each tick (+ holds, . does not):')
    const width = Math.max(...cx.atoms.map((a) => a.text.length))
    for (const a of cx.atoms) lines.push(`      ${a.text.padEnd(width)}  ${a.values.map((v) => (v ? '+' : '.')).join('')}`)
  }
  return lines
}

/** A whole state of a counterexample to induction: one line for the processes, one for what is in flight. */
export function renderInductionState(label: string, st: InductionState): string[] {
  const procs = st.processes.map((p) => `#${p.process}${p.alive ? '' : ' (crashed)'}${p.idle !== undefined ? ` idle=${p.idle}` : ''} ` + Object.entries(p.values).map(([k, v]) => `${k}=${shown(v)}`).join(' '))
  const flight = st.inFlight.map((m) => `#${m.from}->#${m.to} ${m.message}${m.age !== undefined ? `@${m.age}` : ''}`)
  return [
    `    ${label}     ${procs.join(' | ')}${st.stable !== undefined ? ` | stable=${st.stable}` : ''}`,
    `    ${label.replace(/./g, ' ')}     in flight: ${flight.length ? flight.join(', ') : 'nothing'}`,
  ]
}

/** One tick in compact form; `nothing` when no process acted. */
export function renderTick(tick: TickRecord): string {
  const parts: string[] = []
  if (tick.crashed.length) parts.push('crash ' + tick.crashed.map((p) => `#${p}`).join(' '))
  if (tick.gst) parts.push('GST')
  parts.push(tick.stepped.length ? 'step ' + tick.stepped.map((p) => `#${p}`).join(' ') : 'no step')
  for (const m of tick.received) parts.push(`#${m.to}<-#${m.from} ${m.message}`)
  for (const m of tick.sent) parts.push(`#${m.from}->#${m.to} ${m.message}`)
  for (const c of tick.changes) parts.push(`#${c.process} ${c.variable} ${shown(c.from)}->${shown(c.to)}`)
  return parts.join(' | ')
}
