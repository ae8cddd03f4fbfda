// Ctrl-C during `twofold check` and `twofold replay`. A first SIGINT while the run waits on the SMT
// solver stops the run gently: the solver is interrupted, the rows that did not finish come back
// inconclusive, and the command exits with INTERRUPTED (130): `check` prints the report of what
// finished, `replay` compares nothing (a partial replay is no evidence about the record). The listener is installed only
// while the run waits (RunOptions.onWait): while the kernel computes in this thread (exploration),
// the event loop could not run a listener, so there Ctrl-C keeps its default and ends the process
// at once, also with 130. After the first Ctrl-C no listener is left, so a second one ends the
// process at once too.
import type { CliIo } from './io'

/** A run's Ctrl-C: whether it came, the hook the run reports its waits to, and the cleanup. */
export interface Interrupt {
  requested(): boolean
  onWait(waiting: boolean): void
  release(): void
}

/** What `check` says at the first Ctrl-C. */
const CHECK_STOPPING = 'the rows that did not finish are reported inconclusive'

/**
 * Ctrl-C handling for one run on `io.signals` (none: nothing is ever requested); `stopping` is what
 * the command says it does at the first Ctrl-C.
 */
export function interruptOnCtrlC(io: CliIo, stopping = CHECK_STOPPING): Interrupt {
  const signals = io.signals
  let requested = false
  let listening = false
  const listener = () => {
    listening = false
    requested = true
    io.stderr(`${io.stderrIsTTY ? '\r\x1b[K' : ''}twofold: stopping: ${stopping} (Ctrl-C again ends at once)\n`)
  }
  const listen = (on: boolean) => {
    if (!signals || requested || on === listening) return
    listening = on
    if (on) signals.once('SIGINT', listener)
    else signals.off('SIGINT', listener)
  }
  return { requested: () => requested, onWait: listen, release: () => listen(false) }
}
