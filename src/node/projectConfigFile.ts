/**
 * Finding and reading the project config on disk (the CLI's side; the editor reads it through
 * VS Code's file system). The config is looked for in the starting folder and then each parent,
 * stopping at the first folder that holds it or a `.git` entry (the repository's top).
 */
import { existsSync, readFileSync, statSync } from 'node:fs';
import * as path from 'node:path';
import { CONFIG_FILE_NAME, parseProjectConfig, type ProjectConfig } from '../core/config/index';
import { DataError } from '../core/errors';

export interface ConfigOnDisk {
  config: ProjectConfig;
  /** Absolute path of the config file. */
  path: string;
  /** The folder its globs are relative to. */
  folder: string;
}

/** The config file for `start` (a folder), or undefined when there is none up to the repository's top. */
export function findConfigFile(start: string): string | undefined {
  let folder = path.resolve(start);
  for (;;) {
    const candidate = path.join(folder, CONFIG_FILE_NAME);
    if (existsSync(candidate)) return candidate;
    if (existsSync(path.join(folder, '.git'))) return undefined;
    const parent = path.dirname(folder);
    if (parent === folder) return undefined;
    folder = parent;
  }
}

/** Reads and checks a config file; a missing, unreadable or invalid file is a DataError naming it. */
export function readConfigFile(file: string, shownAs = file): ConfigOnDisk {
  let text: string;
  try {
    if (!statSync(file).isFile()) throw Object.assign(new Error('not a file'), { code: 'EISDIR' });
    text = readFileSync(file, 'utf8');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new DataError('unreadable-config', `${shownAs}: ${code === 'ENOENT' ? 'no such file' : `cannot be read (${code ?? String(error)})`}.`, { file: shownAs }, 'Check the path given to --config.');
  }
  return { config: parseProjectConfig(text, shownAs), path: path.resolve(file), folder: path.dirname(path.resolve(file)) };
}

/** A data file's path relative to the config's folder, `/`-separated; undefined when it lies outside. */
export function pathInConfig(config: ConfigOnDisk, file: string): string | undefined {
  const relative = path.relative(config.folder, path.resolve(file));
  if (relative.startsWith('..') || path.isAbsolute(relative)) return undefined;
  return relative.split(path.sep).join('/');
}
