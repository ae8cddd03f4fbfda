// The `twofold` command line. `main(argv, io)` is the whole program as a function (the tests call
// it in-process); run as a script (bin/twofold.js, or `tsx src/cli/main.ts`) it uses the process's
// own streams and sets the exit code.
import { realpathSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import { Command, CommanderError } from 'commander'
import type { RecordKernel } from '../../kernels/record/kernel'
import { closeSolver } from '../../kernels/induction/solver'
import { KERNEL_VERSION } from '../../kernels/record/record'
import { runCheck, type CheckFlags } from './check'
import { HOLDS, INCONCLUSIVE, REFUSED } from './exit'
import { CliFailure, describe, processIo, type CliIo } from './io'
import { runMerge } from './merge'
import { runReplay } from './replay'

export type { CliIo } from './io'

/**
 * Runs the command line on `argv` (the arguments after the program name, e.g.
 * `['check', 'notebooks/pumps.md', '--json']`) and resolves to the exit code. Never throws: a
 * failure is one line on `io.stderr`, without a stack trace, and a non-zero code.
 */
export async function main(argv: string[], io: CliIo): Promise<number> {
  let code = HOLDS
  const kernel = (): Promise<RecordKernel> => (io.kernel ? Promise.resolve(io.kernel) : loadKernel())
  const program = new Command('twofold')
    .description('Check the protocols of a twofold notebook from the command line, and write or replay verification records.')
    .version(KERNEL_VERSION, '-V, --version', 'print the kernel version')
    .configureOutput({ writeOut: (s) => io.stdout(s), writeErr: (s) => io.stderr(s) })
    .exitOverride()
    .showHelpAfterError('(run with --help for usage)')

  program
    .command('check')
    .description('run every check block of a notebook and print the verdicts')
    .argument('<notebook>', 'the notebook (.md) to check; - reads it from standard input')
    .option('--json', 'print the JSON report (records.md) on stdout instead of the table (short for --format json)')
    .option('--format <format>', 'the report: table (default), json, junit (JUnit XML) or sarif (SARIF 2.1.0)')
    .option('--output <file>', 'write the report to <file> (atomically) and show the table on stdout')
    .option('--record <file>', 'also write a verification record to <file>')
    .option('--only <name>', 'run only the checks that name this property or protocol')
    .option('--shard <I/N|auto>', 'run only rows whose plan index is I-1 modulo N (join with merge); auto reads I/N from a Kubernetes Indexed Job, a Slurm job array or CI_NODE_INDEX/CI_NODE_TOTAL')
    .option('--shards <N>', 'with --shard auto: the shard count (required on Kubernetes, else checked against the environment)')
    .option('--workers <N>', 'parallel workers for exploration, 1 to 256 (default: the number of cores; symmetry-reduced rows use one)')
    .option('--recompute-edges', 'temporal rows: store no edge graph and recompute edges when the search needs them (less memory, slower; same results)')
    .option('--color [when]', 'colour the table: always (the default for a bare --color), never or auto (a terminal and NO_COLOR unset)')
    .option('--no-color', 'never colour the table')
    .option('-q, --quiet', 'print nothing: only the exit code answers')
    .addHelpText(
      'after',
      '\nExit codes: 0 every check holds; 1 some check is violated; 2 the notebook has errors (nothing\n' +
        'was checked), or it cannot be read; 3 nothing violated but something inconclusive or in error;\n' +
        '130 stopped by Ctrl-C (while a proof by induction waits on the solver, the report of what finished\n' +
        'is printed first).',
    )
    .action(async (notebook: string, flags: CheckFlags) => {
      code = await runCheck(io, kernel, notebook, flags)
    })

  program
    .command('replay')
    .description("re-run a record's checks and compare every field but times")
    .argument('<record>', 'the verification record (.json)')
    .argument('[notebook]', 'a notebook to compare with the record (its hash must match); by default the notebook the record embeds')
    .addHelpText(
      'after',
      '\nExit codes: 0 every compared field matches; 1 some field differs (each is printed); 2 the\n' +
        "notebook's hash differs from the record's, or the record is malformed, truncated, not canonical,\n" +
        'has a duplicate key or a field of the wrong type. No path written inside a record is opened.',
    )
    .action(async (record: string, notebook: string | undefined) => {
      code = await runReplay(io, kernel, record, notebook)
    })

  program
    .command('merge')
    .description('join the records of shards 1/N..N/N into the record of the whole run, on stdout')
    .argument('<records...>', 'the shard records (.json)')
    .addHelpText('after', '\nExit codes: 0 merged; 2 the records are not the shards of one run (or cannot be read).')
    .action(async (records: string[]) => {
      code = await runMerge(io, records)
    })

  try {
    await program.parseAsync(argv, { from: 'user' })
    return code
  } catch (e) {
    // Commander has already printed its own message (usage errors, help, version).
    if (e instanceof CommanderError) return e.exitCode === 0 ? HOLDS : REFUSED
    if (e instanceof CliFailure) {
      io.stderr(`twofold: ${e.message}\n`)
      return e.code
    }
    io.stderr(`twofold: internal error: ${describe(e)}\n`)
    return INCONCLUSIVE
  }
}

/** The real kernel, loaded on first use so that `--help` and `merge` never pay for it. */
async function loadKernel(): Promise<RecordKernel> {
  const api = await import('../../kernels/api')
  return { analyzeNotebook: api.analyzeNotebook, runNotebook: api.runNotebook }
}

/** True when this module is the program being run, not a module imported by tests. */
function isEntry(): boolean {
  const script = process.argv[1]
  if (!script) return false
  try {
    const real = realpathSync(script)
    const self = fileURLToPath(import.meta.url)
    const bin = fileURLToPath(new URL('../../bin/twofold.js', import.meta.url))
    return real === realpathSync(self) || real === realpathSync(bin)
  } catch {
    return false
  }
}

if (isEntry()) {
  process.exitCode = await main(process.argv.slice(2), processIo())
  // A proof by induction leaves the solver's worker threads running; they would keep the process alive.
  await closeSolver()
}
