// Exit codes (records.md). They are the command line's answer to CI, so they are named once here.
import type { Report } from '../../kernels/result'

/** `twofold check`: every check holds (also: the notebook has no checks). */
export const HOLDS = 0
/** `twofold check`: some check is violated. `twofold replay`: some compared field differs. */
export const VIOLATED = 1
/**
 * `twofold check`: the notebook has errors and nothing was checked (also an unreadable notebook or
 * a bad option). `twofold replay`: the notebook's hash differs from the record's, or the record is
 * malformed, truncated or unreadable. `twofold merge`: the records cannot be merged.
 */
export const REFUSED = 2
/** `twofold check`: nothing violated but something inconclusive or in error. Any command: an internal error. */
export const INCONCLUSIVE = 3
/** `twofold check`: stopped by Ctrl-C; the report shows what finished (128 + SIGINT, as shells say). */
export const INTERRUPTED = 130

/** The exit code of `twofold check` for a report. */
export function checkExitCode(report: Report): number {
  if (report.errors.length > 0) return REFUSED
  // Sizes that disagree mean some instance is violated (the row's or the cutoff instance).
  if (report.checks.some((row) => row.verdict === 'violated' || row.agreement === false)) return VIOLATED
  if (report.checks.some((row) => row.verdict === 'inconclusive' || row.verdict === 'error')) return INCONCLUSIVE
  return HOLDS
}
