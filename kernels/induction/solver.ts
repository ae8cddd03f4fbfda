// The SMT solver behind proofs by induction: Z3 through its official WebAssembly build on npm
// (`z3-solver`). It is loaded by a dynamic import the first time a check asks for induction, so a
// page or a command that never proves anything never downloads or starts it. In Node it runs
// in-process; in the browser it runs in the kernel worker and needs SharedArrayBuffer (the pages
// are served cross-origin isolated). One context is shared by every proof of a process.
import type { Context } from 'z3-solver'

/** The Z3 context every encoding of this process is built in. */
export type Z3 = Context<'twofold'>

/** A loaded solver: its context, and its name and version for records. */
export interface SolverHandle {
  /** A shared context (tests that build many small encodings). */
  z: Z3
  /**
   * A fresh context. A proof uses its own, so that the model the solver picks depends only on the
   * proof's own formulas, and a replay in another process, or later in the same one, finds the same.
   */
  context(): Z3
  /** For records: `z3-solver <npm version> (Z3 <full version>)`. */
  version: string
  /** Ends the solver's worker threads (Node), so that a command line can exit. */
  close(): Promise<void>
}

/** The npm version of the package we load; package.json of z3-solver says the same. */
export const Z3_PACKAGE_VERSION = '5.2.0'

let loading: Promise<SolverHandle> | null = null

/*
 * A question runs on one of the solver's own threads while this thread goes on (`solver.check()`
 * is a promise). The package frees the solver's terms from a FinalizationRegistry, that is from
 * this thread at whatever time the garbage collector picks; a free that lands while a question
 * runs on the same context changes the context's term table under the question's feet (a Z3
 * context is not safe to use from two threads at once). Chromium was seen to fault in
 * `ast_manager::delete_node` on a solver thread ("memory access out of bounds"), or to leave a
 * question unanswered, as such a race would. So the package's registry is made here, and holds
 * the frees that fall during a question until no question runs.
 */
let asking = 0
const heldFrees: (() => void)[] = []
const NativeRegistry = globalThis.FinalizationRegistry

/** A FinalizationRegistry whose callbacks wait while a solver question runs. */
class QuietRegistry<T> {
  private readonly inner: FinalizationRegistry<T>
  constructor(callback: (held: T) => void) {
    this.inner = new NativeRegistry<T>((held) => { if (asking > 0) heldFrees.push(() => callback(held)); else callback(held) })
  }
  register(target: object, held: T, token?: object): void { this.inner.register(target, held, token) }
  unregister(token: object): boolean { return this.inner.unregister(token) }
}

/** Runs one solver question; the solver's terms are not freed while it runs (see above). */
export async function solving<T>(question: () => Promise<T>): Promise<T> {
  asking++
  try {
    return await question()
  } finally {
    if (--asking === 0) for (const free of heldFrees.splice(0)) free()
  }
}

function inBrowser(): boolean {
  return typeof window !== 'undefined' || typeof (globalThis as { WorkerGlobalScope?: unknown }).WorkerGlobalScope !== 'undefined'
}

/**
 * In the browser the package expects its Emscripten script as a global `initZ3`, which a module
 * worker cannot `importScripts`: the script is fetched and evaluated in the worker's global scope,
 * its pthread workers start from the same script's URL, and the wasm is located by its asset URL
 * (the bundler emits both as assets, fetched only here).
 */
async function browserOverrides(): Promise<Record<string, unknown>> {
  const g = globalThis as { initZ3?: unknown; global?: unknown }
  g.global ??= globalThis
  const [{ default: script }, { default: wasm }] = await Promise.all([
    import('z3-solver/build/z3-built.js?url'),
    import('z3-solver/build/z3-built.wasm?url'),
  ])
  if (!g.initZ3) {
    const text = await (await fetch(script)).text()
    // An indirect eval runs in the global scope, where the script's `var initZ3` becomes global.
    ;(0, eval)(text)
  }
  return { locateFile: (file: string) => (file.endsWith('.wasm') ? wasm : file), mainScriptUrlOrBlob: script }
}

/** Loads Z3 once (later calls share the same context). */
export function loadSolver(): Promise<SolverHandle> {
  if (!loading) {
    loading = (async () => {
      const overrides = inBrowser() ? await browserOverrides() : {}
      const mod = await import('z3-solver')
      // The package makes its registry in `init`: it gets ours (and every other code still the native one).
      const g = globalThis as { FinalizationRegistry: unknown }
      g.FinalizationRegistry = QuietRegistry
      let api: Awaited<ReturnType<typeof mod.init>>
      try { api = await mod.init(overrides) } finally { g.FinalizationRegistry = NativeRegistry }
      const z = new api.Context('twofold') as Z3
      return {
        z,
        context: () => new api.Context('twofold') as Z3,
        version: `z3-solver ${Z3_PACKAGE_VERSION} (Z3 ${api.getFullVersion()})`,
        async close() {
          loading = null
          await mod.killThreads(api.em)
        },
      }
    })()
    loading.catch(() => { loading = null })
  }
  return loading
}

/** Ends the solver's threads if it was ever loaded (a command line calls this before exiting); loads nothing. */
export async function closeSolver(): Promise<void> {
  if (!loading) return
  const handle = await loading.catch(() => null)
  await handle?.close()
}
