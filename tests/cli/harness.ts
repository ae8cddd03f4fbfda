// Runs the command line in-process through `main(argv, io)` and captures what it printed.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import type { RecordKernel } from '../../kernels/record/kernel'
import { main } from '../../src/cli/main'

export interface Ran { code: number; stdout: string; stderr: string }

/** What a test sets around a run: a scripted kernel, terminals, the environment (empty unless given) and standard input. */
export interface RunOptions {
  kernel?: RecordKernel
  tty?: boolean
  stdoutTTY?: boolean
  env?: Record<string, string>
  stdin?: string
}

/** Runs `twofold ...argv` in `cwd`; `kernel` replaces the real kernel when given. */
export async function twofold(argv: string[], cwd: string, options: RunOptions = {}): Promise<Ran> {
  let stdout = ''
  let stderr = ''
  const code = await main(argv, {
    stdout: (s) => void (stdout += s),
    stderr: (s) => void (stderr += s),
    stderrIsTTY: options.tty ?? false,
    stdoutIsTTY: options.stdoutTTY ?? false,
    cwd,
    kernel: options.kernel,
    // The process's own environment may hold CI variables; a run sees only what the test sets.
    env: options.env ?? {},
    stdin: [options.stdin ?? ''],
  })
  return { code, stdout, stderr }
}

/** A fresh temporary directory holding `files`; `remove` deletes it. */
export function workspace(files: Record<string, string> = {}): { dir: string; write(name: string, text: string): void; remove(): void } {
  const dir = mkdtempSync(join(tmpdir(), 'twofold-cli-'))
  const write = (name: string, text: string) => writeFileSync(join(dir, name), text)
  for (const [name, text] of Object.entries(files)) write(name, text)
  return { dir, write, remove: () => rmSync(dir, { recursive: true, force: true }) }
}
