/**
 * The incremental snappy decoder and RLE / bit-packed hybrid decoder of parquetStream.ts against
 * outside encoders: hyparquet-writer's snappy compressor (npm hyparquet-writer, a dev dependency)
 * and hysnappy's decompressor (the one hyparquet-compressors uses for whole pages), and streams made
 * by hand from the format descriptions (github.com/google/snappy format_description.txt; Parquet's
 * Encodings.md for the hybrid).
 */
import { strict as assert } from 'node:assert';
import { snappyUncompress } from 'hysnappy';
import { snappyCompress } from 'hyparquet-writer/src/snappy.js';
import { HybridStream, PlainPageBytes, SnappyPageBytes, SourceWindow, StreamDamaged, StreamFallback } from '../../../src/core/read/parquetStream';
import { memorySource } from '../../../src/core/source';

function randomGenerator(seed: number): () => number {
  let state = seed;
  return () => {
    state = (state * 48271) % 2147483647;
    return (state - 1) / 2147483646;
  };
}

/** Reads the whole page through SnappyPageBytes in reads of `step` bytes, from a window of `readBytes`. */
async function streamAll(compressed: Uint8Array, size: number, readBytes: number, step: number): Promise<Uint8Array> {
  const window = new SourceWindow(memorySource('page', compressed), 0, compressed.length, readBytes);
  const page = await SnappyPageBytes.open(window, compressed.length, size);
  const out = new Uint8Array(size);
  let at = 0;
  while (at < size) {
    const n = Math.min(step, size - at);
    await page.ensure(n);
    out.set(page.bytes.subarray(page.position, page.position + n), at);
    page.position += n;
    at += n;
  }
  assert.equal(page.left, 0);
  return out;
}

describe('parquet streams', () => {
  it('snappy: decompresses as hysnappy does, whatever the read and window sizes', async () => {
    const random = randomGenerator(7);
    // Repeating runs (short and long copies, overlapping ones) mixed with random bytes (literals), over several 64 KiB blocks.
    const data = new Uint8Array(700_000);
    for (let i = 0; i < data.length; ) {
      const kind = random();
      const run = 1 + Math.floor(random() * 3000);
      for (let j = 0; j < run && i < data.length; j++, i++) data[i] = kind < 0.3 ? Math.floor(random() * 256) : kind < 0.6 ? (i - j) & 0xff : data[Math.max(0, i - 1 - Math.floor(kind * 40))];
    }
    const compressed = snappyCompress(data) as Uint8Array;
    assert.ok(compressed.length < data.length * 0.8, 'the data compress: copies are exercised');
    const reference = snappyUncompress(compressed, data.length);
    assert.deepEqual(reference, data);
    for (const [readBytes, step] of [
      [7, 1],
      [1000, 333],
      [256 * 1024, 100_000],
      [1 << 20, 700_000],
    ]) {
      const out = await streamAll(compressed, data.length, readBytes, step);
      assert.ok(Buffer.from(out).equals(Buffer.from(data)), `reads of ${readBytes}, steps of ${step}`);
    }
  });

  it('snappy: a copy reaching back beyond the 64 KiB kept asks for the whole page; damage is an error', async () => {
    // The preamble (varint length), a literal of 700 000 bytes (tag 62<<2: a 3-byte length - 1 follows),
    // then a copy with a 4-byte offset of 700 000 and length 10 (tag (10-1)<<2 | 3): legal, but not
    // from a compressor working in 64 KiB blocks, and beyond what the stream keeps.
    const literal = 700_000;
    const stream = [...varint(literal + 10), 62 << 2, (literal - 1) & 0xff, ((literal - 1) >> 8) & 0xff, (literal - 1) >> 16];
    const bytes = new Uint8Array(stream.length + literal + 5);
    bytes.set(stream);
    for (let i = 0; i < literal; i++) bytes[stream.length + i] = i % 251;
    bytes.set([(9 << 2) | 3, literal & 0xff, (literal >> 8) & 0xff, literal >> 16, 0], stream.length + literal);
    assert.deepEqual(snappyUncompress(bytes, literal + 10).subarray(literal), new Uint8Array(10).map((_, i) => i % 251));
    await assert.rejects(streamAll(bytes, literal + 10, 4096, 1000), StreamFallback);
    // A copy reaching before the start of the page, and a page that ends early.
    const before = new Uint8Array([20, 4 << 2, 1, 2, 3, 4, 5, (0 << 2) | 1, 9]);
    await assert.rejects(streamAll(before, 20, 4096, 20), StreamDamaged);
    await assert.rejects(streamAll(bytes.subarray(0, 5000), literal + 10, 4096, 1000), StreamDamaged);
  });

  it('hybrid: RLE and bit-packed runs of every width up to 24 read a few values at a time', async () => {
    const random = randomGenerator(11);
    for (let width = 1; width <= 24; width++) {
      const values: number[] = [];
      const encoded: number[] = [];
      for (let run = 0; run < 20; run++) {
        if (random() < 0.5) {
          const count = 1 + Math.floor(random() * 300);
          const value = Math.floor(random() * 2 ** width);
          encoded.push(...varint(count * 2));
          for (let i = 0; i < (width + 7) >> 3; i++) encoded.push((value >> (8 * i)) & 0xff);
          for (let i = 0; i < count; i++) values.push(value);
        } else {
          const groups = 1 + Math.floor(random() * 40);
          const packed = Array.from({ length: groups * 8 }, () => Math.floor(random() * 2 ** width));
          encoded.push(...varint(groups * 2 + 1));
          // Least significant bit first (Encodings.md, "Bit-packed").
          const bits = new Uint8Array(groups * width);
          packed.forEach((value, i) => {
            for (let b = 0; b < width; b++) if ((value >> b) & 1) bits[(i * width + b) >> 3] |= 1 << ((i * width + b) & 7);
          });
          encoded.push(...bits);
          values.push(...packed);
        }
      }
      const bytes = new Uint8Array(encoded);
      const window = new SourceWindow(memorySource('runs', bytes), 0, bytes.length, 13);
      const stream = new HybridStream(new PlainPageBytes(window, bytes.length), width, bytes.length);
      const out = new Int32Array(values.length);
      for (let at = 0; at < values.length; ) {
        const n = Math.min(1 + Math.floor(random() * 50), values.length - at);
        await stream.read(n, out, at);
        at += n;
      }
      assert.deepEqual(Array.from(out), values, `width ${width}`);
      // Skips (inside runs, across them, whole bit-packed groups) between reads land on the same values.
      const skipping = new HybridStream(new PlainPageBytes(new SourceWindow(memorySource('runs', bytes), 0, bytes.length, 13), bytes.length), width, bytes.length);
      const piece = new Int32Array(50);
      for (let at = 0; at < values.length; ) {
        const skip = Math.min(Math.floor(random() * 400), values.length - at);
        await skipping.skip(skip);
        at += skip;
        const n = Math.min(1 + Math.floor(random() * 50), values.length - at);
        await skipping.read(n, piece, 0);
        assert.deepEqual(Array.from(piece.subarray(0, n)), values.slice(at, at + n), `width ${width}, ${n} values after skipping to ${at}`);
        at += n;
      }
    }
    assert.throws(() => new HybridStream(new (class {
      bytes = new Uint8Array(0); position = 0; end = 0; left = 0; async ensure(): Promise<void> {}
    })(), 25, 0), StreamFallback);
  });
});

function varint(value: number): number[] {
  const bytes: number[] = [];
  while (value >= 0x80) {
    bytes.push((value & 0x7f) | 0x80);
    value >>>= 7;
  }
  bytes.push(value);
  return bytes;
}
