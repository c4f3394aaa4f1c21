/**
 * The help screens: the program's (`scatterwise --help`) and each subcommand's
 * (`scatterwise help fit`, `scatterwise fit --help`), built from the declared options.
 */
import { describeOptions } from './args';
import type { Command } from './command';

export function programHelp(commands: readonly Command[], version: string): string {
  const width = Math.max(...commands.map((c) => c.name.length));
  return [
    `scatterwise ${version}: class separability of labelled feature tables (CSV, TSV, Parquet)`,
    '',
    'Usage: scatterwise COMMAND [options]',
    '',
    'Commands:',
    ...commands.map((c) => `  ${c.name.padEnd(width)}  ${c.summary}`),
    '',
    'Options:',
    '  --help, -h   show this help (or `scatterwise help COMMAND` for one command)',
    '  --version    print the version',
    '',
    'Exit codes: 0 success, 1 unexpected error (a bug), 2 bad usage or input.',
    '',
  ].join('\n');
}

export function commandHelp(command: Command): string {
  return [`Usage: scatterwise ${command.usage}`, '', command.description, '', 'Options:', describeOptions(command.options), ''].join('\n');
}
