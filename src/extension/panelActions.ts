/**
 * What the host does for the panel's requests that leave the panel: show a row in the data file,
 * save an exported figure, run a command contributed by another part of Scatterwise.
 */
import * as vscode from 'vscode';
import { isToPanel, type EditableOptions, type ExportMessage, type RevealRowMessage, type ToPanel } from '../shared/messages';

/** Text tables open at the row's line; a Parquet file has no lines, so its row number is shown. */
export async function revealRow(uri: vscode.Uri, format: 'csv' | 'tsv' | 'parquet', request: RevealRowMessage): Promise<void> {
  const name = baseName(uri);
  if (format === 'parquet') {
    void vscode.window.showInformationMessage(`${name}: data row ${request.row} (counting from 0). Parquet files have no text lines to open.`);
    return;
  }
  if (request.line === undefined) {
    void vscode.window.showInformationMessage(`${name}: data row ${request.row} (counting from 0); its line in the file is not known.`);
    return;
  }
  const line = request.line - 1;
  const selection = new vscode.Range(line, 0, line, Number.MAX_SAFE_INTEGER);
  // `default` is the text editor; it also opens files too large to be synchronised to extensions.
  await vscode.commands.executeCommand('vscode.openWith', uri, 'default', {
    selection,
    viewColumn: vscode.ViewColumn.Beside,
    preview: true,
  } satisfies vscode.TextDocumentShowOptions);
}

const exportFilters: Record<'png' | 'svg', Record<string, string[]>> = {
  png: { 'PNG image': ['png'] },
  svg: { 'SVG image': ['svg'] },
};

/** Markdown goes to the clipboard; images go where the user saves them, never over the data file. */
export async function exportFromPanel(dataUri: vscode.Uri, request: ExportMessage): Promise<void> {
  if (request.kind === 'markdown') {
    await vscode.env.clipboard.writeText(request.data);
    void vscode.window.showInformationMessage('Scatterwise: the summary was copied to the clipboard as Markdown.');
    return;
  }
  const bytes = exportBytes(request);
  if (!bytes) {
    void vscode.window.showErrorMessage(`Scatterwise: the panel sent a ${request.kind.toUpperCase()} export that could not be read; nothing was saved.`);
    return;
  }
  const suggested = safeFileName(request.fileName, request.kind);
  const target = await vscode.window.showSaveDialog({
    defaultUri: vscode.Uri.joinPath(dataUri, '..', suggested),
    filters: exportFilters[request.kind],
    saveLabel: 'Export',
    title: `Export ${suggested}`,
  });
  if (!target) return;
  if (target.toString() === dataUri.toString()) {
    void vscode.window.showErrorMessage(`Scatterwise never writes over the data file ${baseName(dataUri)}; choose another name.`);
    return;
  }
  await vscode.workspace.fs.writeFile(target, bytes);
  void vscode.window.showInformationMessage(`Scatterwise: saved ${baseName(target)}.`);
}

function exportBytes(request: ExportMessage): Uint8Array | undefined {
  if (request.kind === 'svg') return Buffer.from(request.data, 'utf8');
  const match = /^data:image\/png;base64,([A-Za-z0-9+/=\s]+)$/.exec(request.data);
  return match ? Buffer.from(match[1]!, 'base64') : undefined;
}

/** The panel names the file; keep only a plain name with the right extension. */
export function safeFileName(requested: string, kind: 'png' | 'svg'): string {
  const last = requested.split(/[\\/]/).pop() ?? '';
  const cleaned = last.replace(/[^\w.\- ]+/g, '_').replace(/^\.+/, '').trim();
  const stem = cleaned.replace(/\.(png|svg)$/i, '') || 'scatterwise-figure';
  return `${stem}.${kind}`;
}

export const routedCommands = {
  generateScript: { id: 'scatterwise.generateScript', title: 'Generate fit script' },
  compareWithHead: { id: 'scatterwise.compareWithHead', title: 'Compare with HEAD' },
  saveRoles: { id: 'scatterwise.saveRoles', title: 'Save column roles' },
} as const;

/**
 * Runs a command that another part of Scatterwise contributes, with the data file's URI and the
 * panel's current options. A command that returns a panel message (e.g. a `comparison`) gets it
 * posted to the panel. An unregistered command is reported as not available.
 */
export async function runRoutedCommand(
  name: keyof typeof routedCommands,
  uri: vscode.Uri,
  options: EditableOptions,
  postToPanel: (message: ToPanel) => void,
): Promise<void> {
  const { id, title } = routedCommands[name];
  const registered = await vscode.commands.getCommands(true);
  if (!registered.includes(id)) {
    void vscode.window.showInformationMessage(`Scatterwise: "${title}" is not available in this version.`);
    return;
  }
  const answer: unknown = await vscode.commands.executeCommand(id, uri, options);
  if (isToPanel(answer)) postToPanel(answer);
}

export function baseName(uri: vscode.Uri): string {
  return uri.path.split('/').pop() ?? uri.path;
}
