/**
 * "Compare with HEAD" and "save roles" in the real host. A git repository is made at test time in
 * os.tmpdir() from the invented pump table (one commit), then the working copy is modified: a
 * column that leaks the label is added and half the healthy rows removed. The comparison shown in
 * the editor must carry both fits — equal to analyze() run here on each version — and the deltas
 * in words; saving roles must write a project config that VS Code checks with our schema.
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import * as vscode from 'vscode';
import { analyze } from '../../src/core/analyze';
import { datasetFor, parseProjectConfig } from '../../src/core/config/index';
import { memorySource } from '../../src/core/source';
import type { FitReport } from '../../src/core/types';
import type { ComparisonMessage, ToPanel } from '../../src/shared/messages';
import { unpackReport } from '../../src/shared/packedSample';
import { git, sampleTable, withLeakingColumn, withRowsRemoved } from '../core/compareRepository';
import { closeAllEditors, nextMessage, openAndWait, scatterwise, screenshot, waitUntil } from './helpers';

const isComparison = (message: ToPanel): message is ComparisonMessage => message.type === 'comparison';

function sha256(file: string): string {
  return createHash('sha256').update(readFileSync(file)).digest('hex');
}

async function analyzeText(name: string, text: string): Promise<FitReport> {
  return (await analyze(memorySource(name, new TextEncoder().encode(text)))).report;
}

/** The figures the panel shows, compared with a fit made here. */
function assertSameFit(shown: FitReport, expected: FitReport, side: string): void {
  assert.deepEqual(shown.rows, expected.rows, `${side}: rows`);
  assert.deepEqual(shown.classes, expected.classes, `${side}: classes`);
  assert.deepEqual(shown.features, expected.features, `${side}: features`);
  assert.deepEqual(shown.discriminant.eigenvalues, expected.discriminant.eigenvalues, `${side}: eigenvalues`);
  assert.deepEqual(shown.accuracy, expected.accuracy, `${side}: accuracy`);
}

describe('compare with HEAD and save roles (real host)', function () {
  this.timeout(240_000);
  let folder: string;
  let dataFile: string;
  let dataUri: vscode.Uri;
  let committed: string;
  let modified: string;

  before(() => {
    folder = mkdtempSync(path.join(os.tmpdir(), 'scatterwise-editor-compare-'));
    mkdirSync(path.join(folder, 'data'));
    dataFile = path.join(folder, 'data', 'pump-faults.csv');
    committed = sampleTable('pump-faults.csv');
    writeFileSync(dataFile, committed);
    git(folder, ['init', '-q', '-b', 'main']);
    git(folder, ['add', '-A']);
    git(folder, ['commit', '-q', '-m', 'pump table']);
    modified = withLeakingColumn(withRowsRemoved(committed));
    writeFileSync(dataFile, modified);
    dataUri = vscode.Uri.file(dataFile);
  });

  after(async () => {
    await closeAllEditors();
    rmSync(folder, { recursive: true, force: true });
  });

  it("the panel's Compare with HEAD shows both fits, equal to analyze() on each version, with the deltas in words", async () => {
    const api = await scatterwise();
    const opened = await openAndWait(api, dataUri);
    assert.equal(opened.type, 'result', opened.type === 'error' ? opened.message : '');
    const skip = api.messagesFor(dataUri).length;
    assert.ok(api.deliver(dataUri, { type: 'command', command: 'compareWithHead' }), 'the editor is open');
    const comparison = await nextMessage(api, dataUri, isComparison, 180_000, skip);

    assert.equal(comparison.baseName, 'HEAD:data/pump-faults.csv');
    assertSameFit(unpackReport(comparison.base), await analyzeText('HEAD:data/pump-faults.csv', committed), 'base');
    assertSameFit(unpackReport(comparison.head), await analyzeText('pump-faults.csv', modified), 'head');
    assert.ok(comparison.head.features.includes('repair_ticket') && !comparison.base.features.includes('repair_ticket'));

    const changes = comparison.changes.join('\n');
    assert.match(changes, /Cross-validated accuracy rose from .*the new column 'repair_ticket' alone separates the classes almost perfectly/);
    assert.match(changes, /Rows used fell from 1,500 to 1,190 \(−310, −20\.7%\); by class: 'healthy' −310\./);
    assert.match(changes, /New warning finding possible-leakage about 'repair_ticket'/);
    // No config here: the default gates, and both pass (leakage is a warning, no class is lost).
    assert.deepEqual(comparison.gates?.map((g) => [g.rule, g.passed]), [['new-finding=error', true], ['class-lost', true]]);

    const shot = await screenshot('compare-with-head');
    if (shot) console.log(`      screenshot: ${shot}`);
    assert.equal(readFileSync(dataFile, 'utf8'), modified, 'the data file is not written');
  });

  it('from the palette with a file: opens the editor, shows the comparison there; a file outside git is an error, not a crash', async () => {
    const api = await scatterwise();
    await closeAllEditors();
    const skip = api.messagesFor(dataUri).length;
    const returned = (await vscode.commands.executeCommand('scatterwise.compareWithHead', dataUri)) as ComparisonMessage | undefined;
    assert.equal(returned?.type, 'comparison');
    const shown = await nextMessage(api, dataUri, isComparison, 60_000, skip);
    assert.deepEqual(shown.changes, returned!.changes);
    // The editor's own fit landed before the comparison, so the comparison is what stays on screen.
    const after = api.messagesFor(dataUri).slice(skip);
    assert.equal(after[after.length - 1]?.type, 'comparison', after.map((m) => m.type).join(', '));

    const outside = mkdtempSync(path.join(os.tmpdir(), 'scatterwise-no-git-'));
    try {
      const loose = path.join(outside, 'loose.csv');
      writeFileSync(loose, committed);
      const looseUri = vscode.Uri.file(loose);
      const answer = await vscode.commands.executeCommand('scatterwise.compareWithHead', looseUri);
      assert.equal(answer, undefined);
      assert.ok(!api.messagesFor(looseUri).some(isComparison));
    } finally {
      rmSync(outside, { recursive: true, force: true });
    }
  });

  it('save roles writes the workspace folder’s scatterwise.config.json, which VS Code checks with the schema', async () => {
    // The runner opens a temporary copy of the sample workspace, so its config may be written.
    const api = await scatterwise();
    const workspace = vscode.workspace.workspaceFolders?.[0];
    assert.ok(workspace, 'a workspace folder is open');
    const configPath = path.join(workspace.uri.fsPath, 'scatterwise.config.json');
    const original = readFileSync(configPath, 'utf8');
    const tableFile = path.join(workspace.uri.fsPath, 'data', 'roles-check.csv');
    writeFileSync(tableFile, committed);
    const tableUri = vscode.Uri.file(tableFile);
    try {
      const opened = await openAndWait(api, tableUri);
      assert.equal(opened.type, 'result', opened.type === 'error' ? opened.message : '');
      const before = sha256(tableFile);

      const configUri = (await vscode.commands.executeCommand('scatterwise.saveRoles', tableUri)) as vscode.Uri | undefined;
      assert.ok(configUri, 'a config was written');
      assert.equal(configUri.fsPath, configPath);
      const saved = parseProjectConfig(readFileSync(configPath, 'utf8'), 'scatterwise.config.json');
      const previous = parseProjectConfig(original, 'scatterwise.config.json');
      // A dataset for this file alone, placed before the glob that also matches it; the rest kept.
      assert.deepEqual(datasetFor(saved, 'data/roles-check.csv'), { files: ['data/roles-check.csv'], label: 'fault' });
      assert.deepEqual(saved.datasets.filter((d) => d.files[0] !== 'data/roles-check.csv'), previous.datasets);
      assert.deepEqual(saved.gates, previous.gates);
      assert.equal(sha256(tableFile), before, 'the data file is untouched');

      // The contributed schema: a wrong solver in the config is flagged by VS Code's JSON service.
      const document = await vscode.workspace.openTextDocument(configUri);
      await vscode.window.showTextDocument(document);
      const edit = new vscode.WorkspaceEdit();
      // Into the dataset just saved, which sets no solver.
      const text = document.getText();
      edit.insert(configUri, document.positionAt(text.indexOf('"label"', text.indexOf('roles-check.csv'))), '"solver": "fastest", ');
      assert.ok(await vscode.workspace.applyEdit(edit));
      let diagnostics: readonly vscode.Diagnostic[] = [];
      await waitUntil(() => {
        diagnostics = vscode.languages.getDiagnostics(configUri);
        return diagnostics.length > 0;
      }, 60_000, 'the JSON service to check the config against the schema');
      const solver = diagnostics.find((d) => document.getText(d.range).includes('fastest'));
      assert.ok(solver, diagnostics.map((d) => d.message).join('; '));
      assert.match(solver.message, /auto|exact|shrinkage/);
      const shot = await screenshot('config-schema-check');
      if (shot) console.log(`      screenshot: ${shot}`);
      await vscode.commands.executeCommand('workbench.action.revertAndCloseActiveEditor');
    } finally {
      writeFileSync(configPath, original);
      rmSync(tableFile, { force: true });
    }
  });
});
