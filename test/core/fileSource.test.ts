/**
 * The Node file source (src/node/fileSource.ts): blocking and asynchronous reads give the same
 * bytes, and a blocking source still lets its thread's event loop turn while a reader keeps reading.
 * Invented bytes written into os.tmpdir().
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { openFileSource } from '../../src/node/fileSource';

describe('file source', () => {
  let folder: string;
  let path: string;
  const bytes = new Uint8Array(3 * 1024 * 1024 + 17);

  before(() => {
    folder = mkdtempSync(join(tmpdir(), 'scatterwise-file-source-'));
    path = join(folder, 'table.bin');
    let state = 12345;
    for (let i = 0; i < bytes.length; i++) {
      state = (state * 1103515245 + 12345) >>> 0;
      bytes[i] = state >>> 24;
    }
    writeFileSync(path, bytes);
  });
  after(() => rmSync(folder, { recursive: true, force: true }));

  it('reads the same bytes blocking and asynchronously, up to the end of the file', async () => {
    const blocking = await openFileSource(path, { blocking: true });
    const plain = await openFileSource(path);
    try {
      assert.equal(blocking.size, bytes.length);
      for (const [offset, length] of [[0, 10], [1000, 128 * 1024], [bytes.length - 5, 100], [bytes.length, 10], [7, 20 * 1024 * 1024]] as const) {
        const expected = bytes.subarray(offset, Math.min(bytes.length, offset + length));
        // The returned view is reused by the next read: compare before reading again.
        assert.deepEqual(Buffer.from(await blocking.read(offset, length)), Buffer.from(expected), `blocking read at ${offset}`);
        assert.deepEqual(Buffer.from(await plain.read(offset, length)), Buffer.from(expected), `asynchronous read at ${offset}`);
      }
    } finally {
      await blocking.close();
      await plain.close();
    }
  });

  it('lets the event loop turn while a reader reads without pause', async () => {
    const source = await openFileSource(path, { blocking: true });
    let turned = false;
    setImmediate(() => (turned = true));
    const started = Date.now();
    let reads = 0;
    try {
      // A reader that only awaits its reads; a blocking source resolves them at once, so without
      // its own pauses nothing else on this thread would run until the loop ends.
      while (!turned && Date.now() - started < 5000) {
        await source.read((reads++ * 4096) % bytes.length, 4096);
      }
    } finally {
      await source.close();
    }
    assert.ok(turned, `the event loop did not turn during ${reads} reads in ${Date.now() - started} ms`);
    assert.ok(reads > 1, 'the reads ran before the event loop turned');
  });

  it('refuses to read after close', async () => {
    const source = await openFileSource(path, { blocking: true });
    await source.close();
    await assert.rejects(source.read(0, 10), /read after close/);
  });
});
