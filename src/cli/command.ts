/**
 * What a subcommand of `scatterwise` is: its name, one-line summary, synopsis, options (declared
 * once, for both the parser and the help screen) and a `run` that returns the exit code.
 * To add a subcommand, write `src/cli/commands/NAME.ts` exporting a `Command` and list it in
 * `src/cli/commands/index.ts`.
 */
import type { OptionSpec, ParsedArgs } from './args';

/** Where a command writes; the real process streams in `main.ts`, buffers in tests. */
export interface CommandIO {
  stdout(text: string): void;
  stderr(text: string): void;
  /** Directory relative paths are resolved against. */
  cwd: string;
  /** Aborted on SIGINT/SIGTERM. */
  signal: AbortSignal;
}

export interface Command {
  name: string;
  /** One line for the command list. */
  summary: string;
  /** Synopsis after `scatterwise `, e.g. `fit FILE [options]`. */
  usage: string;
  /** A paragraph or two for `scatterwise help NAME`. */
  description: string;
  options: readonly OptionSpec[];
  run(args: ParsedArgs, io: CommandIO): Promise<number>;
}

/** Exit codes shared by every subcommand. */
export const EXIT_OK = 0;
/** An unexpected failure inside the program (a bug). */
export const EXIT_BUG = 1;
/** Bad usage or input the user can fix (unreadable file, bad data, unknown column). */
export const EXIT_USAGE = 2;
/** Interrupted (128 + SIGINT). */
export const EXIT_INTERRUPTED = 130;
