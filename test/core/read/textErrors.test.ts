/**
 * Bad delimited input: each case gives a DataError whose message names the file, the line and,
 * where there is one, the column — quickly, without crashing or hanging.
 */
import { strict as assert } from 'node:assert';
import { DataError } from '../../../src/core/errors';
import { inspectTable, scanTable } from '../../../src/core/read/index';
import { inspectDelimitedText } from '../../../src/core/read/textInspect';
import { scanDelimitedText } from '../../../src/core/read/textScan';
import { DEFAULT_TEXT_TUNING } from '../../../src/core/read/textOptions';
import type { ScanSummary, TableInspection } from '../../../src/core/read/types';
import { memorySource, type ByteSource } from '../../../src/core/source';

const encoder = new TextEncoder();
const textSource = (name: string, text: string): ByteSource => memorySource(name, encoder.encode(text));

/** Inspects and scans every column but the last as features, the last as the label. */
async function readAll(source: ByteSource, options = {}): Promise<{ inspection: TableInspection; summary: ScanSummary; values: number[]; labels: number[] }> {
  const inspection = await inspectTable(source, options);
  const last = inspection.columns.length - 1;
  const values: number[] = [];
  const labels: number[] = [];
  const summary = await scanTable({
    source,
    inspection,
    plan: { label: last, features: [...Array(last).keys()] },
    onBatch: (batch) => {
      values.push(...batch.values);
      labels.push(...batch.labels);
    },
  });
  return { inspection, summary, values, labels };
}

async function rejectsWith(promise: Promise<unknown>, code: string, mentions: (string | RegExp)[]): Promise<DataError> {
  let caught: unknown;
  await promise.catch((error: unknown) => {
    caught = error;
  });
  assert.ok(caught instanceof DataError, `expected a DataError ${code}, got ${String(caught)}`);
  assert.equal(caught.code, code, caught.message);
  for (const mention of mentions) {
    if (typeof mention === 'string') assert.ok(caught.message.includes(mention), `"${caught.message}" should mention ${mention}`);
    else assert.match(caught.message, mention);
  }
  return caught;
}

describe('delimited text: bad input', function () {
  // Real I/O and long generated inputs on a shared 2-core machine: mocha's 2 s default is too tight.
  this.timeout(120_000);

  it('an empty file', async () => {
    await rejectsWith(inspectTable(textSource('empty.csv', '')), 'empty-file', ['empty.csv']);
    await rejectsWith(inspectTable(textSource('blank.csv', '\uFEFF\n\r\n\n')), 'empty-file', ['blank.csv']);
  });

  it('a header without rows', async () => {
    const error = await rejectsWith(inspectTable(textSource('header.csv', 'vibration,acoustic,fault\n')), 'no-data-rows', ['header.csv']);
    assert.equal(error.where.line, 2);
  });

  it('ragged rows: the first few lines and their field counts, or skipped and counted', async () => {
    const rows = ['a,b,label', '1,2,x', '3,4', '5,6,y', '7,8,z,9', '1,1,x', '2', '3', '4', '5', '6,6,x'];
    const text = rows.join('\n') + '\n';
    const error = await rejectsWith(readAll(textSource('ragged.csv', text)), 'ragged-row', ['ragged.csv', 'line 3 (2 fields)', 'line 5 (4 fields)', 'line 7 (1 fields)', 'line 9 (1 fields)', 'perhaps more']);
    assert.equal(error.where.line, 3);
    assert.equal(error.where.row, 1);
    const skipped = await readAll(textSource('ragged.csv', text), { skipRaggedRows: true });
    assert.equal(skipped.summary.raggedRows, 6);
    assert.equal(skipped.summary.rows, 10);
    assert.deepEqual(skipped.summary.raggedExamples.map((example) => example.line), [3, 5, 7, 8, 9]);
    assert.deepEqual(skipped.values, [1, 2, 5, 6, 1, 1, 6, 6]);
    assert.ok(skipped.summary.notes.some((note) => note.code === 'ragged-rows-skipped'));
  });

  it('ragged rows keep batches contiguous in row numbers', async () => {
    const source = textSource('ragged.csv', 'a,b\n1,x\n2\n3,y\n4,y\n');
    const inspection = await inspectTable(source, { skipRaggedRows: true });
    const batches: [number, number][] = [];
    await scanTable({ source, inspection, plan: { label: 1, features: [0] }, onBatch: (batch) => batches.push([batch.firstRow, batch.rows]) });
    assert.deepEqual(batches, [[0, 1], [2, 2]]);
  });

  it('an unterminated quote, in a small file and beyond the inspected head', async () => {
    await rejectsWith(readAll(textSource('open.csv', 'a,b,label\n1,2,"x\n3,4,y\n')), 'unterminated-quote', ['open.csv', 'line 2', 'label']);
    const rows = Array.from({ length: 200 }, (_, i) => `${i},${i},ok`).join('\n');
    const source = textSource('open-late.csv', `a,b,label\n${rows}\n5,6,"never closed\n7,8,y\n`);
    const inspection = await inspectDelimitedText(source, 'csv', {}, undefined, { ...DEFAULT_TEXT_TUNING, headBytes: 256 });
    await rejectsWith(
      scanDelimitedText({ source, inspection, plan: { label: 2, features: [0, 1] }, onBatch: () => {} }, { ...DEFAULT_TEXT_TUNING, chunkBytes: 64 }),
      'unterminated-quote',
      ['open-late.csv', 'line 202', 'label'],
    );
  });

  it('a quote inside an unquoted field', async () => {
    await rejectsWith(readAll(textSource('stray.csv', 'a,b,label\n1,2,x\n1,2 5" pipe,y\n')), 'misplaced-quote', ['stray.csv', 'line 3', 'column b']);
  });

  it('lines ended by a carriage return alone', async () => {
    await rejectsWith(inspectTable(textSource('mac.csv', 'x,fault\r1,ok\r2,worn\r')), 'carriage-return-lines', ['mac.csv', 'carriage return']);
  });

  it('a binary file opened by mistake', async () => {
    const bytes = new Uint8Array(4096);
    for (let i = 0; i < bytes.length; i++) bytes[i] = (i * 7919) % 256;
    await rejectsWith(inspectTable(memorySource('image.csv', bytes)), 'binary-file', ['image.csv', 'offset 0']);
    const gzip = new Uint8Array([0x1f, 0x8b, 0x08, 0x00, 0x00, 0x00, 0x00, 0x00, 0x00, 0x03, 0x4b, 0x4c]);
    await rejectsWith(inspectTable(memorySource('data.csv.gz', gzip), { format: 'csv' }), 'binary-file', ['data.csv.gz']);
  });

  it('UTF-16 with and without a byte-order mark', async () => {
    const utf16 = (text: string, bom: boolean, bigEndian: boolean): Uint8Array => {
      const bytes = new Uint8Array((bom ? 2 : 0) + 2 * text.length);
      if (bom) bytes.set(bigEndian ? [0xfe, 0xff] : [0xff, 0xfe]);
      for (let i = 0; i < text.length; i++) {
        const code = text.charCodeAt(i);
        bytes[(bom ? 2 : 0) + 2 * i + (bigEndian ? 1 : 0)] = code & 0xff;
        bytes[(bom ? 2 : 0) + 2 * i + (bigEndian ? 0 : 1)] = code >> 8;
      }
      return bytes;
    };
    const text = 'vibration,fault\n1.5,ok\n2.5,bearing\n';
    await rejectsWith(inspectTable(memorySource('wide.csv', utf16(text, true, false))), 'utf16', ['wide.csv', 'UTF-16 (little-endian)']);
    await rejectsWith(inspectTable(memorySource('wide.csv', utf16(text, true, true))), 'utf16', ['UTF-16 (big-endian)']);
    await rejectsWith(inspectTable(memorySource('wide.csv', utf16(text, false, false))), 'utf16', ['no byte-order mark']);
    await rejectsWith(inspectTable(memorySource('wide.csv', utf16(text, false, true))), 'utf16', ['big-endian, no byte-order mark']);
  });

  it('invalid UTF-8, in the head and later in the file, naming the byte offset and line', async () => {
    const head = encoder.encode('a,label\n1,ok\n2,caf\xe9\n');
    const latin1 = new Uint8Array([...head.subarray(0, 17), 0xe9, 0x0a]); // "2,caf" then a Latin-1 é
    const error = await rejectsWith(inspectTable(memorySource('latin1.csv', latin1)), 'invalid-utf8', ['latin1.csv', 'offset 17', 'line 3']);
    assert.equal(error.where.byteOffset, 17);
    const rows = Array.from({ length: 100 }, (_, i) => `${i},ok\n`).join('');
    const prefix = encoder.encode(`a,label\n${rows}`);
    const late = new Uint8Array([...prefix, ...encoder.encode('5,na'), 0xc3, 0x28, ...encoder.encode('ve\n')]);
    const source = memorySource('late.csv', late);
    const inspection = await inspectDelimitedText(source, 'csv', {}, undefined, { ...DEFAULT_TEXT_TUNING, headBytes: 256 });
    await rejectsWith(
      scanDelimitedText({ source, inspection, plan: { label: 1, features: [0] }, onBatch: () => {} }, { ...DEFAULT_TEXT_TUNING, chunkBytes: 50 }),
      'invalid-utf8',
      ['late.csv', `offset ${prefix.length + 4}`, 'line 102'],
    );
  });

  it('a multi-byte character cut by the chunk end is not mistaken for invalid UTF-8', async () => {
    const text = 'a,label\n' + Array.from({ length: 300 }, (_, i) => `${i},défaut-${i % 3}-中文\n`).join('');
    const source = textSource('unicode.csv', text);
    const inspection = await inspectTable(source);
    for (const chunkBytes of [16, 17, 18, 19, 23]) {
      const summary = await scanDelimitedText({ source, inspection, plan: { label: 1, features: [0] }, onBatch: () => {} }, { ...DEFAULT_TEXT_TUNING, chunkBytes });
      assert.deepEqual(summary.labels, ['défaut-0-中文', 'défaut-1-中文', 'défaut-2-中文']);
    }
  });

  it('a 20 000-column header works', async function () {
    this.timeout(20_000);
    const columns = 20_000;
    const header = Array.from({ length: columns }, (_, i) => `sensor_${i}`).join(',') + ',fault';
    const row = (r: number): string => Array.from({ length: columns }, (_, i) => ((r * 31 + i) % 97) / 8).join(',') + `,${r % 2 ? 'ok' : 'worn'}`;
    const source = textSource('wide.csv', [header, row(1), row(2), row(3)].join('\n') + '\n');
    const started = Date.now();
    const inspection = await inspectTable(source);
    assert.equal(inspection.columns.length, columns + 1);
    assert.equal(inspection.header, true);
    assert.equal(inspection.columns[columns].kind, 'text');
    let seen = 0;
    const summary = await scanTable({
      source,
      inspection,
      plan: { label: columns, features: [0, 19_999] },
      onBatch: (batch) => {
        seen += batch.rows;
        assert.deepEqual(Array.from(batch.values), [31 / 8, ((31 + 19_999) % 97) / 8, 62 / 8, ((62 + 19_999) % 97) / 8, 93 / 8, ((93 + 19_999) % 97) / 8]);
      },
    });
    assert.equal(seen, 3);
    assert.deepEqual(summary.labels, ['ok', 'worn']);
    assert.ok(Date.now() - started < 10_000, `took ${Date.now() - started} ms`);
  });

  describe('a 2 GB single line (virtual source, no disk)', () => {
    /** 2 GiB of `1234567,` repeated with no line break, after an optional normal start. */
    const virtualLine = (start: string): ByteSource => {
      const prefix = encoder.encode(start);
      const size = 2 * 1024 ** 3;
      const pattern = encoder.encode('1234567,');
      let buffer = new Uint8Array(0);
      return {
        name: 'endless.csv',
        size,
        async read(offset: number, length: number): Promise<Uint8Array> {
          const n = Math.max(0, Math.min(length, size - offset));
          if (buffer.length < n) buffer = new Uint8Array(n);
          for (let i = 0; i < n; i++) {
            const at = offset + i;
            buffer[i] = at < prefix.length ? prefix[at] : pattern[(at - prefix.length) % pattern.length];
          }
          return buffer.subarray(0, n);
        },
      };
    };

    it('inspecting it fails quickly naming line 1', async function () {
      this.timeout(60_000);
      const started = Date.now();
      await rejectsWith(inspectTable(virtualLine('')), 'row-too-long', ['endless.csv', 'line 1', '64 MiB']);
      assert.ok(Date.now() - started < 30_000);
    });

    it('scanning a file whose third line never ends fails naming line 3', async function () {
      this.timeout(60_000);
      const source = virtualLine('a,b\n1,2\n');
      const inspection = await inspectTable(source);
      await rejectsWith(scanTable({ source, inspection, plan: { label: 1, features: [0] }, onBatch: () => {} }), 'row-too-long', ['endless.csv', 'line 3']);
    });
  });

  it('options that cannot work together are refused early', async () => {
    const source = textSource('pumps.csv', 'a;b\n1,5;x\n');
    await rejectsWith(inspectTable(source, { delimiter: ',', decimalComma: true }), 'bad-option', ['pumps.csv', 'decimal comma']);
    await rejectsWith(inspectTable(source, { delimiter: ':' }), 'bad-option', ['delimiter']);
    await rejectsWith(inspectTable(source, { thousandsSeparator: '1' }), 'bad-option', ['thousands separator']);
  });
});
