/**
 * The Node scratch space (src/node/scratchFiles.ts) on the real file system, in a folder of
 * os.tmpdir(): a file is seen only once committed and whole, a discarded one leaves nothing, the
 * folder is made when first needed and removed with what is in it; a folder that cannot be made
 * is ScratchUnavailable (the reader goes on without spilling).
 */
import { strict as assert } from 'node:assert';
import { existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ScratchUnavailable, scratchSpace } from '../../src/core/read/scratch';
import { newScratchFolder, removeScratchFolder, scratchFiles, scratchFolderInUse, useScratchFolder } from '../../src/node/scratchFiles';

describe('scratch files', () => {
  let base: string;
  beforeEach(() => {
    base = mkdtempSync(join(tmpdir(), 'scatterwise-scratch-test-'));
  });
  afterEach(() => rmSync(base, { recursive: true, force: true }));

  it('writes a file under a temporary name, seen whole once committed; reads it back from any offset', async () => {
    const folder = join(base, 'analysis');
    const space = scratchFiles(folder);
    assert.equal(existsSync(folder), false, 'made only when a file is written');
    assert.equal(await space.open('a.f64'), null);
    const writer = await space.create('a.f64');
    const values = Float64Array.from({ length: 5000 }, (_, i) => i * 0.5 - 7);
    // Out of order, as column pieces may be written.
    await writer.write(20_000, new Uint8Array(values.buffer, 20_000));
    await writer.write(0, new Uint8Array(values.buffer, 0, 20_000));
    assert.equal(await space.open('a.f64'), null, 'not seen before the commit');
    assert.equal(readdirSync(folder).length, 1);
    await writer.commit();
    assert.deepEqual(readdirSync(folder), ['a.f64']);
    const reader = (await space.open('a.f64'))!;
    const back = new Float64Array(100);
    await reader.read(8 * 4000, new Uint8Array(back.buffer));
    assert.deepEqual([...back], [...values.subarray(4000, 4100)]);
    await assert.rejects(reader.read(8 * 4950, new Uint8Array(8 * 100)), /ends at byte/);
    await reader.close();
    await reader.close();
  });

  it('a discarded file leaves nothing; removing the folder removes its files', async () => {
    const folder = join(base, 'analysis');
    const space = scratchFiles(folder);
    const writer = await space.create('b.f64');
    await writer.write(0, new Uint8Array(1024));
    await writer.discard();
    await writer.discard();
    assert.deepEqual(readdirSync(folder), []);
    const kept = await space.create('c.f64');
    await kept.write(0, new Uint8Array(16));
    await kept.commit();
    removeScratchFolder(folder);
    assert.equal(existsSync(folder), false);
    removeScratchFolder(folder);
  });

  it('a folder that cannot be made: ScratchUnavailable', async () => {
    const file = join(base, 'a-file');
    writeFileSync(file, 'not a folder');
    await assert.rejects(scratchFiles(join(file, 'analysis')).create('d.f64'), ScratchUnavailable);
  });

  it('registers the folder as the thread’s scratch space, with its limits, for the threads it starts', () => {
    const folder = newScratchFolder();
    assert.ok(folder.startsWith(join(tmpdir(), `scatterwise-${process.pid}-`)));
    assert.notEqual(newScratchFolder(), folder);
    try {
      useScratchFolder(folder, { dictionaryBytes: 5, minRows: 7 });
      assert.deepEqual(scratchFolderInUse(), { folder, limits: { dictionaryBytes: 5, minRows: 7 } });
      assert.deepEqual(scratchSpace()?.limits, { dictionaryBytes: 5, minRows: 7 });
    } finally {
      useScratchFolder(null);
    }
    assert.equal(scratchFolderInUse(), null);
    assert.equal(scratchSpace(), null);
  });
});
