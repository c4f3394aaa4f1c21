/**
 * The project config (`scatterwise.config.json` at the root of the workspace folder holding a data
 * file) as the editor reads it: the file's dataset options sit between the `scatterwise.*`
 * settings and the panel's own edits. Read with Node's fs (the editor reads local files only, see
 * the manifest's capabilities) and kept until the file's modification time changes. An invalid
 * config is reported once per change in the output channel and with a message, and then ignored.
 */
import { readFileSync, statSync } from 'node:fs';
import * as path from 'node:path';
import * as vscode from 'vscode';
import { CONFIG_FILE_NAME, configGates, datasetFitOptions, datasetFor, parseProjectConfig, type DatasetConfig, type ProjectConfig } from '../core/config/index';
import type { GateRules } from '../core/compare/index';
import { DataError } from '../core/errors';
import type { FitOptions } from '../core/types';

interface CachedConfig {
  modified: number;
  config: ProjectConfig | null;
}

const cache = new Map<string, CachedConfig>();

export interface ProjectSettings {
  /** The workspace folder the data file lies in, when any. */
  folder: vscode.WorkspaceFolder | undefined;
  /** The config's path, when it exists. */
  configPath: string | undefined;
  /** The data file's path relative to the folder, `/`-separated. */
  relativePath: string | undefined;
  dataset: DatasetConfig | undefined;
  options: Partial<FitOptions>;
  gates: GateRules | undefined;
}

function readConfig(file: string, output: vscode.LogOutputChannel | undefined): ProjectConfig | null {
  let modified: number;
  try {
    modified = statSync(file).mtimeMs;
  } catch {
    cache.delete(file);
    return null;
  }
  const known = cache.get(file);
  if (known && known.modified === modified) return known.config;
  let config: ProjectConfig | null = null;
  try {
    config = parseProjectConfig(readFileSync(file, 'utf8'), CONFIG_FILE_NAME);
  } catch (error) {
    const message = error instanceof DataError ? error.message : String(error);
    output?.warn(`${file}: ${message}`);
    void vscode.window.showWarningMessage(`Scatterwise: ${CONFIG_FILE_NAME} has problems and is ignored until they are fixed (details in the Scatterwise output).`);
  }
  cache.set(file, { modified, config });
  return config;
}

/** The config's options and gates for a data file (empty when there is no config or no dataset for it). */
export function projectSettingsFor(uri: vscode.Uri, output?: vscode.LogOutputChannel): ProjectSettings {
  const folder = vscode.workspace.getWorkspaceFolder(uri);
  const none: ProjectSettings = { folder, configPath: undefined, relativePath: undefined, dataset: undefined, options: {}, gates: undefined };
  if (!folder || folder.uri.scheme !== 'file' || uri.scheme !== 'file') return none;
  const relativePath = path.relative(folder.uri.fsPath, uri.fsPath).split(path.sep).join('/');
  const configPath = path.join(folder.uri.fsPath, CONFIG_FILE_NAME);
  const config = readConfig(configPath, output);
  if (!config) return { ...none, relativePath };
  const dataset = datasetFor(config, relativePath);
  return { folder, configPath, relativePath, dataset, options: datasetFitOptions(dataset), gates: configGates(config, dataset) };
}
