// Pools of parallel exploration workers in Node (worker_threads), for the command line, the tests
// and the benchmark. Node only: the browser bundle never imports this file (the workbench has its
// own pool over Web Workers).
import { availableParallelism } from 'node:os'
import { MessageChannel, Worker, type MessagePort } from 'node:worker_threads'
import { C, NODE_CAPS, PHASE, createSharedBuffers, setPoolProvider, type ExplorePool } from './parallel'

/** A ctrl word past the phase protocol's, counting workers that have started. */
const READY = C.READY

interface NodePool extends ExplorePool { workers: Worker[] }
const pools = new Map<number, NodePool>()

/** The number of cores (the default of `--workers`). */
export function cores(): number {
  return availableParallelism()
}

/** The pool of n workers (made on first use, then kept; `start` waits until its threads are up). */
export function nodePool(n: number): ExplorePool {
  const known = pools.get(n)
  if (known) return known
  // Plain buffers, replaced to grow: each worker takes the new ones from its port between phases.
  const buffers = createSharedBuffers(NODE_CAPS, false)
  const ctrl = new Int32Array(buffers.ctrl)
  const workers: Worker[] = []
  const ports: MessagePort[] = []
  // The threads load the kernel while the first levels run here; `start` waits for them.
  for (let index = 0; index < n; index++) {
    const { port1, port2 } = new MessageChannel()
    ports.push(port1)
    const w = new Worker(new URL('./parallel-node.mjs', import.meta.url), { workerData: { buffers, index, readyWord: READY, epochWord: C.EPOCH, port: port2 }, transferList: [port2] })
    // Threads do not keep Node alive; they are ended with the process.
    w.unref()
    workers.push(w)
  }
  let started = false
  let epoch = 0
  const pool: NodePool = {
    size: n, buffers, workers, caps: NODE_CAPS,
    replace(name, sab) {
      buffers[name] = sab
      epoch++
      for (const port of ports) port.postMessage({ name, sab, epoch })
      Atomics.store(ctrl, C.EPOCH, epoch)
    },
    start() {
      if (started) return
      // Workers start on their own threads, so this thread may block until they are all up.
      const deadline = Date.now() + 120_000
      for (;;) {
        const ready = Atomics.load(ctrl, READY)
        if (ready >= n) break
        if (Date.now() > deadline) throw new Error(`parallel exploration workers did not start (${ready} of ${n} within two minutes)`)
        Atomics.wait(ctrl, READY, ready, 1000)
      }
      started = true
    },
  }
  pools.set(n, pool)
  return pool
}

/** Lets the runner use Node pools (`RunOptions.workers`). */
export function useNodePools(): void {
  setPoolProvider((n) => nodePool(n))
}

/** Ends every pool's workers. */
export async function closeNodePools(): Promise<void> {
  for (const pool of pools.values()) {
    const ctrl = new Int32Array(pool.buffers.ctrl)
    Atomics.store(ctrl, C.PHASE, PHASE.QUIT)
    Atomics.add(ctrl, C.GEN, 1)
    Atomics.notify(ctrl, C.GEN)
    await Promise.all(pool.workers.map((w) => w.terminate()))
  }
  pools.clear()
}
