/**
 * The worker architecture on a generated 200 MB table (written into os.tmpdir(), removed after):
 * closing the editor, a new request and the cancel command each stop the running fit, and the
 * host's event loop stays responsive while a fit runs. Invented data: pump vibration readings.
 */
import * as assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import * as vscode from 'vscode';
import { analyze } from '../../src/core/analyze';
import { openFileSource } from '../../src/node/fileSource';
import type { ProgressMessage, ToPanel } from '../../src/shared/messages';
import {
  EDITOR_VIEW_TYPE,
  clickInWorkbench,
  closeAllEditors,
  isError,
  isFinalResult,
  isProvisionalResult,
  nextMessage,
  openAndWait,
  scatterwise,
  waitUntil,
} from './helpers';

const TARGET_BYTES = 200 * 1024 * 1024;
const FAULTS = ['healthy', 'impeller-wear', 'cavitation', 'bearing-defect'];
const FEATURES = ['rms_velocity', 'kurtosis', 'crest_factor', 'band_1x', 'band_2x', 'acoustic_db', 'centroid_hz', 'temperature', 'flow', 'suction'];

/**
 * Writes about `bytes` of CSV: four classes with shifted means, from a seeded generator. One block
 * of distinct rows is written again and again (formatting every row would take half a minute);
 * the fit reads every byte all the same.
 */
async function writeTable(file: string, bytes: number): Promise<void> {
  let state = 0x9e3779b9;
  const uniform = (): number => {
    // xorshift32: small, seeded, the same table on every run.
    state ^= state << 13;
    state ^= state >>> 17;
    state ^= state << 5;
    return (state >>> 0) / 4294967296;
  };
  const lines: string[] = [];
  for (let row = 0; row < 50_000; row++) {
    const fault = Math.floor(uniform() * FAULTS.length);
    const cells = FEATURES.map((_, feature) => (((feature * (fault + 1)) % 7) * 0.4 + uniform() + uniform() + uniform()).toFixed(4));
    lines.push(`${cells.join(',')},${FAULTS[fault]}`);
  }
  const block = Buffer.from(lines.join('\n') + '\n');
  const handle = await fs.open(file, 'w');
  try {
    await handle.write(`${FEATURES.join(',')},fault\n`);
    for (let written = 0; written < bytes; written += block.length) await handle.write(block);
  } finally {
    await handle.close();
  }
}

const isAnalysisProgress = (message: ToPanel): message is ProgressMessage =>
  message.type === 'progress' && message.phase === 'analysis' && message.fraction > 0;

describe('a 200 MB table', function () {
  this.timeout(300_000);
  let folder: string;
  let uri: vscode.Uri;

  before(async () => {
    folder = await fs.mkdtemp(path.join(os.tmpdir(), 'scatterwise-large-'));
    const file = path.join(folder, 'fleet-large.csv');
    const started = Date.now();
    await writeTable(file, TARGET_BYTES);
    uri = vscode.Uri.file(file);
    console.log(`      generated ${((await fs.stat(file)).size / 1048576).toFixed(0)} MiB in ${Date.now() - started} ms`);
  });
  after(async () => {
    await closeAllEditors();
    await fs.rm(folder, { recursive: true, force: true });
  });

  it('closing the editor stops the running fit: the worker exits and no result is posted', async () => {
    const api = await scatterwise();
    const skip = api.messagesFor(uri).length;
    await vscode.commands.executeCommand('vscode.openWith', uri, EDITOR_VIEW_TYPE);
    await nextMessage(api, uri, isAnalysisProgress, 60_000, skip);
    assert.ok(!api.messagesFor(uri).slice(skip).some(isFinalResult), 'still running when closed');
    assert.ok(api.workerCount() > 0);
    await closeAllEditors();
    const closedAt = api.messagesFor(uri).length;
    await waitUntil(() => api.workerCount() === 0, 5_000, 'the worker to exit');
    await new Promise((resolve) => setTimeout(resolve, 1000));
    assert.ok(!api.messagesFor(uri).slice(closedAt).some((message) => message.type === 'result'), 'no result after closing');
  });

  it('a new request for the same file replaces the running fit, and cancel stops it', async () => {
    const api = await scatterwise();
    const skip = api.messagesFor(uri).length;
    await vscode.commands.executeCommand('vscode.openWith', uri, EDITOR_VIEW_TYPE);
    await nextMessage(api, uri, isAnalysisProgress, 60_000, skip);
    let most = 0;
    const sampler = setInterval(() => (most = Math.max(most, api.workerCount())), 5);
    try {
      assert.ok(api.deliver(uri, { type: 'refit', options: { solver: 'auto', priors: 'uniform', cv: 'none', missing: 'drop-rows' } }));
      const refitAt = api.messagesFor(uri).length;
      await nextMessage(api, uri, isAnalysisProgress, 60_000, refitAt);
      assert.ok(api.deliver(uri, { type: 'command', command: 'cancel' }));
      const cancelled = await nextMessage(api, uri, isError, 10_000, refitAt);
      assert.equal(cancelled.code, 'cancelled');
      assert.equal(cancelled.options?.priors, 'uniform', 'the panel keeps the options it asked for');
      await waitUntil(() => api.workerCount() === 0, 5_000, 'the worker to exit');
      assert.ok(!api.messagesFor(uri).slice(skip).some(isFinalResult), 'neither fit finished');
    } finally {
      clearInterval(sampler);
    }
    assert.equal(most, 1, 'never two workers for one file');
    await closeAllEditors();
  });

  it("the progress notification's Cancel button stops the fit", async function () {
    const api = await scatterwise();
    const skip = api.messagesFor(uri).length;
    await vscode.commands.executeCommand('vscode.openWith', uri, EDITOR_VIEW_TYPE);
    await nextMessage(api, uri, isAnalysisProgress, 60_000, skip);
    // The notification appears once a fit has run for a moment; its button is a real click.
    if (!(await clickInWorkbench('.notifications-toasts .monaco-button', 'Cancel'))) this.skip();
    const cancelled = await nextMessage(api, uri, isError, 15_000, skip);
    assert.equal(cancelled.code, 'cancelled');
    await waitUntil(() => api.workerCount() === 0, 5_000, 'the worker to exit');
    assert.ok(!api.messagesFor(uri).slice(skip).some(isFinalResult), 'the fit did not finish');
    await closeAllEditors();
  });

  it('the host event loop stays responsive during a full fit (p99 delay < 50 ms)', async () => {
    const api = await scatterwise();
    // The same measure with no fit running, printed beside the result: on a busy machine the
    // host's loop is late without any help from us.
    const idle = monitorEventLoopDelay({ resolution: 10 });
    idle.enable();
    await new Promise((resolve) => setTimeout(resolve, 5000));
    idle.disable();
    const delay = monitorEventLoopDelay({ resolution: 10 });
    delay.enable();
    const started = Date.now();
    const skip = api.messagesFor(uri).length;
    const answer = await openAndWait(api, uri, 240_000);
    delay.disable();
    const seconds = (Date.now() - started) / 1000;
    assert.ok(isFinalResult(answer), answer.type === 'error' ? answer.message : 'a result');
    const p99 = delay.percentile(99) / 1e6;
    const max = delay.max / 1e6;
    console.log(
      `      fit of ${(answer.report.source.bytes / 1048576).toFixed(0)} MiB, ${answer.report.rows.total} rows in ${seconds.toFixed(1)} s; ` +
        `host event-loop delay p99 ${p99.toFixed(1)} ms, max ${max.toFixed(1)} ms (${delay.count} samples; ` +
        `with no fit running p99 ${(idle.percentile(99) / 1e6).toFixed(1)} ms, max ${(idle.max / 1e6).toFixed(1)} ms)`,
    );
    // The target, 50 ms, is for a quiet machine. When the machine is busy (other processes) the
    // host is late with no fit at all: then the bound is that idle p99 plus 25 ms for the fit.
    const idleP99 = idle.percentile(99) / 1e6;
    const limit = Math.max(50, idleP99 + 25);
    assert.ok(p99 < limit, `p99 event-loop delay ${p99.toFixed(1)} ms, limit ${limit.toFixed(1)} ms`);
    const posted = api.messagesFor(uri).slice(skip);
    assert.ok(
      posted.some(isProvisionalResult),
      `a provisional answer came first; posted: ${posted.map((message) => (message.type === 'progress' ? `progress ${message.phase}` : message.type)).join(', ')}`,
    );
    // After the first look the worker ran the full analysis in a thread of its own and hashed the
    // file itself: the answer is still analyze()'s on the same file, with the file's hash. (Close,
    // not equal: on more than two cores the worker's passes run in parallel and sum in another order.)
    const source = await openFileSource(uri.fsPath);
    let direct;
    try {
      direct = (await analyze(source, answer.report.options)).report;
    } finally {
      await source.close();
    }
    assert.deepEqual(answer.report.rows, direct.rows);
    assert.deepEqual(answer.report.classes, direct.classes);
    assert.equal(answer.report.discriminant.eigenvalues.length, direct.discriminant.eigenvalues.length);
    answer.report.discriminant.eigenvalues.forEach((value, i) => {
      const expected = direct.discriminant.eigenvalues[i]!;
      assert.ok(Math.abs(value - expected) <= 1e-9 * Math.abs(expected), `eigenvalue ${i}: ${value} against ${expected}`);
    });
    assert.equal(answer.report.accuracy.crossValidated?.method, direct.accuracy.crossValidated?.method);
    assert.ok(Math.abs(answer.report.accuracy.crossValidated!.value - direct.accuracy.crossValidated!.value) <= 1e-9, 'cross-validated accuracy');
    assert.ok(Math.abs(answer.report.accuracy.training - direct.accuracy.training) <= 1e-9, 'training accuracy');
    assert.equal(answer.report.source.sha256, createHash('sha256').update(await fs.readFile(uri.fsPath)).digest('hex'));
  });
});
