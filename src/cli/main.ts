/**
 * The `scatterwise` command line: dispatches to a subcommand and turns what it throws into an exit
 * code and one readable message on stderr. A DataError or a usage error is the user's to fix
 * (exit 2, never a stack trace); anything else is a bug (exit 1, one line plus "please report").
 */
import { version } from '../../package.json';
import { CancelledError, DataError } from '../core/errors';
import { parseArgs, UsageError } from './args';
import type { Command, CommandIO } from './command';
import { EXIT_BUG, EXIT_INTERRUPTED, EXIT_OK, EXIT_USAGE } from './command';
import { COMMANDS } from './commands/index';
import { commandHelp, programHelp } from './help';
import { cancelOnSignals, INTERRUPTED_MESSAGE } from './interrupt';
import { keepYoungGenerationSmall } from './youngGeneration';
import { newScratchFolder, removeScratchFolder, useScratchFolder } from '../node/scratchFiles';

function findCommand(name: string): Command {
  const command = COMMANDS.find((c) => c.name === name);
  if (!command) throw new UsageError(`unknown command '${name}' (commands: ${COMMANDS.map((c) => c.name).join(', ')})`);
  return command;
}

/** Whether `--help`/`-h` appears before a `--`. */
function asksForHelp(argv: readonly string[]): boolean {
  for (const arg of argv) {
    if (arg === '--') return false;
    if (arg === '--help' || arg === '-h') return true;
  }
  return false;
}

async function dispatch(argv: readonly string[], io: CommandIO): Promise<number> {
  const [first, ...rest] = argv;
  if (first === undefined) {
    io.stderr(programHelp(COMMANDS, version));
    return EXIT_USAGE;
  }
  if (first === '--help' || first === '-h') {
    io.stdout(programHelp(COMMANDS, version));
    return EXIT_OK;
  }
  if (first === '--version') {
    io.stdout(`${version}\n`);
    return EXIT_OK;
  }
  if (first === 'help') {
    if (rest.length === 0) io.stdout(programHelp(COMMANDS, version));
    else io.stdout(commandHelp(findCommand(rest[0]!)));
    return EXIT_OK;
  }
  const command = findCommand(first);
  if (asksForHelp(rest)) {
    io.stdout(commandHelp(command));
    return EXIT_OK;
  }
  return command.run(parseArgs(rest, command.options, command.name), io);
}

/** One line saying what went wrong, for stderr. */
export function describeFailure(error: unknown): { text: string; code: number } {
  if (error instanceof DataError) {
    return { text: `scatterwise: ${error.message}${error.hint ? `\n  ${error.hint}` : ''}\n`, code: EXIT_USAGE };
  }
  if (error instanceof UsageError) {
    const help = error.command ? `scatterwise help ${error.command}` : 'scatterwise --help';
    return { text: `scatterwise: ${error.message}\n  See '${help}'.\n`, code: EXIT_USAGE };
  }
  if (error instanceof CancelledError) return { text: INTERRUPTED_MESSAGE, code: EXIT_INTERRUPTED };
  const message = error instanceof Error ? `${error.name}: ${error.message}` : String(error);
  return {
    text: `scatterwise: unexpected error: ${message.split('\n')[0]}\n  This is a bug in scatterwise; please report it with the command you ran.\n`,
    code: EXIT_BUG,
  };
}

/** Runs the command line; resolves to the exit code. */
export async function runCli(argv: readonly string[], io: CommandIO): Promise<number> {
  try {
    return await dispatch(argv, io);
  } catch (error) {
    const { text, code } = describeFailure(error);
    io.stderr(text);
    return code;
  }
}

function main(): void {
  keepYoungGenerationSmall();
  // Spills of a Parquet file's huge row group (src/core/read/parquetSpill.ts), removed when the
  // process ends (a signal cancels the analysis first, a second exits at once: interrupt.ts).
  const scratchFolder = newScratchFolder();
  useScratchFolder(scratchFolder);
  process.once('exit', () => removeScratchFolder(scratchFolder));
  const abort = new AbortController();
  cancelOnSignals(abort);
  const io: CommandIO = {
    stdout: (text) => process.stdout.write(text),
    stderr: (text) => process.stderr.write(text),
    cwd: process.cwd(),
    signal: abort.signal,
  };
  runCli(process.argv.slice(2), io).then(
    (code) => {
      process.exitCode = code;
    },
    (error: unknown) => {
      process.stderr.write(describeFailure(error).text);
      process.exitCode = EXIT_BUG;
    },
  );
}

// Run only as the program itself, not when a test bundle imports runCli.
if (require.main === module) main();
