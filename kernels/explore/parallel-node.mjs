// Node entry of a parallel exploration worker (worker_threads): the kernel is TypeScript, run
// through tsx as the command line is (bin/twofold.js).
import { workerData } from 'node:worker_threads'
import { register } from 'tsx/esm/api'
register()
const { runExploreWorker } = await import('./parallel-worker.ts')
const ctrl = new Int32Array(workerData.buffers.ctrl)
// Ready: the pool waits for every worker before its first search.
Atomics.add(ctrl, workerData.readyWord, 1)
Atomics.notify(ctrl, workerData.readyWord)
runExploreWorker(workerData.buffers, workerData.index)
