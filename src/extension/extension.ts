/**
 * The Scatterwise host in VS Code: registers the separability editor and the open command, starts
 * fits in worker threads (dist/worker.js), and returns a small API that the extension tests use.
 */
import * as vscode from 'vscode';
import type { ToPanel } from '../shared/messages';
import { registerGenerateScript } from './commands/generateScript';
import { registerCompareCommands } from './compareCommands';
import { FitWorkers } from './fitWorkers';
import { openFile } from './openFileCommand';
import { PostLog, type PostedMessage } from './postLog';
import { ResultCache } from './resultCache';
import { registerSaveRoles } from './saveRoles';
import { EDITOR_VIEW_TYPE, SeparabilityEditorProvider } from './separabilityEditor';

/** What `activate()` returns; used by the tests in test/extension to watch the panels. */
export interface ScatterwiseApi {
  /** Messages posted to the panels of this file so far, oldest first: the last 64, a run of progress messages kept as its latest. */
  messagesFor(uri: vscode.Uri): readonly ToPanel[];
  /** Fires on every message posted to a panel. */
  onDidPost: vscode.Event<PostedMessage>;
  /** Fit worker threads alive now. */
  workerCount(): number;
  /**
   * Hands a message to the open editor of `uri` as if its panel had posted it (it is checked like
   * one). Returns false when no editor has that file open.
   */
  deliver(uri: vscode.Uri, message: unknown): boolean;
}

/**
 * A file larger than this gets a quick provisional answer from its first bytes first. 3 MiB is
 * ~10 000 rows of a 20-feature table: enough for a first view, and read, fitted and cross-validated
 * well within the second the editor promises (docs/benchmarks.md, the editor row).
 */
const PROVISIONAL_BYTES = 3 * 1024 * 1024;

export function activate(context: vscode.ExtensionContext): ScatterwiseApi {
  const output = vscode.window.createOutputChannel('Scatterwise', { log: true });
  const log = new PostLog();
  const workers = new FitWorkers(vscode.Uri.joinPath(context.extensionUri, 'dist', 'worker.js').fsPath);
  workers.prepare();
  const provider = new SeparabilityEditorProvider(context.extensionUri, {
    workers,
    cache: new ResultCache(),
    log,
    output,
    provisionalBytes: PROVISIONAL_BYTES,
    notificationDelay: 400,
  });
  context.subscriptions.push(
    output,
    log,
    workers,
    vscode.window.registerCustomEditorProvider(EDITOR_VIEW_TYPE, provider, {
      // The panel keeps its own state with setState/getState and is rebuilt when shown again.
      webviewOptions: { retainContextWhenHidden: false },
      supportsMultipleEditorsPerDocument: true,
    }),
    vscode.commands.registerCommand('scatterwise.openFile', (clicked?: unknown, selected?: unknown) =>
      openFile(clicked, selected).catch((error: unknown) => {
        output.error(`open failed: ${error instanceof Error ? error.stack : String(error)}`);
        void vscode.window.showErrorMessage(`Scatterwise: ${error instanceof Error ? error.message : String(error)}`);
      }),
    ),
    registerGenerateScript(workers),
    registerCompareCommands({
      workers,
      output,
      log,
      present: (uri, message) => {
        const session = provider.sessionFor(uri);
        session?.present(message);
        return session !== undefined;
      },
    }),
    registerSaveRoles({ output, log }),
    vscode.workspace.onDidChangeConfiguration((event) => {
      if (event.affectsConfiguration('scatterwise')) provider.refitAll();
    }),
  );
  return {
    messagesFor: (uri) => log.messagesFor(uri),
    onDidPost: log.onDidPost,
    workerCount: () => workers.count,
    deliver: (uri, message) => {
      const session = provider.sessionFor(uri);
      session?.receive(message);
      return session !== undefined;
    },
  };
}
