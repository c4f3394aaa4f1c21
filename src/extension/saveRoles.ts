/**
 * "Save these roles to the project config": records the open data file's label, features,
 * excluded columns and fit options in `scatterwise.config.json` at the root of its workspace
 * folder (created when missing). This and the exports the user asks for are the only files
 * Scatterwise writes; the data file itself is never touched.
 *
 * From the panel the host passes the file and the options of the fit on screen; from the palette
 * the options of the editor's latest result are used. A label that was detected, not chosen, is
 * saved as detected.
 */
import * as vscode from 'vscode';
import { CONFIG_FILE_NAME, saveRolesToConfig, type SavedRoles } from '../core/config/index';
import { DataError } from '../core/errors';
import { isFromPanel, type EditableOptions, type ResultMessage } from '../shared/messages';
import { isTable } from './openFileCommand';
import type { PostLog } from './postLog';
import { projectSettingsFor } from './projectConfig';

export interface SaveRolesServices {
  output: vscode.LogOutputChannel;
  log: PostLog;
}

function latestResult(log: PostLog, uri: vscode.Uri): ResultMessage | undefined {
  return log
    .messagesFor(uri)
    .filter((m): m is ResultMessage => m.type === 'result' && !m.report.provisional)
    .pop();
}

function targetFile(argument: unknown): vscode.Uri | undefined {
  if (argument instanceof vscode.Uri) return argument;
  const input = vscode.window.tabGroups.activeTabGroup.activeTab?.input;
  const active = input instanceof vscode.TabInputText || input instanceof vscode.TabInputCustom ? input.uri : undefined;
  return active && isTable(active) ? active : undefined;
}

async function readIfPresent(uri: vscode.Uri): Promise<string | undefined> {
  try {
    return new TextDecoder('utf-8').decode(await vscode.workspace.fs.readFile(uri));
  } catch (error) {
    if (error instanceof vscode.FileSystemError && error.code === 'FileNotFound') return undefined;
    throw error;
  }
}

/** Saves the roles; resolves with the config's URI, or undefined when nothing was written. */
async function saveRoles(services: SaveRolesServices, argument: unknown, second: unknown): Promise<vscode.Uri | undefined> {
  const uri = targetFile(argument);
  if (!uri) {
    void vscode.window.showInformationMessage('Scatterwise: open a data file in the separability editor to save its roles.');
    return undefined;
  }
  const name = uri.path.split('/').pop() ?? uri.path;
  const result = latestResult(services.log, uri);
  const fromPanel = isFromPanel({ type: 'refit', options: second }) ? (second as EditableOptions) : undefined;
  const options = fromPanel ?? result?.options;
  const label = options?.label ?? result?.report.label;
  if (!options || !label) {
    void vscode.window.showInformationMessage(`Scatterwise: ${name} has no finished analysis yet; save its roles once it has one.`);
    return undefined;
  }
  const project = projectSettingsFor(uri, services.output);
  if (!project.folder || project.relativePath === undefined || project.relativePath.startsWith('..')) {
    void vscode.window.showWarningMessage(`Scatterwise: ${name} is not inside a workspace folder, so there is no project config to save its roles in.`);
    return undefined;
  }
  const roles: SavedRoles = { label, features: options.features, exclude: options.exclude, solver: options.solver, priors: options.priors, cv: options.cv, missing: options.missing };
  const configUri = vscode.Uri.joinPath(project.folder.uri, CONFIG_FILE_NAME);
  if (configUri.toString() === uri.toString()) throw new Error('the config path is the data file');
  try {
    const saved = saveRolesToConfig(await readIfPresent(configUri), project.relativePath, roles);
    await vscode.workspace.fs.writeFile(configUri, new TextEncoder().encode(saved.text));
    services.output.info(`${name}: ${saved.summary}.`);
    void vscode.window.showInformationMessage(`Scatterwise: ${saved.summary}.`, 'Open config').then((choice) => {
      if (choice) void vscode.window.showTextDocument(configUri);
    });
    return configUri;
  } catch (error) {
    if (!(error instanceof DataError)) throw error;
    services.output.warn(`${name}: roles not saved: ${error.message}`);
    void vscode.window.showErrorMessage(`Scatterwise: roles not saved. ${error.message.split('\n')[0]} ${error.hint ?? ''}`, 'Open config').then((choice) => {
      if (choice) void vscode.window.showTextDocument(configUri);
    });
    return undefined;
  }
}

export function registerSaveRoles(services: SaveRolesServices): vscode.Disposable {
  return vscode.commands.registerCommand('scatterwise.saveRoles', (argument?: unknown, second?: unknown) => saveRoles(services, argument, second));
}
