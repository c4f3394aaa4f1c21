/**
 * Activation and the contributed commands, in a real VS Code host. Runs first (file order), so the
 * extension is still inactive when it starts: nothing but our commands and editor may activate it.
 */
import * as assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { EDITOR_VIEW_TYPE, EXTENSION_ID, activeTabInput, closeAllEditors, sampleFile, scatterwise, waitUntil } from './helpers';

function customEditorUri(): vscode.Uri | undefined {
  const input = activeTabInput();
  return input instanceof vscode.TabInputCustom && input.viewType === EDITOR_VIEW_TYPE ? input.uri : undefined;
}

describe('activation and commands', () => {
  afterEach(closeAllEditors);

  it('stays inactive until one of its commands or its editor is used', async () => {
    const extension = vscode.extensions.getExtension(EXTENSION_ID);
    assert.ok(extension, `${EXTENSION_ID} is installed`);
    // Opening the workspace and a data file as text must not activate it.
    await vscode.window.showTextDocument(sampleFile('pump-faults.csv'));
    assert.equal(extension.isActive, false);
    await vscode.commands.executeCommand('scatterwise.openFile');
    await waitUntil(() => extension.isActive, 10_000, 'activation by the open command');
    const api = await scatterwise();
    assert.equal(typeof api.workerCount, 'function');
  });

  it('declares its commands in the Scatterwise category', () => {
    const manifest = vscode.extensions.getExtension(EXTENSION_ID)!.packageJSON as {
      contributes: { commands: { command: string; category: string }[] };
    };
    assert.ok(manifest.contributes.commands.length > 0);
    for (const command of manifest.contributes.commands) assert.equal(command.category, 'Scatterwise', command.command);
  });

  it('palette command opens the active text editor\'s table in the separability editor', async () => {
    const uri = sampleFile('seal-leak.csv');
    await vscode.window.showTextDocument(uri);
    await vscode.commands.executeCommand('scatterwise.openFile');
    await waitUntil(() => customEditorUri() !== undefined, 10_000, 'the separability editor');
    assert.equal(customEditorUri()!.toString(), uri.toString());
  });

  it('explorer command opens the clicked file', async () => {
    const uri = sampleFile('pump-faults.tsv');
    await vscode.commands.executeCommand('scatterwise.openFile', uri, [uri]);
    await waitUntil(() => customEditorUri() !== undefined, 10_000, 'the separability editor');
    assert.equal(customEditorUri()!.toString(), uri.toString());
  });

  it('keeps CSV in the text editor by default and opens Parquet in the separability editor', async () => {
    await vscode.commands.executeCommand('vscode.open', sampleFile('pump-faults.csv'));
    await waitUntil(() => activeTabInput() !== undefined, 10_000, 'an editor');
    assert.ok(activeTabInput() instanceof vscode.TabInputText, 'a CSV opens as text');
    const parquet = sampleFile('pump-faults.parquet');
    await vscode.commands.executeCommand('vscode.open', parquet);
    await waitUntil(() => customEditorUri() !== undefined, 10_000, 'the separability editor for Parquet');
    assert.equal(customEditorUri()!.toString(), parquet.toString());
  });
});
