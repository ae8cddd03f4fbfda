// Pools of parallel exploration workers in Node (worker_threads), for the command line, the tests
// and the benchmark. Node only: the browser bundle never imports this file (the workbench has its
// own pool over Web Workers).
import { availableParallelism } from 'node:os'
import { MessageChannel, Worker, type MessagePort } from 'node:worker_threads'
import { C, NODE_CAPS, PHASE, createSharedBuffers, setPoolProvider, type ExplorePool } from './parallel'

/** A ctrl word past the phase protocol's, counting workers that have started. */
const READY = C.READY

interface NodePool extends ExplorePool { supervisor: Worker }
const pools = new Map<number, NodePool>()

/** The number of cores (the default of `--workers`). */
export function cores(): number {
  return availableParallelism()
}

/**
 * The pool of n workers (made on first use, then kept; `start` waits until its threads are up).
 * A pool one of whose workers died is ended and a new one made.
 */
export function nodePool(n: number): ExplorePool {
  const known = pools.get(n)
  if (known && !known.dead) return known
  if (known) {
    pools.delete(n)
    void known.supervisor.terminate()
  }
  // Plain buffers, replaced to grow: each worker takes the new ones from its port between phases.
  const buffers = createSharedBuffers(NODE_CAPS, false)
  const ctrl = new Int32Array(buffers.ctrl)
  const ports: MessagePort[] = []
  const theirs: MessagePort[] = []
  for (let index = 0; index < n; index++) {
    const { port1, port2 } = new MessageChannel()
    ports.push(port1)
    theirs.push(port2)
  }
  // The threads load the kernel while the first levels run here; `start` waits for them. They
  // are started by a supervising thread, which reports any of them that dies (supervisor-node.mjs).
  const supervisor = new Worker(new URL('./supervisor-node.mjs', import.meta.url), { workerData: { buffers, n, ports: theirs }, transferList: theirs })
  // Threads do not keep Node alive; they are ended with the process.
  supervisor.unref()
  let started = false
  let epoch = 0
  const pool: NodePool = {
    size: n, buffers, supervisor, caps: NODE_CAPS,
    get dead() { return Atomics.load(ctrl, C.DEAD) !== 0 },
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
        if (Atomics.load(ctrl, C.DEAD) !== 0) throw new Error(`a parallel exploration worker did not start (worker ${Atomics.load(ctrl, C.DEAD)})`)
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
    await pool.supervisor.terminate()
  }
  pools.clear()
}
