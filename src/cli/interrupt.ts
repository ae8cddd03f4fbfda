// Ctrl-C during `twofold check`. A first SIGINT while the run waits on the SMT solver stops the run
// gently: the solver is interrupted, the rows that did not finish come back inconclusive, the
// report is printed and the command exits with INTERRUPTED (130). The listener is installed only
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

/** Ctrl-C handling for one run on `io.signals` (none: nothing is ever requested). */
export function interruptOnCtrlC(io: CliIo): Interrupt {
  const signals = io.signals
  let requested = false
  let listening = false
  const listener = () => {
    listening = false
    requested = true
    io.stderr(`${io.stderrIsTTY ? '\r\x1b[K' : ''}twofold: stopping: the rows that did not finish are reported inconclusive (Ctrl-C again ends at once)\n`)
  }
  const listen = (on: boolean) => {
    if (!signals || requested || on === listening) return
    listening = on
    if (on) signals.once('SIGINT', listener)
    else signals.off('SIGINT', listener)
  }
  return { requested: () => requested, onWait: listen, release: () => listen(false) }
}
