// The space-time diagram of a counterexample: one vertical lane per process, time running down,
// one row per global state (the initial state, then the state after each tick). Message arrows
// run from the tick that sent to the tick that received; crashes are crossed out; columns beside
// the lanes are shaded where the property's atoms hold; a lasso's repeating part is bracketed.
// Pure: a Counterexample in, an SVG string out, every text escaped (see html.ts).
import type { Counterexample, MessageEvent } from '../../kernels/api'
import { html, raw, type Markup } from './html'

/** One arrow of the diagram. `receiveTick` is null when the trace never shows the receipt. */
export interface Arrow {
  from: number
  to: number
  message: string
  sendTick: number | null // null: sent before the loop came round again (lasso) or never shown
  receiveTick: number | null
}

/**
 * Pairs sends with receipts: a receipt of (from, to, message) at tick t is matched with the oldest
 * unmatched send of the same triple at an earlier tick. Copies of one value are one message in
 * the channel (semantics.md), so the oldest is the one that can be overdue first.
 */
export function messageArrows(cx: Counterexample): Arrow[] {
  const key = (m: MessageEvent) => `${m.from}\u0000${m.to}\u0000${m.message}`
  const open = new Map<string, Arrow[]>()
  const arrows: Arrow[] = []
  cx.ticks.forEach((tick, i) => {
    for (const r of tick.received) {
      const queue = open.get(key(r))
      const sent = queue?.shift()
      if (sent) sent.receiveTick = i
      else arrows.push({ from: r.from, to: r.to, message: r.message, sendTick: null, receiveTick: i })
    }
    for (const s of tick.sent) {
      const a: Arrow = { from: s.from, to: s.to, message: s.message, sendTick: i, receiveTick: null }
      arrows.push(a)
      const q = open.get(key(s))
      if (q) q.push(a)
      else open.set(key(s), [a])
    }
  })
  return arrows
}

/** Options for the diagram. */
export interface DiagramOptions {
  /** Indices into `counterexample.atoms` to shade; all atoms when omitted. */
  atoms?: number[]
  /** The processes the property's variables were bound to, filled into the atom legend. */
  assignment?: Record<string, number>
}

/** An atom's text with the property's variables replaced by their processes ("alive(q)" with q = 2 reads "alive(2)"). */
export function filledIn(text: string, assignment: Record<string, number> = {}): string {
  // The kernel writes fixed processes as `#n`; the page calls them by number, as the lanes do.
  let out = text.replace(/#(\d+)/g, '$1')
  for (const [v, n] of Object.entries(assignment)) out = out.replace(new RegExp(`\\b${v}\\b`, 'g'), String(n))
  return out
}

/** Words for a list of process numbers: "process 2 steps", "processes 1 and 2 step". */
export function whoSteps(list: number[]): string {
  if (list.length === 1) return `process ${list[0]} steps`
  return `processes ${list.slice(0, -1).join(', ')} and ${list[list.length - 1]} step`
}

/** Approximate text box, to keep labels apart. */
interface Box { x: number; y: number; w: number; h: number }
function clash(a: Box, b: Box): boolean {
  return a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h
}

const ROW = 30
const LANE = 110
const TOP = 46
const LEFT = 96
const ATOM_COL = 22
const PALETTE = ['#6c8f3a', '#b07a2a', '#5a6fa0', '#8a5a8c', '#3f8a86', '#a0525a']

/** Colour of atom `i` (shared with the table legend). */
export function atomColour(i: number): string { return PALETTE[i % PALETTE.length] }

/** The SVG markup of a counterexample's space-time diagram for an instance of `processes` processes. */
export function counterexampleSvg(cx: Counterexample, processes: number, opts: DiagramOptions = {}): string {
  const ticks = cx.ticks.length
  const states = ticks + 1
  const atoms = (cx.atoms ?? []).map((a, i) => ({ ...a, i })).filter((a) => !opts.atoms || opts.atoms.includes(a.i))
  const laneX = (p: number) => LEFT + (p - 1) * LANE + LANE / 2
  const stateY = (k: number) => TOP + k * ROW + ROW / 2
  const tickY = (i: number) => stateY(i) + ROW / 2 // between state i and state i+1
  const atomsX = LEFT + processes * LANE + 10
  const legendY = TOP + states * ROW + 24
  const width = Math.max(atomsX + atoms.length * ATOM_COL + 20, LEFT + 470)
  const height = legendY + 22 + atoms.length * 18 + 10
  const crashTick = new Map<number, number>()
  cx.ticks.forEach((t, i) => t.crashed.forEach((p) => { if (!crashTick.has(p)) crashTick.set(p, i) }))

  const parts: Markup[] = []
  // Hover bands first so that everything else draws on top of them.
  for (let i = 0; i < ticks; i++) {
    parts.push(html`<rect class="tick-band" data-tick="${i}" x="0" y="${tickY(i) - ROW / 2}" width="${width}" height="${ROW}"><title>tick ${cx.ticks[i].tick}</title></rect>`)
  }
  // A counterexample to induction starts from a state s that need not be reachable.
  // Labels sit on the row of the dots they name: "start" on the initial state, "tick t" on the tick.
  parts.push(html`<text class="state-label" x="${LEFT - 10}" y="${stateY(0) + 4}" text-anchor="end">${cx.kind === 'induction' ? 's' : 'start'}</text>`)
  for (let i = 0; i < ticks; i++) {
    parts.push(html`<text class="state-label" x="${LEFT - 10}" y="${tickY(i) + 4}" text-anchor="end">${cx.kind === 'induction' ? "s'" : `tick ${cx.ticks[i].tick}`}</text>`)
  }
  if (cx.loopStart !== undefined && cx.loopStart >= 0 && cx.loopStart <= ticks) {
    const y1 = stateY(cx.loopStart)
    const y2 = stateY(ticks)
    parts.push(html`<g class="loop"><path d="M ${LEFT - 62} ${y1} h 6 M ${LEFT - 62} ${y1} V ${y2} h 6" /><text x="${LEFT - 66}" y="${(y1 + y2) / 2}" transform="rotate(-90 ${LEFT - 66} ${(y1 + y2) / 2})" text-anchor="middle">repeats forever</text></g>`)
  }
  for (let p = 1; p <= processes; p++) {
    const x = laneX(p)
    const c = crashTick.get(p)
    const end = c === undefined ? stateY(ticks) : tickY(c)
    parts.push(html`<text class="lane-label" x="${x}" y="${TOP - 16}" text-anchor="middle">process ${p}</text>`)
    parts.push(html`<line class="lane" x1="${x}" y1="${stateY(0)}" x2="${x}" y2="${end}" />`)
    if (c !== undefined) {
      const y = tickY(c)
      parts.push(html`<line class="lane-dead" x1="${x}" y1="${y}" x2="${x}" y2="${stateY(ticks)}" />`)
      parts.push(html`<path class="crash" d="M ${x - 7} ${y - 7} L ${x + 7} ${y + 7} M ${x + 7} ${y - 7} L ${x - 7} ${y + 7}"><title>process ${p} crashes in tick ${cx.ticks[c].tick}</title></path>`)
    }
  }
  cx.ticks.forEach((t, i) => {
    for (const p of t.stepped) parts.push(html`<circle class="step" cx="${laneX(p)}" cy="${tickY(i)}" r="3.5"><title>process ${p} steps in tick ${t.tick}</title></circle>`)
  })
  if (cx.kind === 'model-error' && ticks) {
    // The failing tick: its step has no successor state; ring the erring process there.
    const last = cx.ticks[ticks - 1]
    const p = last.stepped[0] ?? 1
    parts.push(html`<g class="failing" data-tick="${ticks - 1}"><circle cx="${laneX(p)}" cy="${tickY(ticks - 1)}" r="9" /><text x="${laneX(p) + 13}" y="${tickY(ticks - 1) + 4}">model error</text><title>the step of process ${p} in tick ${last.tick} breaks the model</title></g>`)
  }
  const placed: Box[] = []
  const place = (x: number, y: number, text: string): { x: number; y: number } => {
    const box = { x: x - text.length * 3, y: y - 10, w: text.length * 6, h: 12 }
    while (placed.some((b) => clash(b, box))) box.y += 12
    placed.push(box)
    return { x, y: box.y + 10 }
  }
  for (const a of messageArrows(cx)) {
    const x1 = laneX(a.from)
    const x2 = laneX(a.to)
    const dir = x2 > x1 ? 1 : -1
    const label = `${a.message}: ${a.from} to ${a.to}`
    if (a.sendTick !== null && a.receiveTick !== null) {
      const y1 = tickY(a.sendTick)
      const y2 = tickY(a.receiveTick)
      parts.push(html`<line class="msg" x1="${x1}" y1="${y1}" x2="${x2 - dir * 5}" y2="${y2}" marker-end="url(#arrowhead)"><title>${label}, sent in tick ${cx.ticks[a.sendTick].tick}, received in tick ${cx.ticks[a.receiveTick].tick}</title></line>`)
      // Near the sender, a quarter of the way along: arrows that cross in the middle keep their labels apart.
      const at = place(x1 + (x2 - x1) * 0.3, y1 + (y2 - y1) * 0.3 - 4, a.message)
      parts.push(html`<text class="msg-label" x="${at.x}" y="${at.y}" text-anchor="middle">${a.message}<title>${label}</title></text>`)
    } else if (a.sendTick !== null) {
      // Never received within the trace: dropped at a crashed receiver, or still in flight at the end.
      const y1 = tickY(a.sendTick)
      const crashed = crashTick.get(a.to)
      const dropped = crashed !== undefined && crashed >= a.sendTick
      parts.push(html`<line class="msg ${dropped ? 'msg-dropped' : 'msg-open'}" x1="${x1}" y1="${y1}" x2="${x1 + dir * LANE * 0.35}" y2="${y1 + ROW * 0.6}"><title>${label}, sent in tick ${cx.ticks[a.sendTick].tick}, ${dropped ? `dropped: process ${a.to} crashed` : 'still in flight at the end of this trace'}</title></line>`)
    } else if (a.receiveTick !== null) {
      // Received but sent before the shown part began (a message from the previous loop round).
      const y2 = tickY(a.receiveTick)
      parts.push(html`<line class="msg msg-open" x1="${x2 - dir * LANE * 0.35}" y1="${y2 - ROW * 0.6}" x2="${x2 - dir * 5}" y2="${y2}" marker-end="url(#arrowhead)"><title>${label}, received in tick ${cx.ticks[a.receiveTick].tick}, sent in an earlier round of the loop</title></line>`)
    }
  }
  // A key for every line style the diagram uses.
  const key: [string, string][] = [['msg', 'received'], ['msg msg-open', 'in flight'], ['msg msg-dropped', 'dropped at a crashed process'], ['lane-dead', 'after a crash']]
  let x = LEFT - 60
  key.forEach(([cls, words]) => {
    parts.push(html`<g class="line-key"><line class="${cls}" x1="${x}" y1="${legendY - 4}" x2="${x + 22}" y2="${legendY - 4}" /><text class="legend" x="${x + 27}" y="${legendY}">${words}</text></g>`)
    x += 27 + words.length * 6 + 14
  })
  atoms.forEach((a, col) => {
    const x = atomsX + col * ATOM_COL
    // The column is keyed by its colour; the atom's text (processes filled in) is in the legend.
    parts.push(html`<rect class="atom-key" x="${x + ATOM_COL / 2 - 8}" y="${TOP - 26}" width="12" height="12" fill="${atomColour(a.i)}"><title>${a.text}</title></rect>`)
    parts.push(html`<rect class="atom-track" x="${x}" y="${TOP}" width="${ATOM_COL - 4}" height="${states * ROW}" />`)
    a.values.forEach((v, k) => {
      if (v && k < states) parts.push(html`<rect class="atom-band" x="${x}" y="${TOP + k * ROW}" width="${ATOM_COL - 4}" height="${ROW}" fill="${atomColour(a.i)}"><title>${a.text} holds ${k === 0 ? 'at the start' : `after tick ${cx.ticks[k - 1].tick}`}</title></rect>`)
    })
    const y = legendY + 22 + col * 18
    parts.push(html`<rect x="${LEFT}" y="${y - 10}" width="12" height="12" fill="${atomColour(a.i)}" /><text class="legend" x="${LEFT + 18}" y="${y}">${filledIn(a.text, opts.assignment)}</text>`)
  })
  const title = `Counterexample (${cx.kind}): ${cx.message}`
  return html`<svg xmlns="http://www.w3.org/2000/svg" class="spacetime" role="img" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}"><title>${title}</title><defs><marker id="arrowhead" viewBox="0 0 10 10" refX="9" refY="5" markerWidth="7" markerHeight="7" orient="auto-start-reverse"><path d="M 0 0 L 10 5 L 0 10 z" style="fill:var(--green,#2f5d50)" /></marker></defs><style>${raw(DIAGRAM_CSS)}</style>${parts}</svg>`.text
}

/** The diagram's own styles: inlined in the SVG, and added to the page and the report (sanitizing drops the inline copy). */
export const DIAGRAM_CSS = [
  // Colours come from the page's scheme (light or dark) where it defines them, else these defaults.
  '.spacetime text{font:12px Georgia,serif;fill:var(--ink,#24231f)}',
  '.spacetime .lane{stroke:var(--ink-2,#55534d);stroke-width:1.5}',
  '.spacetime .lane-dead{stroke:var(--ink-3,#6b675d);stroke-width:1.5;stroke-dasharray:3 4}',
  '.spacetime .crash{stroke:var(--rust,#a33b20);stroke-width:2.5}',
  '.spacetime .step{fill:var(--ink,#24231f)}',
  '.spacetime .msg{stroke:var(--green,#2f5d50);stroke-width:1.3}',
  '.spacetime .msg-open{stroke-dasharray:5 3}',
  '.spacetime .msg-dropped{stroke:var(--rust,#a33b20);stroke-dasharray:1.5 2.5}',
  '.spacetime .msg-label{font-size:10px;fill:var(--green,#2f5d50)}',
  '.spacetime .state-label{font-size:10px;fill:var(--ink-3,#6b675d)}',
  '.spacetime .legend{font-size:11px}',
  '.spacetime .tick-band{fill:transparent}',
  '.spacetime .tick-band.lit{fill:var(--lit,#f1e7c8)}',
  '.spacetime .atom-track{fill:var(--paper-2,#f3f1ea)}',
  '.spacetime .atom-band{opacity:.75}',
  '.spacetime .failing circle{stroke:var(--rust,#a33b20);stroke-width:2;fill:none}',
  '.spacetime .failing text{fill:var(--rust,#a33b20);font-size:11px;font-style:italic}',
  '.spacetime .loop path{stroke:var(--plum,#7a3f7c);stroke-width:1.5;fill:none}',
  '.spacetime .loop text{fill:var(--plum,#7a3f7c);font-size:11px}',
].join('')

function shown(v: boolean | number | string): string { return String(v) }

/** The tick-by-tick table of what happened, one row per tick (`data-tick` matches the diagram). */
export function changesTable(cx: Counterexample): string {
  const initial = cx.initial.map((p) => {
    const vals = Object.entries(p.values).map(([k, v]) => `${k} = ${shown(v)}`).join(', ')
    return html`<div><span class="who">process ${p.process}</span> ${vals}</div>`
  })
  const before = cx.induction?.before
  if (before) {
    const dead = before.processes.filter((p) => !p.alive).map((p) => p.process)
    if (dead.length) initial.push(html`<div>crashed: ${dead.join(', ')}</div>`)
    const flight = before.inFlight.map((m) => `${m.message} ${m.from} to ${m.to}${m.age !== undefined ? ` (age ${m.age})` : ''}`)
    initial.push(html`<div>in flight: ${flight.length ? flight.join(', ') : 'nothing'}</div>`)
  }
  const rows = cx.ticks.map((t, i) => {
    const lines: Markup[] = []
    if (t.gst) lines.push(html`<div class="ev-stable">GST: the delay and idle bounds hold from here on</div>`)
    for (const p of t.crashed) lines.push(html`<div class="ev-crash">process ${p} crashes</div>`)
    if (t.stepped.length) lines.push(html`<div class="ev-step">${whoSteps(t.stepped)}</div>`)
    if (cx.kind === 'model-error' && i === cx.ticks.length - 1) lines.push(html`<div class="ev-error">model error here: this step of process ${t.stepped[0] ?? 1} breaks the model</div>`)
    for (const r of t.received) lines.push(html`<div class="ev-recv">${r.to} receives ${r.message} from ${r.from}</div>`)
    for (const s of t.sent) lines.push(html`<div class="ev-send">${s.from} sends ${s.message} to ${s.to}</div>`)
    for (const c of t.changes) lines.push(html`<div class="ev-change">${c.process}: ${c.variable} ${shown(c.from)} → ${shown(c.to)}</div>`)
    const loop = cx.loopStart === i ? html`<div class="ev-loop">the loop starts here</div>` : null
    const failing = cx.kind === 'model-error' && i === cx.ticks.length - 1
    return html`<tr data-tick="${i}"${failing ? raw(' class="failing"') : null}><th scope="row">${t.tick}</th><td>${loop}${lines.length ? lines : html`<span class="quiet">nothing happens</span>`}</td></tr>`
  })
  return html`<table class="ticks"><caption>What happens, tick by tick</caption><thead><tr><th scope="col">tick</th><th scope="col">events and changes</th></tr></thead><tbody><tr class="initial"><th scope="row">${cx.kind === 'induction' ? 's' : 'start'}</th><td>${initial}</td></tr>${rows}</tbody></table>`.text
}
