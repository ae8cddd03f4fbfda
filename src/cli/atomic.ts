// Writing an output file so that nothing a user wrote is ever lost: an output path that resolves
// (through links) to one of the command's inputs is refused, and the text goes to a temporary file
// in the same folder, flushed, then renamed over the target, so a failed write (disk full, size
// limit) leaves the previous file untouched.
import { randomBytes } from 'node:crypto'
import { realpathSync } from 'node:fs'
import { open, rename, unlink } from 'node:fs/promises'
import { basename, dirname, join, resolve } from 'node:path'

/** Why an output could not be written; `message` is one sentence naming the file. */
export class OutputError extends Error {
  override name = 'OutputError'
}

/** The real path of `path`, or of its folder joined with its name when the file does not exist yet. */
function realTarget(path: string): string {
  try {
    return realpathSync(path)
  } catch {
    try {
      return join(realpathSync(dirname(path)), basename(path))
    } catch {
      return resolve(path)
    }
  }
}

/**
 * Refuses an output path that is, or links to, one of `inputs` (all resolved against `cwd`).
 * `what` names the output in the message, e.g. "record".
 */
export function refuseInputAsOutput(cwd: string, output: string, inputs: readonly string[], what: string): void {
  const out = realTarget(resolve(cwd, output))
  for (const input of inputs) {
    if (realTarget(resolve(cwd, input)) === out) {
      throw new OutputError(`the ${what} ${output} would overwrite the input ${input}; choose another file for --${what === 'record' ? 'record' : 'output'}`)
    }
  }
}

/**
 * Writes `text` to `path` atomically: a temporary file beside it, flushed to disk, then renamed.
 * On any failure the temporary file is removed and the previous content of `path` stays as it was.
 */
export async function writeFileAtomic(path: string, text: string): Promise<void> {
  const target = realTarget(path)
  const temp = join(dirname(target), `.${basename(target)}.${randomBytes(6).toString('hex')}.tmp`)
  let handle
  try {
    handle = await open(temp, 'wx', 0o644)
    await handle.writeFile(text, 'utf8')
    await handle.sync()
    await handle.close()
    handle = undefined
    await rename(temp, target)
  } catch (e) {
    if (handle) await handle.close().catch(() => undefined)
    await unlink(temp).catch(() => undefined)
    throw e
  }
}
