// A parallel exploration worker of the workbench (a Web Worker started by the kernel worker,
// worker.ts): receives the pool's shared buffers once, says it is ready, then serves searches
// (kernels/explore/parallel.ts) by blocking waits on those buffers until the page closes.
import { runExploreWorker, type SharedBuffers } from '../../kernels/api'

self.onmessage = (e: MessageEvent<{ buffers: SharedBuffers; index: number }>) => {
  self.onmessage = null
  self.postMessage('ready')
  runExploreWorker(e.data.buffers, e.data.index)
}
