// What a command may touch: standard input and two output streams, the environment, the working
// directory, and the kernel. Tests pass their own, so they run the command line in-process and
// read what it printed.
import { readFile } from 'node:fs/promises'
import { resolve } from 'node:path'
import { errorText } from '../../kernels/base/error-text'
import type { RecordKernel } from '../../kernels/record/kernel'
import type { VerificationRecord } from '../../kernels/record/record'
import { RecordError, parseRecord } from '../../kernels/record/replay'
import { writeFileAtomic } from './atomic'
import type { Environment } from './scheduler'

/** The command line's world. Everything printed goes through `stdout` and `stderr`. */
export interface CliIo {
  stdout(text: string): void
  stderr(text: string): void
  /** Whether stderr is a terminal: the progress line is drawn only then. */
  stderrIsTTY: boolean
  /** Relative paths on the command line are resolved against this directory. */
  cwd: string
  /** The kernel to run; the real one (kernels/api.ts) when omitted. */
  kernel?: RecordKernel
  /** Environment variables (`--shard auto`, NO_COLOR); the process's when omitted. */
  env?: Environment
  /** Standard input, read whole by `twofold check -`; the process's when omitted. */
  stdin?: AsyncIterable<string | Uint8Array> | Iterable<string | Uint8Array>
  /** Whether stdout is a terminal: the table is coloured only then, unless `--color` says otherwise. */
  stdoutIsTTY?: boolean
  /** Where Ctrl-C arrives (interrupt.ts): the process when run as a command; tests pass their own emitter, or none. */
  signals?: Signals
}

/** The part of `process` that Ctrl-C handling uses. */
export interface Signals {
  once(signal: 'SIGINT', listener: () => void): unknown
  off(signal: 'SIGINT', listener: () => void): unknown
}

/** The name a notebook read from standard input goes by in reports, records and messages. */
export const STDIN_NAME = '<stdin>'

/** The environment a command sees: `io.env`, else the process's. */
export function environment(io: CliIo): Environment {
  return io.env ?? process.env
}

/** Reads standard input whole as UTF-8 text (`twofold check -`); a failed read is a `CliFailure` with `code`. */
export async function readStdin(io: CliIo, code: number): Promise<string> {
  const chunks: Buffer[] = []
  try {
    for await (const chunk of io.stdin ?? process.stdin) chunks.push(typeof chunk === 'string' ? Buffer.from(chunk, 'utf8') : Buffer.from(chunk))
  } catch (e) {
    throw new CliFailure(`cannot read the notebook from standard input: ${describe(e)}`, code)
  }
  return Buffer.concat(chunks).toString('utf8')
}

/** The process's own streams and directory. */
export function processIo(): CliIo {
  return {
    stdout: (text) => void process.stdout.write(text),
    stderr: (text) => void process.stderr.write(text),
    stderrIsTTY: Boolean(process.stderr.isTTY),
    stdoutIsTTY: Boolean(process.stdout.isTTY),
    cwd: process.cwd(),
    env: process.env,
    stdin: process.stdin,
    signals: process,
  }
}

/** A failure the user can act on: printed as one line on stderr, then the command exits with `code`. */
export class CliFailure extends Error {
  override name = 'CliFailure'
  constructor(message: string, readonly code: number) {
    super(message)
  }
}

/** Reads a text file named on the command line; an unreadable file is a `CliFailure` with `code`. */
export async function readInput(io: CliIo, path: string, what: string, code: number): Promise<string> {
  try {
    return await readFile(resolve(io.cwd, path), 'utf8')
  } catch (e) {
    throw new CliFailure(`cannot read ${what} ${path}: ${describe(e)}`, code)
  }
}

/**
 * Writes a file named on the command line atomically (atomic.ts); a failed write is a `CliFailure`
 * with `code` and leaves any previous file in place.
 */
export async function writeOutput(io: CliIo, path: string, text: string, what: string, code: number): Promise<void> {
  try {
    await writeFileAtomic(resolve(io.cwd, path), text)
  } catch (e) {
    throw new CliFailure(`cannot write ${what} ${path}: ${describe(e)}`, code)
  }
}

/** Reads and validates a record file; an unreadable or malformed one is a one-line failure with exit code 2. */
export async function readRecordFile(io: CliIo, path: string): Promise<VerificationRecord> {
  const text = await readInput(io, path, 'record', 2)
  try {
    return await parseRecord(text)
  } catch (e) {
    if (e instanceof RecordError) throw new CliFailure(`${path}: ${e.message}`, 2)
    throw e
  }
}

/** The first line of an error's message, without the stack. */
export function describe(e: unknown): string {
  const err = e as NodeJS.ErrnoException
  if (err && err.code === 'ENOENT') return 'no such file'
  if (err && err.code === 'EISDIR') return 'it is a directory'
  if (err && err.code === 'EACCES') return 'permission denied'
  const message = errorText(e)
  return message.split('\n')[0]
}
