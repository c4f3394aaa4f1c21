/**
 * The panel's requests that the host carries out, delivered through the same checked path as a
 * webview message: show a row in the text editor, copy a Markdown summary, drop malformed input.
 */
import * as assert from 'node:assert/strict';
import * as vscode from 'vscode';
import type { InitMessage, ResultMessage } from '../../src/shared/messages';
import { EDITOR_VIEW_TYPE, closeAllEditors, isFinalResult, nextMessage, openAndWait, sampleFile, scatterwise, waitUntil } from './helpers';

describe('panel requests', () => {
  afterEach(closeAllEditors);

  it('revealRow opens the CSV as text at that line', async () => {
    const api = await scatterwise();
    const uri = sampleFile('pump-faults.csv');
    await vscode.commands.executeCommand('vscode.openWith', uri, EDITOR_VIEW_TYPE);
    assert.ok(api.deliver(uri, { type: 'revealRow', row: 41, line: 43 }));
    await waitUntil(() => vscode.window.activeTextEditor?.document.uri.toString() === uri.toString(), 10_000, 'the text editor');
    const editor = vscode.window.activeTextEditor!;
    await waitUntil(() => editor.selection.start.line === 42, 5_000, 'the selection at line 43');
    // Line 43 of the file is data row 41 (the header is line 1).
    const expected = (await vscode.workspace.fs.readFile(uri)).toString().split('\n')[42];
    assert.equal(editor.document.lineAt(42).text, expected);
  });

  it('export of Markdown goes to the clipboard', async () => {
    const api = await scatterwise();
    const uri = sampleFile('seal-leak.csv');
    await vscode.commands.executeCommand('vscode.openWith', uri, EDITOR_VIEW_TYPE);
    const markdown = `# seal-leak.csv\n\nchecked at ${Date.now()}\n`;
    assert.ok(api.deliver(uri, { type: 'export', fileName: 'summary.md', kind: 'markdown', data: markdown }));
    let copied = '';
    const started = Date.now();
    while (copied !== markdown && Date.now() - started < 5_000) {
      copied = await vscode.env.clipboard.readText();
      if (copied !== markdown) await new Promise((resolve) => setTimeout(resolve, 50));
    }
    assert.equal(copied, markdown);
  });

  it('ignores a malformed message and keeps working', async () => {
    const api = await scatterwise();
    const uri = sampleFile('seal-leak.csv');
    await openAndWait(api, uri); // the fit is over: from here on, only a reaction would post
    const before = api.messagesFor(uri).length;
    for (const message of [{ type: 'revealRow', row: -1 }, { type: 'refit', options: { solver: 'fastest' } }, { type: 'nonsense' }, 'ready', null]) {
      assert.ok(api.deliver(uri, message));
    }
    await new Promise((resolve) => setTimeout(resolve, 300));
    assert.equal(api.messagesFor(uri).length, before);
    assert.ok(!(vscode.window.activeTextEditor?.document.uri.toString() === uri.toString()), 'nothing was revealed');
  });

  it('a panel hidden and shown again is greeted again and gets the result replayed', async () => {
    const api = await scatterwise();
    const uri = sampleFile('pump-faults.csv');
    const first = await openAndWait(api, uri);
    assert.equal(first.type, 'result');
    // Another editor in the same group hides the panel; its page is dropped (no retained context).
    await vscode.window.showTextDocument(sampleFile('seal-leak.csv'), { preview: false });
    await new Promise((resolve) => setTimeout(resolve, 500));
    const hiddenAt = api.messagesFor(uri).length;
    await vscode.commands.executeCommand('vscode.openWith', uri, EDITOR_VIEW_TYPE);
    const init = await nextMessage(api, uri, (message): message is InitMessage => message.type === 'init', 30_000, hiddenAt);
    assert.equal(init.fileName, 'pump-faults.csv');
    const replayed = await nextMessage(api, uri, isFinalResult, 30_000, hiddenAt);
    assert.deepEqual(replayed.report.discriminant.eigenvalues, (first as ResultMessage).report.discriminant.eigenvalues);
    assert.equal(api.workerCount(), 0, 'replayed, not refitted');
  });

  it('deliver reports a file that no editor has open', async () => {
    const api = await scatterwise();
    assert.equal(api.deliver(sampleFile('pump-faults.tsv'), { type: 'command', command: 'cancel' }), false);
  });
});
