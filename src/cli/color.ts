// Colour in the table: verdicts in green, red and yellow on a terminal, never in a pipe, a file or
// a CI log unless asked for. The NO_COLOR convention (no-color.org: a NO_COLOR variable that is
// present and not empty turns colour off; a command-line option overrides it) is respected.
import type { Verdict } from '../../kernels/result'
import type { Environment } from './scheduler'

/** When to colour: `--color` / `--color=always`, `--color=never` / `--no-color`, or `auto` (the default). */
export type ColorMode = 'always' | 'never' | 'auto'

/** Parses the value of `--color` as commander gives it (true for a bare `--color`, false for `--no-color`). */
export function parseColorMode(value: string | boolean | undefined): ColorMode | undefined {
  if (value === undefined) return 'auto'
  if (value === true) return 'always'
  if (value === false) return 'never'
  return value === 'always' || value === 'never' || value === 'auto' ? value : undefined
}

/** Whether to colour output going to stdout: `auto` means a terminal, NO_COLOR unset or empty, and a TERM other than `dumb`. */
export function useColor(mode: ColorMode, env: Environment, stdoutIsTTY: boolean): boolean {
  if (mode !== 'auto') return mode === 'always'
  if (env.NO_COLOR !== undefined && env.NO_COLOR !== '') return false
  if (env.TERM === 'dumb') return false
  return stdoutIsTTY
}

const SGR: Record<Verdict, string> = { holds: '32', violated: '1;31', inconclusive: '33', error: '1;35' }

/** `text` in the colour of `verdict` (ANSI SGR), reset after. */
export function paintVerdict(verdict: Verdict, text: string): string {
  return `\x1b[${SGR[verdict]}m${text}\x1b[0m`
}
