// The progress line of long checks: redrawn in place on stderr, only when stderr is a terminal
// (a CI log or a pipe gets no carriage-return noise), and erased before the results are printed.
import type { Progress } from '../../kernels/result'
import type { CliIo } from './io'

/** A progress line: `report` draws, `clear` erases. Both do nothing when stderr is not a terminal. */
export interface ProgressLine {
  report(p: Progress): void
  clear(): void
}

/** The text of one progress line. */
export function progressText(p: Progress): string {
  const rate = Math.round(p.statesPerSecond).toLocaleString('en-US')
  return `check ${p.check + 1} ${p.property} on G_${p.processes}: ${p.states.toLocaleString('en-US')} states, ${rate} states/s, ${p.seconds.toFixed(1)} s`
}

/** A progress line on `io.stderr`. */
export function progressLine(io: CliIo): ProgressLine {
  let drawn = false
  return {
    report(p) {
      if (!io.stderrIsTTY) return
      io.stderr(`\r\x1b[K${progressText(p)}`)
      drawn = true
    },
    clear() {
      if (drawn) io.stderr('\r\x1b[K')
      drawn = false
    },
  }
}
