/**
 * The "generate fit script" command in the real host: for a sample file it opens an untitled
 * document holding the script, whose expected figures are those of `analyze()` run here on the same
 * file and whose SHA-256 is the file's; the SQL variant quotes for the chosen dialect; the data file
 * is not touched. (The scripts are run by Python and R in test/reference/scripts*.)
 */
import * as assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import * as vscode from 'vscode';
import { analyze } from '../../src/core/analyze';
import { openFileSource } from '../../src/node/fileSource';
import { closeAllEditors, sampleFile, scatterwise } from './helpers';

const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

describe('generate fit script command', () => {
  afterEach(closeAllEditors);

  it('opens a Python script in an untitled editor carrying the file hash and the fit figures', async () => {
    await scatterwise();
    const uri = sampleFile('seal-leak.csv');
    const before = sha256(await vscode.workspace.fs.readFile(uri));
    const source = await openFileSource(uri.fsPath);
    const { report } = await analyze(source, {}).finally(() => source.close());
    const document = await vscode.commands.executeCommand<vscode.TextDocument | undefined>('scatterwise.generateScript', uri, undefined, { language: 'python' });
    assert.ok(document, 'a document was opened');
    assert.equal(document.isUntitled, true);
    assert.equal(document.languageId, 'python');
    const text = document.getText();
    assert.match(text, /^#!\/usr\/bin\/env python3\n/);
    assert.ok(text.includes(`DATA_SHA256 = '${before}'`));
    const eigenvalue = report.discriminant.eigenvalues[0]!;
    assert.ok(text.includes(`'eigenvalues': [${String(eigenvalue)}]`), 'the expected eigenvalue is that of analyze()');
    assert.ok(text.includes(`'trainingAccuracy': ${String(report.accuracy.training)}`));
    assert.equal(vscode.window.activeTextEditor?.document, document);
    assert.equal(sha256(await vscode.workspace.fs.readFile(uri)), before, 'the data file is only read');
  });

  it('writes the SQL moments query for the chosen dialect', async () => {
    const uri = sampleFile('pump-faults.csv');
    const document = await vscode.commands.executeCommand<vscode.TextDocument | undefined>('scatterwise.generateScript', uri, undefined, { language: 'sql', dialect: 'spark' });
    assert.ok(document);
    assert.equal(document.languageId, 'sql');
    const text = document.getText();
    assert.match(text, /FROM `pump-faults`/);
    assert.match(text, /AS `cross_9_9`/);
  });
});
