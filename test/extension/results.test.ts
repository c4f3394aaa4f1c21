/**
 * The editor's answers equal the pipeline's: each sample file opened with `vscode.openWith` posts
 * a result whose figures are those of `analyze()` run here, in the test, on the same file. A
 * reopen is answered from the cache without a worker; the data file is never written.
 */
import * as assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import { promises as fs } from 'node:fs';
import * as vscode from 'vscode';
import { analyze } from '../../src/core/analyze';
import type { FitOptions } from '../../src/core/types';
import { openFileSource } from '../../src/node/fileSource';
import type { ResultMessage } from '../../src/shared/messages';
import { closeAllEditors, isFinalResult, nextMessage, openAndWait, sampleFile, scatterwise, screenshot, waitUntil } from './helpers';

/** The pipeline run here, in the test, with the options the editor's report says it used. */
async function directAnalysis(uri: vscode.Uri, options: FitOptions) {
  const source = await openFileSource(uri.fsPath);
  try {
    return (await analyze(source, options)).report;
  } finally {
    await source.close();
  }
}

async function fileFacts(uri: vscode.Uri): Promise<{ sha256: string; modified: number }> {
  const bytes = await fs.readFile(uri.fsPath);
  return { sha256: createHash('sha256').update(bytes).digest('hex'), modified: (await fs.stat(uri.fsPath)).mtimeMs };
}

describe('results in the separability editor', () => {
  after(closeAllEditors);

  for (const name of ['pump-faults.csv', 'pump-faults.tsv', 'pump-faults.parquet', 'seal-leak.csv', 'pump-faults-defects.csv']) {
    it(`${name}: the posted result equals analyze() on the same file`, async () => {
      const api = await scatterwise();
      const uri = sampleFile(name);
      const before = await fileFacts(uri);
      const answer = await openAndWait(api, uri);
      assert.equal(answer.type, 'result', answer.type === 'error' ? answer.message : '');
      const posted = (answer as ResultMessage).report;
      const direct = await directAnalysis(uri, posted.options);
      assert.equal(posted.provisional, false);
      assert.deepEqual(posted.rows, direct.rows);
      assert.deepEqual(posted.classes, direct.classes);
      assert.deepEqual(posted.features, direct.features);
      assert.deepEqual(posted.discriminant.eigenvalues, direct.discriminant.eigenvalues);
      assert.deepEqual(posted.accuracy, direct.accuracy);
      assert.deepEqual(
        posted.findings.map((finding) => finding.code),
        direct.findings.map((finding) => finding.code),
      );
      assert.equal(posted.label, 'fault');
      assert.ok(posted.classes.length >= 2);
      // The worker hashed the bytes it read; the file is unchanged.
      assert.equal(posted.source.sha256, before.sha256);
      assert.deepEqual(await fileFacts(uri), before);
      // The role form gets the file's columns and the options in force.
      const columns = (answer as ResultMessage).columns.map((column) => column.name);
      for (const feature of direct.features) assert.ok(columns.includes(feature), feature);
      assert.equal((answer as ResultMessage).options.label, 'fault');
    });
  }

  it('takes its options from the scatterwise.* settings and refits when they change', async () => {
    const api = await scatterwise();
    const uri = sampleFile('seal-leak.csv');
    const first = await openAndWait(api, uri);
    assert.ok(isFinalResult(first));
    assert.equal(first.report.options.solver, 'auto');
    assert.equal(first.report.options.plotBudget, 50_000);
    const settings = vscode.workspace.getConfiguration('scatterwise');
    const skip = api.messagesFor(uri).length;
    try {
      await settings.update('solver', 'shrinkage', vscode.ConfigurationTarget.Global);
      await settings.update('plotBudget', 100, vscode.ConfigurationTarget.Global);
      const refit = await nextMessage(api, uri, (message): message is ResultMessage => isFinalResult(message) && message.report.options.plotBudget === 100, 60_000, skip);
      assert.equal(refit.report.options.solver, 'shrinkage');
      assert.equal(refit.report.solver, 'shrinkage');
      assert.equal(refit.options.solver, 'shrinkage', 'the role form shows the solver in force');
      assert.ok(refit.report.sample.rows.length <= 100);
    } finally {
      await settings.update('solver', undefined, vscode.ConfigurationTarget.Global);
      await settings.update('plotBudget', undefined, vscode.ConfigurationTarget.Global);
    }
  });

  it('answers a reopened file from the cache, without a worker', async () => {
    const api = await scatterwise();
    const uri = sampleFile('pump-faults.csv');
    await closeAllEditors();
    await waitUntil(() => api.workerCount() === 0, 10_000, 'no worker');
    const seen = api.messagesFor(uri).length;
    const started = Date.now();
    const answer = await openAndWait(api, uri);
    const elapsed = Date.now() - started;
    assert.ok(isFinalResult(answer));
    const since = api.messagesFor(uri).slice(seen);
    assert.ok(!since.some((message) => message.type === 'progress'), 'no fit ran: no progress was posted');
    assert.equal(api.workerCount(), 0);
    console.log(`      reopen answered from the cache in ${elapsed} ms (editor load included)`);
  });

  it('shows the editor with its panel (screenshot in test-output/)', async function () {
    const api = await scatterwise();
    await closeAllEditors(); // a fresh editor, so that its panel starts from the top
    const answer = await openAndWait(api, sampleFile('pump-faults.csv'));
    assert.ok(isFinalResult(answer));
    await new Promise((resolve) => setTimeout(resolve, 2000)); // let the panel draw
    const file = await screenshot('separability-editor-pump-faults');
    if (!file) this.skip(); // not run by runInServer.mjs: nothing can photograph the workbench
    const size = (await fs.stat(file)).size;
    assert.ok(size > 10_000, `${file} has ${size} bytes`);
    console.log(`      screenshot: ${file}`);
  });
});
