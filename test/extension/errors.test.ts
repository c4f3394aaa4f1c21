/**
 * Bad input reaches the panel as an `error` message with a readable explanation, never as an
 * exception: files are written into os.tmpdir() at test time and opened in the editor.
 */
import * as assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { ErrorMessage } from '../../src/shared/messages';
import { closeAllEditors, openAndWait, scatterwise } from './helpers';

describe('errors in the separability editor', () => {
  let folder: string;

  before(async () => {
    folder = await fs.mkdtemp(path.join(os.tmpdir(), 'scatterwise-errors-'));
  });
  after(async () => {
    await closeAllEditors();
    await fs.rm(folder, { recursive: true, force: true });
  });

  async function openTable(name: string, text: string): Promise<{ uri: vscode.Uri; answer: ErrorMessage }> {
    const file = path.join(folder, name);
    await fs.writeFile(file, text);
    const uri = vscode.Uri.file(file);
    const answer = await openAndWait(await scatterwise(), uri);
    assert.equal(answer.type, 'error', `expected an error for ${name}, got ${answer.type}`);
    const error = answer as ErrorMessage;
    assert.ok(error.message.length > 0 && error.code.length > 0);
    // The file is never written.
    assert.equal(await fs.readFile(file, 'utf8'), text);
    return { uri, answer: error };
  }

  it('a row with too many fields: the message names the file and the line', async () => {
    const { answer } = await openTable(
      'ragged.csv',
      'vibration,noise,fault\n1.5,60.1,healthy\n2.5,61.7,worn\n3.1,62.0,7.5,healthy\n1.7,60.9,worn\n',
    );
    assert.match(answer.message, /ragged\.csv/);
    assert.match(answer.message, /line 4\b/);
  });

  it('one class only: says so, and still lists the columns for the role form', async () => {
    const { answer } = await openTable('one-class.csv', 'vibration,noise,fault\n1.5,60.1,healthy\n2.5,61.7,healthy\n3.1,62.0,healthy\n');
    assert.equal(answer.code, 'one-class');
    assert.match(answer.message, /one-class\.csv/);
    assert.deepEqual(
      answer.columns?.map((column) => column.name),
      ['vibration', 'noise', 'fault'],
    );
    assert.equal(answer.options?.solver, 'auto');
  });

  it('no numeric feature: a readable error naming the file', async () => {
    const { answer } = await openTable('text-only.csv', 'site,operator,fault\nnorth,ann,healthy\nsouth,bo,worn\neast,cy,healthy\nwest,di,worn\n');
    assert.match(answer.message, /text-only\.csv/);
    assert.ok(answer.hint, 'a hint says what to do');
  });

  it('an empty file: a readable error naming the file', async () => {
    const { answer } = await openTable('empty.csv', '');
    assert.match(answer.message, /empty\.csv/);
  });
});
