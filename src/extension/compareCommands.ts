/**
 * "Compare with HEAD" and "Compare with a branch or commit…" for a data file: reads the file as it
 * was at the ref (git extension API, else `git show`), fits both versions in worker threads with
 * the same options (settings, project config, and the panel's edits when asked from the panel),
 * and shows the two fits side by side in the separability editor with the notable changes and the
 * gates `scatterwise compare` would check.
 *
 * From the panel (the host routes the panel's request with the file and its current options) the
 * command returns the `comparison` message and the panel's session posts it. From the palette,
 * the explorer or an editor title, it opens the file in the separability editor, waits for that
 * editor's own fit, then shows the comparison there; it also returns the message (for tests).
 */
import * as vscode from 'vscode';
import { compareFile } from '../core/compare/index';
import { DataError } from '../core/errors';
import type { FitOptions } from '../core/types';
import { isFromPanel, type ComparisonMessage, type EditableOptions, type ToPanel } from '../shared/messages';
import { unpackReport } from '../shared/packedSample';
import { fitBothSides } from './compareFits';
import { fileAtRef, refChoices } from './compareGit';
import type { FitWorkers } from './fitWorkers';
import { isTable } from './openFileCommand';
import type { PostLog } from './postLog';
import { projectSettingsFor } from './projectConfig';
import { EDITOR_VIEW_TYPE } from './separabilityEditor';
import { readSettings } from './settings';

export interface CompareServices {
  workers: FitWorkers;
  output: vscode.LogOutputChannel;
  log: PostLog;
  /** Shows a comparison in the open separability editor of `uri`; false when none is open. */
  present(uri: vscode.Uri, message: ComparisonMessage): boolean;
}

/** Options the panel sent with its request, when the command came from the panel. */
function panelOptions(value: unknown): EditableOptions | undefined {
  return isFromPanel({ type: 'refit', options: value }) ? (value as EditableOptions) : undefined;
}

/** The data file a command is about: the argument, else the active editor's file when it is a table. */
function targetFile(argument: unknown): vscode.Uri | undefined {
  if (argument instanceof vscode.Uri) return argument;
  const input = vscode.window.tabGroups.activeTabGroup.activeTab?.input;
  const active = input instanceof vscode.TabInputText || input instanceof vscode.TabInputCustom ? input.uri : undefined;
  return active && isTable(active) ? active : undefined;
}

function fileName(uri: vscode.Uri): string {
  return uri.path.split('/').pop() ?? uri.path;
}

/** The options both sides are fitted with: settings, then the project config, then the panel's edits. */
function comparisonOptions(uri: vscode.Uri, fromPanel: EditableOptions | undefined, output: vscode.LogOutputChannel): { options: Partial<FitOptions>; project: ReturnType<typeof projectSettingsFor> } {
  const project = projectSettingsFor(uri, output);
  const options: Partial<FitOptions> = { ...readSettings().options, ...project.options };
  if (fromPanel) {
    for (const [key, value] of Object.entries(fromPanel)) if (value !== undefined) (options as Record<string, unknown>)[key] = value;
  }
  return { options, project };
}

/** Fits both versions and builds the panel's comparison message. */
async function buildComparison(services: CompareServices, uri: vscode.Uri, ref: string, fromPanel: EditableOptions | undefined, signal: AbortSignal): Promise<ComparisonMessage> {
  const log = (line: string): void => services.output.info(`${fileName(uri)}: ${line}`);
  const base = await fileAtRef(uri, ref, log);
  log(`read ${base.name} (${base.commit.slice(0, 12)}) through the ${base.via}`);
  const { options, project } = comparisonOptions(uri, fromPanel, services.output);
  const fits = await fitBothSides(services.workers, base, uri.fsPath, options, signal);
  const comparison = compareFile({
    base: { name: base.name, commit: base.commit },
    head: { name: project.relativePath ?? fileName(uri) },
    baseReport: unpackReport(fits.base.report),
    headReport: unpackReport(fits.head.report),
    columns: { base: fits.base.columns, head: fits.head.columns },
    rules: [project.gates],
  });
  if (comparison.status !== 'compared') throw new Error('a two-sided comparison came back one-sided');
  const failed = comparison.gates.outcomes.filter((o) => !o.passed);
  log(`compared with ${base.name}: ${comparison.changes.length} notable change(s); gates ${failed.length === 0 ? 'pass' : `fail (${failed.map((o) => o.rule).join(', ')})`}`);
  return {
    type: 'comparison',
    baseName: base.name,
    base: fits.base.report,
    head: fits.head.report,
    changes: comparison.changes.map((c) => c.text),
    gates: comparison.gates.outcomes.map((o) => ({ rule: o.rule, passed: o.passed, detail: o.detail })),
  };
}

/** Waits until the editor of `uri` has posted a final result or an error since `skip` messages. */
function editorSettled(log: PostLog, uri: vscode.Uri, skip: number, timeoutMs = 120_000): Promise<void> {
  const settled = (message: ToPanel): boolean => (message.type === 'result' && !message.report.provisional) || message.type === 'error';
  return new Promise((resolve) => {
    if (log.messagesFor(uri).slice(skip).some(settled)) return resolve();
    const timer = setTimeout(() => {
      subscription.dispose();
      resolve();
    }, timeoutMs);
    const subscription = log.onDidPost(({ uri: posted, message }) => {
      if (posted.toString() !== uri.toString() || !settled(message)) return;
      clearTimeout(timer);
      subscription.dispose();
      resolve();
    });
  });
}

async function compareWith(services: CompareServices, argument: unknown, second: unknown, ref: string | undefined): Promise<ComparisonMessage | undefined> {
  const uri = targetFile(argument);
  if (!uri) {
    void vscode.window.showInformationMessage('Scatterwise: open a CSV, TSV or Parquet file (or select one in the explorer) to compare it with a commit.');
    return undefined;
  }
  const fromPanel = panelOptions(second);
  let chosen = ref;
  if (chosen === undefined) {
    chosen = await pickRef(uri, services.output);
    if (chosen === undefined) return undefined;
  }
  const target = chosen;
  try {
    const message = await vscode.window.withProgress(
      { location: vscode.ProgressLocation.Notification, title: `Scatterwise: comparing ${fileName(uri)} with ${target}`, cancellable: true },
      (_progress, token) => {
        const abort = new AbortController();
        token.onCancellationRequested(() => abort.abort());
        return buildComparison(services, uri, target, fromPanel, abort.signal);
      },
    );
    if (!fromPanel) {
      const skip = services.log.messagesFor(uri).length;
      await vscode.commands.executeCommand('vscode.openWith', uri, EDITOR_VIEW_TYPE);
      // The editor's own fit would replace the comparison when it lands: show it after that.
      const fresh = services.log.messagesFor(uri).length > skip ? skip : Math.max(0, skip - 1);
      await editorSettled(services.log, uri, fresh);
      services.present(uri, message);
    }
    return message;
  } catch (error) {
    if (error instanceof DataError && error.code === 'cancelled') return undefined;
    const text = error instanceof Error ? error.message : String(error);
    services.output.error(`${fileName(uri)}: comparison with ${target} failed: ${error instanceof Error ? error.stack ?? text : text}`);
    const hint = error instanceof DataError && error.hint ? ` ${error.hint}` : '';
    void vscode.window.showErrorMessage(`Scatterwise: ${text}${hint}`);
    return undefined;
  }
}

/** Asks which branch, tag or commit to compare with. */
async function pickRef(uri: vscode.Uri, output: vscode.LogOutputChannel): Promise<string | undefined> {
  let choices: { label: string; description: string; ref: string }[] = [];
  try {
    choices = await refChoices(uri);
  } catch (error) {
    output.warn(`${fileName(uri)}: could not list git refs: ${error instanceof Error ? error.message : String(error)}`);
  }
  const typeOne = { label: '$(edit) Enter a commit, branch or tag…', description: '', ref: '' };
  const picked = await vscode.window.showQuickPick([{ label: 'HEAD', description: 'the last commit', ref: 'HEAD' }, ...choices, typeOne], {
    title: `Compare ${fileName(uri)} with…`,
    placeHolder: 'A branch, tag or commit',
    matchOnDescription: true,
  });
  if (!picked) return undefined;
  if (picked !== typeOne) return picked.ref;
  const typed = await vscode.window.showInputBox({ title: `Compare ${fileName(uri)} with…`, prompt: 'A commit id, branch, tag or expression such as HEAD~3', ignoreFocusOut: true });
  return typed?.trim() || undefined;
}

export function registerCompareCommands(services: CompareServices): vscode.Disposable {
  return vscode.Disposable.from(
    vscode.commands.registerCommand('scatterwise.compareWithHead', (argument?: unknown, second?: unknown) => compareWith(services, argument, second, 'HEAD')),
    vscode.commands.registerCommand('scatterwise.compareWithRevision', (argument?: unknown, second?: unknown) => compareWith(services, argument, second, undefined)),
  );
}
