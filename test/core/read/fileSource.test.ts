/**
 * The Node file source: reading never changes a data file (bytes and modification time), and
 * unreadable paths are DataErrors naming the path.
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, statSync, utimesSync, writeFileSync, copyFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DataError } from '../../../src/core/errors';
import { inspectTable, scanTable } from '../../../src/core/read/index';
import { openFileSource } from '../../../src/node/fileSource';

const fingerprint = (path: string): { sha256: string; mtimeMs: number; size: number } => ({
  sha256: createHash('sha256').update(readFileSync(path)).digest('hex'),
  mtimeMs: statSync(path).mtimeMs,
  size: statSync(path).size,
});

describe('openFileSource', function () {
  // Real I/O and long generated inputs on a shared 2-core machine: mocha's 2 s default is too tight.
  this.timeout(120_000);

  let folder: string;
  before(() => {
    folder = mkdtempSync(join(tmpdir(), 'scatterwise-read-'));
  });
  after(() => rmSync(folder, { recursive: true, force: true }));

  async function readTwice(path: string): Promise<number> {
    let rows = 0;
    for (let pass = 0; pass < 2; pass++) {
      const source = await openFileSource(path);
      try {
        const inspection = await inspectTable(source);
        const label = inspection.columns.findIndex((column) => column.name === 'fault');
        await scanTable({ source, inspection, plan: { label, features: [0] }, onBatch: (batch) => (rows += batch.rows) });
      } finally {
        await source.close();
      }
    }
    return rows / 2;
  }

  it('leaves a CSV file’s bytes and modification time unchanged after inspect and scan', async () => {
    const path = join(folder, 'pumps.csv');
    const rows = Array.from({ length: 5000 }, (_, i) => `${(i % 13) / 4},${(i % 7) * 1.5},"fault, ${i % 3}"`).join('\n');
    writeFileSync(path, `vibration_rms,acoustic_db,fault\n${rows}\n`);
    utimesSync(path, new Date('2020-01-02T03:04:05Z'), new Date('2020-01-02T03:04:05Z'));
    const before = fingerprint(path);
    assert.equal(await readTwice(path), 5000);
    assert.deepEqual(fingerprint(path), before);
  });

  it('leaves a Parquet file’s bytes and modification time unchanged after inspect and scan', async () => {
    const path = join(folder, 'pumps.parquet');
    copyFileSync(join('test', 'fixtures', 'read', 'pumps-duckdb-zstd.parquet'), path);
    utimesSync(path, new Date('2020-01-02T03:04:05Z'), new Date('2020-01-02T03:04:05Z'));
    const before = fingerprint(path);
    assert.ok((await readTwice(path)) > 0);
    assert.deepEqual(fingerprint(path), before);
  });

  it('names the path of a missing file or a folder', async () => {
    const missing = join(folder, 'nowhere.csv');
    await assert.rejects(openFileSource(missing), (error: unknown) => error instanceof DataError && error.code === 'file-unreadable' && error.message.includes(missing));
    await assert.rejects(openFileSource(folder), (error: unknown) => error instanceof DataError && error.message.includes('folder'));
  });

  it('reads ranges larger than its reused buffer in full', async () => {
    const path = join(folder, 'big.bin');
    const bytes = new Uint8Array(20 * 1024 * 1024 + 3);
    for (let i = 0; i < bytes.length; i += 4096) bytes[i] = (i / 4096) % 251;
    writeFileSync(path, bytes);
    const source = await openFileSource(path);
    try {
      const all = await source.read(0, bytes.length);
      assert.equal(all.length, bytes.length);
      assert.ok(Buffer.from(all).equals(Buffer.from(bytes)));
      const tail = await source.read(bytes.length - 10, 100);
      assert.equal(tail.length, 10);
    } finally {
      await source.close();
    }
  });
});
