// The parallel explorer's worker side, for any host (Node's worker_threads, the workbench's Web
// Workers): compiles a job's instance with the kernel's instance compiler and the row's invariant
// as the runner builds it, then serves the phases of parallel.ts until told to quit.
import { compileInstance } from '../model/instance'
import { fairMarks } from './fairgraph'
import { rowInvariant } from './invariant'
import { serveExploration, type CompiledJob, type ParallelJob, type SharedBuffers } from './parallel'

/** The instance and invariant of a job, rebuilt from plain data. */
export function compileJob(job: ParallelJob): CompiledJob {
  const inst = compileInstance(job.protocol, job.n, job.constants)
  const invariant = job.invariant ? rowInvariant(inst, job.invariant.formula, job.invariant.terms, job.invariant.chosen).invariant : undefined
  return { inst, invariant, marks: job.edges ? fairMarks(inst) : undefined, fault: job.fault }
}

/** Serves explorations on `buffers` as worker `index` (blocks this thread); `refresh` takes replaced buffers. */
export function runExploreWorker(buffers: SharedBuffers, index: number, refresh?: () => void): void {
  serveExploration(buffers, index, compileJob, refresh)
}
