// Node host of a pool's workers (worker_threads): starts the exploration workers and watches them.
// The thread that runs a search blocks in Atomics.wait, so it would never hear that a worker's
// thread ended; this thread stays idle in its event loop and does: a worker that exits, is killed
// or runs out of memory outside the pool's own shutdown is reported through the shared buffers
// (parallel.ts `reportDeath`), and the search ends with an error instead of waiting forever.
import { Worker, workerData } from 'node:worker_threads'
import { register } from 'tsx/esm/api'
register()
const { reportDeath, C, PHASE } = await import('./parallel.ts')
const { buffers, ports, n } = workerData
const ctrl = new Int32Array(buffers.ctrl)
const quitting = () => Atomics.load(ctrl, C.PHASE) === PHASE.QUIT
for (let index = 0; index < n; index++) {
  const port = ports[index]
  const w = new Worker(new URL('./parallel-node.mjs', import.meta.url), {
    workerData: { buffers, index, readyWord: C.READY, epochWord: C.EPOCH, port },
    transferList: [port],
  })
  let why = null
  w.on('error', (e) => { why = e instanceof Error ? e.message : String(e) })
  w.on('exit', (code) => {
    if (quitting()) return
    reportDeath(buffers, index, why ?? `its thread ended (exit code ${code})`)
  })
}
