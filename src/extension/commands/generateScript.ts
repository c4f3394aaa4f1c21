/**
 * `scatterwise.generateScript`: asks for a language (Python, R, or SQL and its dialect), fits the
 * file in a worker thread that also writes the script (the host never reads the data file), and
 * opens the script in a new untitled editor. Called from the palette (the active data file) or by
 * the panel with the file's URI and its current options. The data file is only read.
 *
 * Arguments (all optional): the data file's URI, the panel's options, and `{ language, dialect }`
 * to skip the questions (tests and other callers). Resolves to the opened untitled document.
 */
import * as vscode from 'vscode';
import { version } from '../../../package.json';
import { DataError } from '../../core/errors';
import type { ScriptLanguage } from '../../core/scripts/index';
import { SQL_DIALECTS, type SqlDialect } from '../../core/scripts/quoting';
import type { FitOptions } from '../../core/types';
import type { EditableOptions } from '../../shared/messages';
import type { FitWorkers } from '../fitWorkers';
import { readSettings } from '../settings';
import type { ScriptChoice } from '../workerProtocol';

export const GENERATE_SCRIPT_COMMAND = 'scatterwise.generateScript';

const LANGUAGES: (vscode.QuickPickItem & { id: ScriptLanguage })[] = [
  { id: 'python', label: 'Python', description: 'pandas + scikit-learn: refits the file and checks the figures' },
  { id: 'r', label: 'R', description: 'base R + MASS: refits the file and checks the figures' },
  { id: 'sql', label: 'SQL', description: 'per-class moments computed in a database, for scatterwise fit --moments' },
];

const EDITOR_LANGUAGE: Record<ScriptLanguage, string> = { python: 'python', r: 'r', sql: 'sql' };

/** The data file the command is about: the one passed, else the active separability editor's or text editor's. */
function targetFile(passed: unknown): vscode.Uri | undefined {
  if (passed instanceof vscode.Uri) return passed;
  const input = vscode.window.tabGroups.activeTabGroup.activeTab?.input;
  if (input instanceof vscode.TabInputCustom || input instanceof vscode.TabInputText) return input.uri;
  return vscode.window.activeTextEditor?.document.uri;
}

/** Fits the whole file in a worker, which writes the script from that fit (src/extension/fitScript.ts); resolves to its text. */
function scriptFromWorker(workers: FitWorkers, path: string, options: Partial<FitOptions>, script: ScriptChoice, token: vscode.CancellationToken): Promise<string> {
  return new Promise((resolve, reject) => {
    const job = workers.start(
      { path, options, provisionalBytes: Number.MAX_SAFE_INTEGER, script },
      {
        progress: () => undefined,
        hashed: () => undefined,
        result: (report, _columns, _timing, text) => {
          if (report.provisional) return;
          if (text === undefined) reject(new Error('the fit worker sent no script'));
          else resolve(text);
        },
        failed: (failure) => reject(new DataError(failure.code, failure.message, failure.where ?? {}, failure.hint)),
      },
    );
    token.onCancellationRequested(() => {
      job.cancel();
      reject(new vscode.CancellationError());
    });
  });
}

/** The language (and SQL dialect) passed by a caller, when valid. */
function passedChoice(choice: unknown): { language: ScriptLanguage; dialect?: SqlDialect } | undefined {
  if (typeof choice !== 'object' || choice === null) return undefined;
  const { language, dialect } = choice as { language?: unknown; dialect?: unknown };
  const known = LANGUAGES.find((l) => l.id === language);
  if (!known) return undefined;
  if (known.id !== 'sql') return { language: known.id };
  return SQL_DIALECTS.includes(dialect as SqlDialect) ? { language: 'sql', dialect: dialect as SqlDialect } : undefined;
}

async function generate(workers: FitWorkers, passedUri: unknown, passedOptions: unknown, passed: unknown): Promise<vscode.TextDocument | undefined> {
  const uri = targetFile(passedUri);
  if (uri === undefined || !/\.(csv|tsv|tab|parquet)$/i.test(uri.path)) {
    void vscode.window.showErrorMessage('Scatterwise: open a CSV, TSV or Parquet file first, then generate its fit script.');
    return undefined;
  }
  if (uri.scheme !== 'file') {
    void vscode.window.showErrorMessage('Scatterwise: fit scripts can be generated for files on this machine only.');
    return undefined;
  }
  const choice = passedChoice(passed);
  const language = choice ? LANGUAGES.find((l) => l.id === choice.language) : await vscode.window.showQuickPick(LANGUAGES, { title: 'Generate fit script', placeHolder: 'Language of the script' });
  if (!language) return undefined;
  let dialect: SqlDialect | undefined = choice?.dialect;
  if (language.id === 'sql' && dialect === undefined) {
    const picked = await vscode.window.showQuickPick(
      SQL_DIALECTS.map((d) => ({ label: d })),
      { title: 'Generate fit script', placeHolder: 'SQL dialect (identifier and string quoting)' },
    );
    if (!picked) return undefined;
    dialect = picked.label as SqlDialect;
  }
  const panel = (passedOptions ?? {}) as Partial<EditableOptions>;
  const options: Partial<FitOptions> = { ...readSettings().options, ...Object.fromEntries(Object.entries(panel).filter(([, v]) => v !== undefined)) };
  const text = await vscode.window.withProgress(
    { location: vscode.ProgressLocation.Notification, title: `Scatterwise: fitting ${uri.path.split('/').pop()} for the ${language.label} script`, cancellable: true },
    (_progress, token) =>
      scriptFromWorker(workers, uri.fsPath, options, { language: language.id, ...(dialect ? { dialect } : {}), generator: `Scatterwise ${version}` }, token),
  );
  const document = await vscode.workspace.openTextDocument({ language: EDITOR_LANGUAGE[language.id], content: text });
  await vscode.window.showTextDocument(document, { preview: false });
  return document;
}

export function registerGenerateScript(workers: FitWorkers): vscode.Disposable {
  return vscode.commands.registerCommand(GENERATE_SCRIPT_COMMAND, async (uri?: unknown, options?: unknown, choice?: unknown) => {
    try {
      return await generate(workers, uri, options, choice);
    } catch (error) {
      if (error instanceof vscode.CancellationError) return undefined;
      const message = error instanceof DataError ? `${error.message}${error.hint ? ` ${error.hint}` : ''}` : error instanceof Error ? error.message : String(error);
      void vscode.window.showErrorMessage(`Scatterwise: could not generate the script: ${message}`);
      return undefined;
    }
  });
}
