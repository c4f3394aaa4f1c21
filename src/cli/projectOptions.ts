/**
 * The project config on the command line, for the subcommands that read data files (`fit`,
 * `report`, `compare`, `script`, `moments`): `--config FILE` or the `scatterwise.config.json` found from the current
 * folder up to the repository's top, or none with `--no-config`. A file's options are its
 * dataset's, with any fit option given on the command line on top.
 */
import * as path from 'node:path';
import { datasetFitOptions, datasetFor, mergeFitOptions, type DatasetConfig } from '../core/config/index';
import type { FitOptions } from '../core/types';
import { findConfigFile, pathInConfig, readConfigFile, type ConfigOnDisk } from '../node/projectConfigFile';
import type { OptionSpec, ParsedArgs } from './args';
import { UsageError, valueOf } from './args';
import type { CommandIO } from './command';

export const CONFIG_OPTION_SPECS: readonly OptionSpec[] = [
  { name: 'config', value: 'FILE', describe: 'the project config (default: scatterwise.config.json in this folder or a parent, up to the repository top)' },
  { name: 'no-config', describe: 'ignore any project config' },
];

/** The config in force for this run, or undefined. */
export function loadProjectConfig(args: ParsedArgs, io: CommandIO, command: string): ConfigOnDisk | undefined {
  const given = valueOf(args, 'config');
  if (given !== undefined && args.flags.has('no-config')) throw new UsageError("'--config' and '--no-config' exclude each other", command);
  if (args.flags.has('no-config')) return undefined;
  if (given !== undefined) return readConfigFile(path.resolve(io.cwd, given), given);
  const found = findConfigFile(io.cwd);
  return found ? readConfigFile(found, path.relative(io.cwd, found) || found) : undefined;
}

export interface FileSettings {
  options: Partial<FitOptions>;
  dataset: DatasetConfig | undefined;
}

/**
 * The options of one data file: its dataset's (matched by the file's path in the working tree,
 * relative to the config's folder), then the command line's on top.
 */
export function settingsFor(config: ConfigOnDisk | undefined, file: string, cwd: string, fromCommandLine: Partial<FitOptions>): FileSettings {
  const relative = config ? pathInConfig(config, path.resolve(cwd, file)) : undefined;
  const dataset = config && relative !== undefined ? datasetFor(config.config, relative) : undefined;
  return { options: mergeFitOptions(datasetFitOptions(dataset), fromCommandLine), dataset };
}

/** The fit options of the one data file a command reads: the config's for it (found or named on the command line), the command line's on top. */
export function fileOptions(args: ParsedArgs, io: CommandIO, command: string, file: string, fromCommandLine: Partial<FitOptions>): Partial<FitOptions> {
  return settingsFor(loadProjectConfig(args, io, command), file, io.cwd, fromCommandLine).options;
}
