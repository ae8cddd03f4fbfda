// Node entry of a parallel exploration worker (worker_threads): the kernel is TypeScript, run
// through tsx as the command line is (bin/twofold.js).
import { receiveMessageOnPort, workerData } from 'node:worker_threads'
import { register } from 'tsx/esm/api'
register()
const { runExploreWorker } = await import('./parallel-worker.ts')
const ctrl = new Int32Array(workerData.buffers.ctrl)
// Ready: the pool waits for every worker before its first search.
Atomics.add(ctrl, workerData.readyWord, 1)
Atomics.notify(ctrl, workerData.readyWord)
// Buffers replaced to grow come through the port, read synchronously before a phase.
const { buffers, port, epochWord } = workerData
let epoch = 0
const refresh = () => {
  const want = Atomics.load(ctrl, epochWord)
  while (epoch < want) {
    const m = receiveMessageOnPort(port)
    if (!m) continue
    buffers[m.message.name] = m.message.sab
    epoch = m.message.epoch
  }
}
runExploreWorker(buffers, workerData.index, refresh)
