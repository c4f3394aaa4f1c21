/**
 * `scatterwise.openFile`: opens tables in the separability editor. From the explorer it gets the
 * clicked file (and the selection); from the palette it takes the active editor's file, or asks.
 */
import * as vscode from 'vscode';
import { EDITOR_VIEW_TYPE } from './separabilityEditor';

export const TABLE_EXTENSIONS = ['csv', 'tsv', 'parquet'];

export function isTable(uri: vscode.Uri): boolean {
  return new RegExp(`\\.(${TABLE_EXTENSIONS.join('|')})$`, 'i').test(uri.path);
}

function activeFile(): vscode.Uri | undefined {
  const input = vscode.window.tabGroups.activeTabGroup.activeTab?.input;
  if (input instanceof vscode.TabInputText || input instanceof vscode.TabInputCustom) return input.uri;
  return vscode.window.activeTextEditor?.document.uri;
}

export async function openFile(clicked?: unknown, selected?: unknown): Promise<void> {
  let targets: vscode.Uri[] = [];
  if (Array.isArray(selected) && selected.every((item) => item instanceof vscode.Uri) && selected.length > 0) targets = selected;
  else if (clicked instanceof vscode.Uri) targets = [clicked];
  else {
    const active = activeFile();
    if (active && isTable(active)) targets = [active];
  }
  if (targets.length === 0) {
    const chosen = await vscode.window.showOpenDialog({
      canSelectMany: true,
      filters: { Tables: TABLE_EXTENSIONS },
      openLabel: 'Open in Scatterwise',
    });
    targets = chosen ?? [];
  }
  const tables = targets.filter(isTable);
  if (targets.length > tables.length) {
    void vscode.window.showWarningMessage(`Scatterwise opens CSV, TSV and Parquet files only; skipped ${targets.length - tables.length} other file(s).`);
  }
  for (const uri of tables) await vscode.commands.executeCommand('vscode.openWith', uri, EDITOR_VIEW_TYPE);
}
