// The solver is loaded only when a check asks for induction: no module of the kernel or the apps
// imports z3-solver at run time except kernels/induction/solver.ts, by a dynamic import.
import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, test } from 'vitest'

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name)
    return statSync(path).isDirectory() ? sources(path) : /\.(ts|js)$/.test(name) ? [path] : []
  })
}

describe('z3-solver is loaded lazily', () => {
  const root = new URL('../../', import.meta.url).pathname
  const files = [...sources(join(root, 'kernels')), ...sources(join(root, 'src'))]

  test('no static import of z3-solver anywhere', () => {
    const offenders = files.filter((f) => /^\s*import\s+(?!type\b)[^;]*from\s+['"]z3-solver/m.test(readFileSync(f, 'utf8')))
    expect(files.length).toBeGreaterThan(20)
    expect(offenders).toEqual([])
  })

  test('one dynamic import, in the solver loader', () => {
    const dynamic = files.filter((f) => /import\(\s*['"]z3-solver/.test(readFileSync(f, 'utf8')))
    expect(dynamic.map((f) => f.slice(root.length))).toEqual(['kernels/induction/solver.ts'])
  })
})
