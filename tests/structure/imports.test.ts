// The kernel's stages and the page's boundary, read from the sources' imports (TypeScript compiler
// API, tests/structure/source.ts): no file imports itself through a cycle, no stage imports a
// higher one, and the page reaches the kernel only through the facade, its worker and the parser.
import { describe, expect, it } from 'vitest'
import { importsOf, sourceFiles, type ImportEdge } from './source'

const files = [...sourceFiles('kernels'), ...sourceFiles('src')]
const known = new Set([...files, 'kernels/language/parser.js', 'kernels/language/parser.terms.js'])
const edges: ImportEdge[] = files.flatMap((f) => importsOf(f, known))

/** The stage of a kernel file: its folder, or the top-level file's name. */
function stageOf(file: string): string {
  const m = /^kernels\/([^/]+)\//.exec(file)
  if (m) return m[1]
  return file.replace(/^kernels\//, '').replace(/\.ts$/, '')
}

/**
 * What each stage may import, lowest first: the ground floor (packed data, canonical JSON,
 * hashing) imports nothing; the language imports only it; the instance compiler reads the
 * language's model; the logic reads formulas but not instances; the explorer runs instances (and
 * hands the product a fair graph); the runner composes every stage; records sit on top, and the
 * facade re-exports.
 */
const MAY_IMPORT: Record<string, string[]> = {
  base: [],
  language: ['base'],
  result: [],
  plan: ['base', 'language', 'result'],
  model: ['base', 'language', 'result'],
  logic: ['base', 'language'],
  // The class check and canonical forms need the model; the reduced temporal search (temporal.ts)
  // orchestrates explore and logic, so symmetry sits above both.
  symmetry: ['base', 'language', 'model', 'logic', 'explore', 'result'],
  explore: ['base', 'language', 'model', 'logic', 'result'],
  induction: ['base', 'language', 'model', 'logic', 'explore', 'symmetry', 'result', 'plan'],
  run: ['base', 'language', 'model', 'logic', 'explore', 'symmetry', 'induction', 'result', 'plan'],
  record: ['base', 'language', 'result', 'plan'],
  api: ['base', 'language', 'model', 'logic', 'explore', 'symmetry', 'induction', 'result', 'plan', 'run', 'record'],
}

/** Every cycle of a directed graph, one per strongly connected component with more than one node or a self-loop. */
function cycles(nodes: string[], next: (n: string) => string[]): string[][] {
  const index = new Map<string, number>(), low = new Map<string, number>(), onStack = new Set<string>()
  const stack: string[] = []
  const out: string[][] = []
  let counter = 0
  const visit = (v: string) => {
    index.set(v, counter); low.set(v, counter); counter++
    stack.push(v); onStack.add(v)
    for (const w of next(v)) {
      if (!index.has(w)) { visit(w); low.set(v, Math.min(low.get(v)!, low.get(w)!)) }
      else if (onStack.has(w)) low.set(v, Math.min(low.get(v)!, index.get(w)!))
    }
    if (low.get(v) === index.get(v)) {
      const comp: string[] = []
      let w: string
      do { w = stack.pop()!; onStack.delete(w); comp.push(w) } while (w !== v)
      if (comp.length > 1 || next(v).includes(v)) out.push(comp.sort())
    }
  }
  for (const v of nodes) if (!index.has(v)) visit(v)
  return out
}

describe('imports', () => {
  it('reads the sources: every relative import resolves to a file', () => {
    expect(edges.length).toBeGreaterThan(200)
    const unresolved = edges.filter((e) => !known.has(e.to) && !/\.(json|md|css)$/.test(e.to)).map((e) => `${e.from}:${e.line} -> ${e.to}`)
    expect(unresolved).toEqual([])
  })

  it('has no cycle between files of kernels/ and src/', () => {
    const next = new Map<string, string[]>()
    for (const e of edges) if (known.has(e.to)) next.set(e.from, [...(next.get(e.from) ?? []), e.to])
    expect(cycles(files, (f) => next.get(f) ?? [])).toEqual([])
  })

  it('finds a cycle when there is one (the detector itself)', () => {
    const g: Record<string, string[]> = { a: ['b'], b: ['c'], c: ['a'], d: ['d'], e: ['a'] }
    expect(cycles(Object.keys(g), (n) => g[n])).toEqual([['a', 'b', 'c'], ['d']])
  })

  it('knows the stage of every kernel file', () => {
    const unknown = files.filter((f) => f.startsWith('kernels/') && !(stageOf(f) in MAY_IMPORT))
    expect(unknown).toEqual([])
  })

  it('has no stage importing a higher one, and no cycle between stages', () => {
    const wrong = edges
      .filter((e) => e.from.startsWith('kernels/') && e.to.startsWith('kernels/'))
      .filter((e) => stageOf(e.from) !== stageOf(e.to) && !MAY_IMPORT[stageOf(e.from)].includes(stageOf(e.to)))
      .map((e) => `${e.from}:${e.line} (${stageOf(e.from)}) -> ${e.to} (${stageOf(e.to)})`)
    expect(wrong).toEqual([])
    expect(cycles(Object.keys(MAY_IMPORT), (s) => MAY_IMPORT[s])).toEqual([])
  })

  it('measures the stages in the benchmark, not the runner', () => {
    const bench = sourceFiles('bench')
    const reach = bench.flatMap((f) => importsOf(f, known)).filter((e) => e.to === 'kernels/run.ts' || e.to === 'kernels/api.ts')
    expect(bench.length).toBeGreaterThan(3)
    expect(reach.map((e) => `${e.from} -> ${e.to}`)).toEqual([])
  })

  it('keeps the kernel free of the page and the command line', () => {
    expect(edges.filter((e) => e.from.startsWith('kernels/') && e.to.startsWith('src/')).map((e) => `${e.from} -> ${e.to}`)).toEqual([])
  })

  it('lets the page reach the kernel only through the facade and the parser', () => {
    const wrong = edges
      .filter((e) => e.from.startsWith('src/app/') && e.to.startsWith('kernels/'))
      .filter((e) => e.to !== 'kernels/api.ts' && e.to !== 'kernels/language/parser.js')
      .map((e) => `${e.from}:${e.line} -> ${e.to}`)
    expect(wrong).toEqual([])
  })
})
