/**
 * Parquet fixtures written by two independent writers (DuckDB with four codecs, hyparquet-writer
 * with several row groups; see test/fixtures/read/README.md) read against their expected-output
 * JSON, which comes from DuckDB reading the file back or from the data given to the writer.
 */
import { strict as assert } from 'node:assert';
import { parquetMetadata } from 'hyparquet';
import { parquetHeader } from 'hyparquet/src/column.js';
import { parquetWriteBuffer } from 'hyparquet-writer';
import { compressors } from 'hyparquet-compressors';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { analyze } from '../../../src/core/analyze';
import { CancelledError, DataError } from '../../../src/core/errors';
import { inspectTable, scanTable } from '../../../src/core/read/index';
import { adoptParquetDictionaries, DEFAULT_PARQUET_TUNING, scanParquet, shareParquetDictionaries, type ParquetTuning } from '../../../src/core/read/parquet';
import { ColumnBuffers, FlatColumnCursor } from '../../../src/core/read/parquetCursor';
import { memoryScratchSpace, ScratchUnavailable, useScratchSpace, type ScratchSpace } from '../../../src/core/read/scratch';
import type { ScanSummary, TableInspection } from '../../../src/core/read/types';
import { memorySource, type ByteSource, type Progress } from '../../../src/core/source';

const FIXTURES = join('test', 'fixtures', 'read');

interface Expected {
  rows: number;
  rowGroups: number;
  nestedColumns: string[];
  columns: Record<string, (number | string | boolean | null)[]>;
}

const loadFixture = (name: string): { bytes: Uint8Array; expected: Expected } => ({
  bytes: new Uint8Array(readFileSync(join(FIXTURES, `${name}.parquet`))),
  expected: JSON.parse(readFileSync(join(FIXTURES, `${name}.expected.json`), 'utf8')) as Expected,
});

/**
 * A copy of a Parquet file whose dictionary page at `headerAt` says it holds 1 entry instead of 4:
 * the data page's indexes 1-3 then point past it. The count is a zigzag varint in the page header
 * (4 is the byte 8, 1 the byte 2); the byte is found by trying each and reading the header back.
 */
function shrinkDictionary(bytes: Uint8Array, headerAt: number): Uint8Array {
  const header = (candidate: Uint8Array) => parquetHeader({ view: new DataView(candidate.buffer, candidate.byteOffset, candidate.byteLength), offset: headerAt });
  const before = header(bytes);
  assert.equal(before.dictionary_page_header?.num_values, 4);
  for (let at = headerAt; at < headerAt + 64; at++) {
    if (bytes[at] !== 8) continue;
    const damaged = bytes.slice();
    damaged[at] = 2;
    const after = header(damaged);
    if (after.dictionary_page_header?.num_values === 1 && after.compressed_page_size === before.compressed_page_size) return damaged;
  }
  throw new Error('no dictionary count byte found');
}

/** The error a dictionary index past the dictionary gives, for column `column` of damaged.parquet. */
const indexBeyond =
  (column: string) =>
  (error: unknown): boolean =>
    error instanceof DataError && error.code === 'parquet-invalid' && new RegExp(`damaged\\.parquet: column ${column} cannot be decoded from row 0 on \\(a dictionary index [1-3] beyond the 1 entries\\)`).test(error.message);

/** What a cell of the expected JSON means as a feature: DECIMAL and BIGINT come as decimal text. */
function expectedFeature(value: number | string | boolean | null): number {
  if (value === null) return NaN;
  if (typeof value === 'boolean') return value ? 1 : 0;
  return typeof value === 'string' ? Number(value) : value;
}

const NUMERIC = ['vibration_rms', 'kurtosis', 'acoustic_db', 'impeller_rpm', 'run_hours', 'seal_ok'];

/** Every page decoded as it is read (not whole), from reads of 64 bytes: the streaming path and its window edges. */
const STREAMED: Partial<ParquetTuning> = { streamPageBytes: 0, readBytes: 64 };

async function scanAll(bytes: Uint8Array, name: string, inspection: TableInspection, featureNames: string[], tuning: Partial<ParquetTuning> = {}, rows?: { start: number; end: number }, source: ByteSource = memorySource(name, bytes)) {
  const index = (column: string): number => inspection.columns.findIndex((c) => c.name === column);
  const values: number[] = [];
  const labels: number[] = [];
  const firstRows: number[] = [];
  const batchRows: number[] = [];
  let dictionary: readonly string[] = [];
  const summary: ScanSummary = await scanParquet(
    {
      source,
      inspection,
      plan: { label: index('fault'), features: featureNames.map(index) },
      ...(rows ? { rows } : {}),
      onBatch: (batch, batchLabels) => {
        assert.equal(batch.lines, undefined);
        firstRows.push(batch.firstRow);
        batchRows.push(batch.rows);
        values.push(...batch.values);
        labels.push(...batch.labels);
        dictionary = batchLabels;
      },
    },
    { ...DEFAULT_PARQUET_TUNING, batchRows: 16, ...tuning },
  );
  return { values, labels, firstRows, batchRows, dictionary: dictionary.slice(), summary };
}

describe('parquet', function () {
  // Real I/O and long generated inputs on a shared 2-core machine: mocha's 2 s default is too tight.
  this.timeout(120_000);

  for (const fixture of ['pumps-duckdb-snappy', 'pumps-duckdb-zstd', 'pumps-duckdb-gzip', 'pumps-duckdb-brotli', 'pumps-hyparquet']) {
    describe(fixture, () => {
      const { bytes, expected } = loadFixture(fixture);
      const features = NUMERIC.filter((name) => name in expected.columns);

      it('inspects the schema: kinds, nested columns with a note, exact row count', async () => {
        const inspection = await inspectTable(memorySource(`${fixture}.parquet`, bytes));
        assert.equal(inspection.format, 'parquet');
        assert.equal(inspection.estimatedRows, expected.rows);
        assert.equal(inspection.splittable, false);
        const kinds = Object.fromEntries(inspection.columns.map((column) => [column.name, column.kind]));
        for (const name of features) assert.equal(kinds[name], 'numeric', name);
        assert.equal(kinds.fault, 'text');
        if ('inspected_on' in expected.columns) assert.equal(kinds.inspected_on, 'text');
        for (const name of expected.nestedColumns) assert.equal(kinds[name], 'nested', name);
        const nestedNote = inspection.notes?.find((note) => note.code === 'nested-columns-ignored');
        assert.deepEqual(nestedNote?.columns ?? [], expected.nestedColumns);
        const rpm = inspection.columns.find((column) => column.name === 'impeller_rpm')!;
        assert.equal(rpm.integral, true);
        assert.equal(rpm.missing, 0);
        const rms = inspection.columns.find((column) => column.name === 'vibration_rms')!;
        assert.equal(rms.missing, expected.columns.vibration_rms.filter((value) => value === null).length);
      });

      for (const [how, tuning] of [['pages whole', {}], ['pages decoded as read', STREAMED]] as const) {
        it(`scans every value as the outside reader sees it (${how})`, async () => {
          const inspection = await inspectTable(memorySource(`${fixture}.parquet`, bytes));
          const read = await scanAll(bytes, `${fixture}.parquet`, inspection, features, tuning);
          assert.equal(read.summary.rows, expected.rows);
          assert.equal(read.values.length, expected.rows * features.length);
          for (let row = 0; row < expected.rows; row++) {
            features.forEach((name, slot) => {
              const want = expectedFeature(expected.columns[name][row]);
              assert.ok(Object.is(read.values[row * features.length + slot], want), `${name} row ${row}: ${read.values[row * features.length + slot]} vs ${want}`);
            });
          }
          const faults = expected.columns.fault as (string | null)[];
          const order = [...new Set(faults.filter((fault): fault is string => fault !== null))];
          assert.deepEqual(read.dictionary, order);
          assert.deepEqual(read.labels, faults.map((fault) => (fault === null ? -1 : order.indexOf(fault))));
          assert.deepEqual(read.summary.labels, order);
          // Batches of at most 16 rows, each starting where the last ended (a shorter one ends a row group).
          assert.equal(read.firstRows[0], 0);
          for (let i = 1; i < read.firstRows.length; i++) assert.equal(read.firstRows[i], read.firstRows[i - 1] + read.batchRows[i - 1]);
          assert.ok(read.batchRows.every((rows) => rows > 0 && rows <= 16));
          const precision = read.summary.notes.find((note) => note.code === 'int64-precision');
          assert.deepEqual(precision?.columns, ['run_hours']);
          assert.match(precision!.message, /run_hours: 2 values/);
          assert.deepEqual(read.summary.nonNumeric, features.map(() => 0));
        });
      }
    });
  }

  it('reads a DATE column used as a feature as non-numeric, with examples', async () => {
    const { bytes } = loadFixture('pumps-duckdb-snappy');
    const inspection = await inspectTable(memorySource('pumps.parquet', bytes));
    const read = await scanAll(bytes, 'pumps.parquet', inspection, ['inspected_on']);
    assert.equal(read.summary.nonNumeric[0], 300);
    assert.deepEqual(read.summary.nonNumericExamples[0][0], { row: 0, text: '2024-01-01T00:00:00.000Z' });
  });

  it('refuses a nested column in the plan', async () => {
    const { bytes } = loadFixture('pumps-duckdb-snappy');
    const source = memorySource('pumps.parquet', bytes);
    const inspection = await inspectTable(source);
    const nested = inspection.columns.findIndex((column) => column.kind === 'nested');
    await assert.rejects(
      scanTable({ source, inspection, plan: { label: 0, features: [nested] }, onBatch: () => {} }),
      (error: unknown) => error instanceof DataError && error.code === 'nested-column' && error.message.includes('sensor_meta'),
    );
  });

  it('a file without rows', async () => {
    const empty = new Uint8Array(parquetWriteBuffer({ columnData: [{ name: 'vibration_rms', data: [], type: 'DOUBLE' }, { name: 'fault', data: [], type: 'STRING' }] }));
    await assert.rejects(inspectTable(memorySource('empty.parquet', empty)), (error: unknown) => error instanceof DataError && error.code === 'no-data-rows' && error.message.includes('empty.parquet'));
  });

  describe('damaged files', () => {
    const { bytes } = loadFixture('pumps-duckdb-zstd');
    const rejects = async (damaged: Uint8Array, pattern: RegExp): Promise<void> => {
      const source = memorySource('damaged.parquet', damaged);
      await assert.rejects(
        (async () => {
          const inspection = await inspectTable(source, { format: 'parquet' });
          await scanTable({ source, inspection, plan: { label: 7, features: [0, 1, 2] }, onBatch: () => {} });
        })(),
        (error: unknown) => error instanceof DataError && error.code === 'parquet-invalid' && error.message.includes('damaged.parquet') && pattern.test(error.message),
      );
    };

    it('a truncated file', async () => {
      await rejects(bytes.slice(0, bytes.length - 1000), /footer is missing or damaged/);
      await rejects(bytes.slice(0, 8), /only 8 bytes/);
    });

    it('a bad magic number at the start or the end', async () => {
      const start = bytes.slice();
      start.set([0x50, 0x4b, 0x03, 0x04]); // a zip file's start
      await rejects(start, /does not start with the Parquet magic/);
      const end = bytes.slice();
      end[end.length - 1] = 0x30;
      await rejects(end, /does not end with the magic bytes/);
    });

    it('a footer whose length or content is damaged', async () => {
      const length = bytes.slice();
      new DataView(length.buffer).setUint32(length.length - 8, 0x7fffffff, true);
      await rejects(length, /footer cannot be decoded/);
      const content = bytes.slice();
      const footerLength = new DataView(bytes.buffer, bytes.byteOffset).getUint32(bytes.length - 8, true);
      content.fill(0xff, content.length - 8 - footerLength, content.length - 8);
      await rejects(content, /footer cannot be decoded/);
    });

    it('a dictionary index beyond the dictionary (data pages v2), read streamed and whole', async () => {
      // A dictionary-encoded column of 4 values written by hyparquet-writer (data pages v2), uncompressed.
      const rows = 200;
      const written = new Uint8Array(
        parquetWriteBuffer({
          columnData: [
            { name: 'x', data: Float64Array.from({ length: rows }, (_, i) => 1.5 + (i % 4)), type: 'DOUBLE' },
            { name: 'fault', data: Array.from({ length: rows }, (_, i) => (i % 2 ? 'seal' : 'bearing')), type: 'STRING' },
          ],
          codec: 'UNCOMPRESSED',
        }),
      );
      const chunk = parquetMetadata(written.buffer).row_groups[0]!.columns[0]!.meta_data!;
      assert.deepEqual(chunk.encodings, ['PLAIN', 'RLE_DICTIONARY']);
      const damaged = shrinkDictionary(written, Number(chunk.dictionary_page_offset));
      const inspection = await inspectTable(memorySource('x.parquet', written), { format: 'parquet' });
      // The first look at the column (inspection) reads the page already; a scan reads it again.
      await assert.rejects(inspectTable(memorySource('damaged.parquet', damaged), { format: 'parquet' }), indexBeyond('x'));
      for (const tuning of [STREAMED, {}]) {
        await assert.rejects(scanParquet({ source: memorySource('damaged.parquet', damaged), inspection, plan: { label: 1, features: [0] }, onBatch: () => {} }, { ...DEFAULT_PARQUET_TUNING, ...tuning }), indexBeyond('x'));
        const { values } = await scanAll(written, 'x.parquet', inspection, ['x'], tuning);
        assert.deepEqual(values.slice(0, 8), [1.5, 2.5, 3.5, 4.5, 1.5, 2.5, 3.5, 4.5]);
      }
    });

    it('damaged column data behind an intact footer', async () => {
      const damaged = bytes.slice();
      damaged.fill(0xa5, 4, 4000);
      await rejects(damaged, /cannot be decoded/);
    });
  });

  it('reads through a ByteSource that reuses its buffer and answers late (as a file does)', async () => {
    const { bytes, expected } = loadFixture('pumps-hyparquet');
    let shared = new Uint8Array(0);
    const reusing: ByteSource = {
      name: 'reusing.parquet',
      size: bytes.length,
      async read(offset: number, length: number): Promise<Uint8Array> {
        const n = Math.max(0, Math.min(length, bytes.length - offset));
        if (shared.length < n) shared = new Uint8Array(n);
        shared.set(bytes.subarray(offset, offset + n));
        await new Promise((resolve) => setTimeout(resolve, 1));
        return shared.subarray(0, n);
      },
    };
    const inspection = await inspectTable(reusing);
    const rms = inspection.columns.findIndex((column) => column.name === 'vibration_rms');
    const fault = inspection.columns.findIndex((column) => column.name === 'fault');
    assert.equal(inspection.columns[rms].distinct, new Set(expected.columns.vibration_rms).size);
    const values: number[] = [];
    await scanTable({ source: reusing, inspection, plan: { label: fault, features: [rms] }, onBatch: (batch) => values.push(...batch.values) });
    assert.deepEqual(values, expected.columns.vibration_rms);
  });

  it('reports progress and stops on cancellation', async () => {
    const { bytes } = loadFixture('pumps-hyparquet');
    const source = memorySource('pumps.parquet', bytes);
    const inspection = await inspectTable(source);
    const events: Progress[] = [];
    await scanParquet({ source, inspection, plan: { label: 5, features: [0] }, onBatch: () => {}, control: { onProgress: (p) => events.push(p) } }, { ...DEFAULT_PARQUET_TUNING, batchRows: 10 });
    assert.ok(events.length > 5);
    assert.equal(events[events.length - 1].bytesRead, source.size);
    const controller = new AbortController();
    await assert.rejects(
      scanParquet({ source, inspection, plan: { label: 5, features: [0] }, onBatch: () => controller.abort(), control: { signal: controller.signal } }, { ...DEFAULT_PARQUET_TUNING, batchRows: 10 }),
      CancelledError,
    );
  });
});

describe('parquet: one row group of large pages (DuckDB)', function () {
  // DuckDB (npm @duckdb/node-api, a dev dependency) writes one data page per column chunk however
  // many rows the group holds; these pages are decoded as they are read, a batch at a time.
  this.timeout(120_000);
  let folder: string;
  before(() => {
    folder = mkdtempSync(join(tmpdir(), 'scatterwise-parquet-'));
  });
  after(() => rmSync(folder, { recursive: true, force: true }));

  const ROWS = 300_000;
  const COLUMNS = ['repeating', 'scattered', 'counter', 'big', 'fault'];

  for (const codec of ['snappy', 'uncompressed']) {
    it(`reads every value as DuckDB reads it back, streamed or whole (${codec})`, async () => {
      const { DuckDBInstance } = await import('@duckdb/node-api');
      const connection = await (await DuckDBInstance.create(':memory:')).connect();
      const path = join(folder, `large-${codec}.parquet`);
      // repeating: few distinct values (dictionary, compressible: snappy copies); scattered: most
      // values distinct, every 13th missing; counter: INTEGER NOT NULL (a required column).
      await connection.run(`CREATE TABLE pumps (repeating DOUBLE, scattered DOUBLE, counter INTEGER NOT NULL, big BIGINT, fault VARCHAR)`);
      await connection.run(
        `INSERT INTO pumps SELECT (i % 997) * 0.25, CASE WHEN i % 13 = 0 THEN NULL ELSE (hash(i) % 100000007) / 7.0 END, i::INTEGER, i * 3, ` +
          `CASE WHEN i % 101 = 0 THEN NULL ELSE ['healthy', 'cavitation', 'seal leak'][i % 3 + 1] END FROM range(${ROWS}) t(i)`,
      );
      await connection.run(`COPY pumps TO '${path}' (FORMAT parquet, COMPRESSION ${codec}, ROW_GROUP_SIZE 1000000)`);
      const rows = (await connection.runAndReadAll(`SELECT ${COLUMNS.join(', ')} FROM read_parquet('${path}')`)).getRows();
      connection.closeSync();
      assert.equal(rows.length, ROWS);

      const bytes = new Uint8Array(readFileSync(path));
      const inspection = await inspectTable(memorySource('large.parquet', bytes));
      const features = COLUMNS.slice(0, 4);
      const streamed = await scanAll(bytes, 'large.parquet', inspection, features, { streamPageBytes: 0, readBytes: 1000, batchRows: 4096 });
      const whole = await scanAll(bytes, 'large.parquet', inspection, features, { streamPageBytes: Infinity, batchRows: 4096 });
      // Snappy copies reaching beyond 4 KiB of kept history (the repeating column's indexes repeat every 4985 bytes): the
      // stream gives up mid-page and the page is decoded whole, going on from the row reached.
      const fallback = await scanAll(bytes, 'large.parquet', inspection, features, { streamPageBytes: 0, readBytes: 1000, batchRows: 1000, snappyHistoryBytes: 4096 });
      assert.equal(streamed.summary.rows, ROWS);
      assert.equal(streamed.values.length, ROWS * features.length);
      const faultIds = new Map(streamed.dictionary.map((fault, id) => [fault, id]));
      for (let row = 0; row < ROWS; row++) {
        features.forEach((name, slot) => {
          const cell = rows[row][slot];
          const want = cell === null ? NaN : Number(cell);
          const got = streamed.values[row * features.length + slot];
          if (!Object.is(got, want)) assert.fail(`${name} row ${row}: ${got} vs ${want}`);
          if (!Object.is(whole.values[row * features.length + slot], got)) assert.fail(`${name} row ${row} read whole: ${whole.values[row * features.length + slot]} vs ${got}`);
          if (!Object.is(fallback.values[row * features.length + slot], got)) assert.fail(`${name} row ${row} after a fallback: ${fallback.values[row * features.length + slot]} vs ${got}`);
        });
        const fault = rows[row][4];
        const id = fault === null ? -1 : faultIds.get(String(fault));
        if (streamed.labels[row] !== id || whole.labels[row] !== id || fallback.labels[row] !== id) assert.fail(`fault row ${row}: ${streamed.labels[row]}, ${whole.labels[row]}, ${fallback.labels[row]} vs ${id}`);
      }
      // First appearance: row 0 is missing (0 % 101), then rows 1, 2, 3.
      assert.deepEqual(streamed.dictionary, ['cavitation', 'seal leak', 'healthy']);

      // Runs of rows inside the one group (as the threads of a parallel scan read it), each starting
      // with a skip, read the same values; every run after the first through the same source takes the
      // dictionaries the runs before decoded, also once a snappy copy reaching too far back forces a
      // page to be read whole in the middle of a skip.
      for (const tuning of [{ streamPageBytes: 0, readBytes: 1000, batchRows: 4096 }, { streamPageBytes: 0, readBytes: 1000, batchRows: 1000, snappyHistoryBytes: 4096 }]) {
        const source = memorySource('large.parquet', bytes);
        const cuts = [0, 1, 77_777, 150_000, 150_001, 299_999, ROWS];
        for (let i = cuts.length - 2; i >= 0; i--) {
          const run = await scanAll(bytes, 'large.parquet', inspection, features, tuning, { start: cuts[i]!, end: cuts[i + 1]! }, source);
          assert.equal(run.summary.rows, cuts[i + 1]! - cuts[i]!);
          assert.equal(run.firstRows[0], cuts[i]);
          for (let row = cuts[i]!; row < cuts[i + 1]!; row++) {
            for (let slot = 0; slot < features.length; slot++) {
              const got = run.values[(row - cuts[i]!) * features.length + slot];
              if (!Object.is(got, streamed.values[row * features.length + slot])) assert.fail(`${features[slot]} row ${row} in run ${cuts[i]}–${cuts[i + 1]}: ${got}`);
            }
            const label = run.labels[row - cuts[i]!]!;
            const want = streamed.labels[row]!;
            if ((label === -1 ? null : run.dictionary[label]) !== (want === -1 ? null : streamed.dictionary[want])) assert.fail(`fault row ${row} in run ${cuts[i]}–${cuts[i + 1]}`);
          }
        }
      }

      // Scans through one source that overlap in time (a new fit started while the one before winds
      // down): a scan takes the read buffers that ended scans left on the source, so the two must not
      // get the same ones. A whole scan first leaves one set; the two then run at once, each on half.
      const overlapping = memorySource('large.parquet', bytes);
      const tuning = { streamPageBytes: 0, readBytes: 1000, batchRows: 4096 };
      await scanAll(bytes, 'large.parquet', inspection, features, tuning, undefined, overlapping);
      const halves = await Promise.all([0, ROWS / 2].map((start) => scanAll(bytes, 'large.parquet', inspection, features, tuning, { start, end: start + ROWS / 2 }, overlapping)));
      halves.forEach((run, h) => {
        const offset = h * (ROWS / 2) * features.length;
        const wrong = run.values.findIndex((value, i) => !Object.is(value, streamed.values[offset + i]));
        assert.equal(wrong, -1, `half ${h + 1}, value ${wrong}: ${run.values[wrong]} vs ${streamed.values[offset + wrong]}`);
      });

      // The number dictionaries one thread decoded, shared with another (through a structured clone,
      // as postMessage passes them): in shared memory, and the other's run reads the same values with them.
      const decoding = memorySource('large.parquet', bytes);
      await scanAll(bytes, 'large.parquet', inspection, features, { streamPageBytes: 0, readBytes: 1000, batchRows: 4096 }, { start: 0, end: 10 }, decoding);
      const shared = await shareParquetDictionaries(decoding, ROWS / 2);
      assert.ok(shared && shared.length > 0, 'number dictionaries to share');
      for (const [, values] of shared) assert.ok(values.buffer instanceof SharedArrayBuffer);
      const adopting = memorySource('large.parquet', bytes);
      await adoptParquetDictionaries(adopting, structuredClone(shared));
      const half = await scanAll(bytes, 'large.parquet', inspection, features, { streamPageBytes: 0, readBytes: 1000, batchRows: 4096 }, { start: ROWS / 2, end: ROWS }, adopting);
      assert.ok(
        half.values.every((value, i) => Object.is(value, streamed.values[(ROWS / 2) * features.length + i])),
        'the values read with adopted dictionaries',
      );
    });
  }

  it('a dictionary index beyond the dictionary (DuckDB, data pages v1), read streamed and whole', async () => {
    const { DuckDBInstance } = await import('@duckdb/node-api');
    const connection = await (await DuckDBInstance.create(':memory:')).connect();
    const path = join(folder, 'four-values.parquet');
    await connection.run(`COPY (SELECT (1.5 + i % 4)::DOUBLE AS x, ['seal', 'bearing'][i % 2 + 1] AS fault FROM range(5000) t(i)) TO '${path}' (FORMAT parquet, COMPRESSION uncompressed)`);
    connection.closeSync();
    const written = new Uint8Array(readFileSync(path));
    const chunk = parquetMetadata(written.buffer.slice(written.byteOffset, written.byteOffset + written.byteLength)).row_groups[0]!.columns[0]!.meta_data!;
    assert.ok(chunk.encodings.includes('RLE_DICTIONARY') || chunk.encodings.includes('PLAIN_DICTIONARY'), `encodings ${chunk.encodings.join(', ')}`);
    const damaged = shrinkDictionary(written, Number(chunk.dictionary_page_offset));
    const inspection = await inspectTable(memorySource('x.parquet', written), { format: 'parquet' });
    await assert.rejects(inspectTable(memorySource('damaged.parquet', damaged), { format: 'parquet' }), indexBeyond('x'));
    for (const tuning of [{ streamPageBytes: 0, readBytes: 1000 }, { streamPageBytes: Infinity }]) {
      await assert.rejects(scanParquet({ source: memorySource('damaged.parquet', damaged), inspection, plan: { label: 1, features: [0] }, onBatch: () => {} }, { ...DEFAULT_PARQUET_TUNING, ...tuning }), indexBeyond('x'));
      const { values } = await scanAll(written, 'x.parquet', inspection, ['x'], tuning);
      assert.deepEqual(values.slice(0, 8), [1.5, 2.5, 3.5, 4.5, 1.5, 2.5, 3.5, 4.5]);
    }
  });

  it('spills the dictionary-encoded number columns of a share to scratch space, once, and reads the same values from it', async () => {
    const { DuckDBInstance } = await import('@duckdb/node-api');
    const connection = await (await DuckDBInstance.create(':memory:')).connect();
    const path = join(folder, 'spill.parquet');
    const rows = 240_000;
    // wear: most values distinct, every 17th missing (a dictionary with definition levels); temp: FLOAT; cycles:
    // INTEGER; serial: BIGINT (read through its own path, never spilled); fault: the label's dictionary.
    await connection.run(
      `CREATE TABLE pumps AS SELECT CASE WHEN i % 17 = 0 THEN NULL ELSE ((i * 7919) % 30011) * 0.001 END::DOUBLE AS wear, ((i % 5003) * 0.5)::FLOAT AS temp, ` +
        `(i % 20011)::INTEGER AS cycles, (i % 3001)::BIGINT * 1000000007 AS serial, ['healthy', 'cavitation', 'seal leak'][i % 3 + 1] AS fault FROM range(${rows}) t(i)`,
    );
    await connection.run(`COPY pumps TO '${path}' (FORMAT parquet, COMPRESSION snappy, ROW_GROUP_SIZE 10000000)`);
    // DuckDB's own read of the file: what the spilled values are checked against.
    const duckRows = (await connection.runAndReadAll(`SELECT wear, temp, cycles, serial FROM read_parquet('${path}')`)).getRows();
    connection.closeSync();
    const bytes = new Uint8Array(readFileSync(path));
    const metadata = parquetMetadata(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer);
    const chunks = new Map(metadata.row_groups[0]!.columns.map((chunk) => [chunk.meta_data!.path_in_schema[0]!, chunk.meta_data!]));
    for (const name of ['wear', 'temp', 'cycles', 'serial']) assert.ok(chunks.get(name)!.dictionary_page_offset !== undefined, `${name} is dictionary-encoded`);
    const features = ['wear', 'temp', 'cycles', 'serial'];
    const inspection = await inspectTable(memorySource('spill.parquet', bytes));
    const tuning = { batchRows: 4096 };
    const direct = await scanAll(bytes, 'spill.parquet', inspection, features, tuning);

    // Bytes of the spilled columns' dictionary pages read from the source.
    const dictionaries = ['wear', 'temp', 'cycles'].map((name) => [Number(chunks.get(name)!.dictionary_page_offset), Number(chunks.get(name)!.data_page_offset)] as const);
    let dictionaryRead = 0;
    const counting: ByteSource = {
      name: 'spill.parquet',
      size: bytes.length,
      read: async (offset, length) => {
        const piece = bytes.subarray(offset, Math.min(offset + length, bytes.length));
        for (const [start, end] of dictionaries) dictionaryRead += Math.max(0, Math.min(offset + piece.length, end) - Math.max(offset, start));
        return piece;
      },
    };
    const space = memoryScratchSpace();
    useScratchSpace(space, { dictionaryBytes: 1, minRows: 1000 });
    try {
      const spilled = await scanAll(bytes, 'spill.parquet', inspection, features, tuning, undefined, counting);
      assert.equal(space.names().length, 1);
      // wear, temp and cycles: a column of doubles each; serial (BIGINT) and the label stay in the file.
      assert.equal(space.size(space.names()[0]!), 3 * rows * 8);
      assert.ok(dictionaryRead > 0);
      for (let i = 0; i < direct.values.length; i++) if (!Object.is(spilled.values[i], direct.values[i])) assert.fail(`${features[i % 4]} row ${Math.floor(i / 4)}: ${spilled.values[i]} vs ${direct.values[i]}`);
      assert.equal(duckRows.length, rows);
      for (let row = 0; row < rows; row++) {
        for (let slot = 0; slot < 4; slot++) {
          const cell = duckRows[row]![slot];
          const want = cell === null ? NaN : Number(cell);
          if (!Object.is(spilled.values[row * 4 + slot], want)) assert.fail(`${features[slot]} row ${row}: ${spilled.values[row * 4 + slot]}, DuckDB reads ${want}`);
        }
      }
      assert.deepEqual(spilled.labels, direct.labels);
      assert.deepEqual(spilled.dictionary, direct.dictionary);
      assert.deepEqual(spilled.firstRows, direct.firstRows);
      // The next pass over the share reads the spill: no dictionary page of a spilled column again.
      dictionaryRead = 0;
      const again = await scanAll(bytes, 'spill.parquet', inspection, features, tuning, undefined, counting);
      assert.equal(dictionaryRead, 0);
      assert.equal(space.names().length, 1);
      assert.ok(again.values.every((value, i) => Object.is(value, direct.values[i])));

      // Runs of the group, as the threads of a parallel scan read it: each its own spill, written after a skip.
      const cuts = [0, 1, 99_999, 180_000, rows];
      for (let i = cuts.length - 2; i >= 0; i--) {
        const run = await scanAll(bytes, 'spill.parquet', inspection, features, { batchRows: 1000 }, { start: cuts[i]!, end: cuts[i + 1]! });
        const want = direct.values.slice(cuts[i]! * 4, cuts[i + 1]! * 4);
        assert.ok(run.values.length === want.length && run.values.every((value, k) => Object.is(value, want[k])), `run ${cuts[i]}–${cuts[i + 1]}`);
      }
      // The one-row run is under minRows: read as it is, not spilled.
      assert.equal(space.names().length, 1 + 3);

      // A first look (the editor's provisional answer) reads only the first rows: both its passes read the group
      // as it is, whatever its size; the full analysis spills it.
      const look = memoryScratchSpace();
      useScratchSpace(look, { dictionaryBytes: 1, minRows: 1000 });
      const provisional = await analyze(memorySource('spill.parquet', bytes), { label: 'fault', features }, { provisionalBytes: 2000 });
      assert.equal(provisional.report.provisional, true);
      assert.ok(provisional.report.rows.total < 1000, `${provisional.report.rows.total} rows`);
      assert.deepEqual(look.names(), []);
      const full = await analyze(memorySource('spill.parquet', bytes), { label: 'fault', features });
      assert.equal(full.report.rows.total, rows);
      assert.equal(look.names().length, 1);
      useScratchSpace(space, { dictionaryBytes: 1, minRows: 1000 });

      // With the dictionaries shared by the threads' memory instead, they would all be held: a group that spills shares none.
      const decoding = memorySource('spill.parquet', bytes);
      await scanAll(bytes, 'spill.parquet', inspection, features, tuning, { start: 0, end: 10 }, decoding);
      assert.equal(await shareParquetDictionaries(decoding, rows / 2), null);
      useScratchSpace(null);
      assert.ok(await shareParquetDictionaries(decoding, rows / 2), 'without scratch space the dictionaries are shared');
    } finally {
      useScratchSpace(null);
    }

    // A scratch space that cannot take the file, at once or part way: the rows are read as they are; a partial file is discarded.
    for (const failAt of [0, 3]) {
      const inner = memoryScratchSpace();
      let discarded = 0;
      const failing: ScratchSpace = {
        open: (name) => inner.open(name),
        async create(name) {
          if (failAt === 0) throw new ScratchUnavailable('no space');
          const writer = await inner.create(name);
          let writes = 0;
          return {
            write: async (offset, data) => {
              if (++writes >= failAt) throw new ScratchUnavailable('disk full');
              await writer.write(offset, data);
            },
            commit: () => writer.commit(),
            discard: async () => {
              discarded++;
              await writer.discard();
            },
          };
        },
      };
      useScratchSpace(failing, { dictionaryBytes: 1, minRows: 1000 });
      try {
        const read = await scanAll(bytes, 'spill.parquet', inspection, features, tuning);
        assert.ok(read.values.every((value, i) => Object.is(value, direct.values[i])), `scratch failing at write ${failAt}`);
        assert.deepEqual(inner.names(), []);
        assert.equal(discarded, failAt === 0 ? 0 : 1);
      } finally {
        useScratchSpace(null);
      }
    }

    // Cancelled while spilling: nothing committed, the partial file discarded, CancelledError.
    const cancelling = memoryScratchSpace();
    useScratchSpace(cancelling, { dictionaryBytes: 1, minRows: 1000 });
    try {
      const abort = new AbortController();
      let discards = 0;
      const watched: ScratchSpace = {
        open: (name) => cancelling.open(name),
        async create(name) {
          const writer = await cancelling.create(name);
          return {
            write: async (offset, data) => {
              await writer.write(offset, data);
              abort.abort();
            },
            commit: () => writer.commit(),
            discard: async () => {
              discards++;
              await writer.discard();
            },
          };
        },
      };
      useScratchSpace(watched, { dictionaryBytes: 1, minRows: 1000 });
      const index = (column: string): number => inspection.columns.findIndex((c) => c.name === column);
      await assert.rejects(
        scanParquet({ source: memorySource('spill.parquet', bytes), inspection, plan: { label: index('fault'), features: features.map(index) }, control: { signal: abort.signal }, onBatch: () => undefined }),
        CancelledError,
      );
      assert.deepEqual(cancelling.names(), []);
      assert.equal(discards, 1);
    } finally {
      useScratchSpace(null);
    }

    // A damaged data page of a spilled column: the scan's DataError, naming the file and the column.
    const wear = chunks.get('wear')!;
    const damaged = bytes.slice();
    damaged.fill(0xff, Number(wear.data_page_offset) + 64, Number(wear.data_page_offset) + Number(wear.total_compressed_size) - (Number(wear.data_page_offset) - Number(wear.dictionary_page_offset)) - 64);
    useScratchSpace(memoryScratchSpace(), { dictionaryBytes: 1, minRows: 1000 });
    try {
      await assert.rejects(scanAll(damaged, 'spill.parquet', inspection, features, tuning), (error: unknown) => {
        assert.ok(error instanceof DataError, String(error));
        assert.equal(error.where.column, 'wear');
        assert.match(error.message, /spill\.parquet: column wear cannot be decoded/);
        return true;
      });
    } finally {
      useScratchSpace(null);
    }
  });

  it('a first look at the first rows decodes only the start of a large dictionary; later reads go on from there', async () => {
    const { DuckDBInstance } = await import('@duckdb/node-api');
    const connection = await (await DuckDBInstance.create(':memory:')).connect();
    const path = join(folder, 'first-look.parquet');
    // 200 003 distinct readings, each six times: DuckDB keeps a dictionary (it does not at a quarter
    // distinct), its entries in order of first appearance.
    await connection.run(`CREATE TABLE pumps AS SELECT ((i % 200003) * 0.001)::DOUBLE AS reading, ['healthy', 'cavitation'][i % 2 + 1] AS fault FROM range(1200018) t(i)`);
    await connection.run(`COPY pumps TO '${path}' (FORMAT parquet, COMPRESSION snappy, ROW_GROUP_SIZE 10000000)`);
    const expected = (await connection.runAndReadAll(`SELECT reading FROM read_parquet('${path}')`)).getRows().map((row) => Number(row[0]));
    connection.closeSync();
    const bytes = new Uint8Array(readFileSync(path));
    const metadata = parquetMetadata(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer);
    assert.equal(metadata.row_groups.length, 1);
    const chunk = metadata.row_groups[0]!.columns[0]!.meta_data!;
    assert.ok(chunk.dictionary_page_offset !== undefined, 'the readings are dictionary-encoded');
    const dictionaryStart = Number(chunk.dictionary_page_offset);
    const dictionaryEnd = Number(chunk.data_page_offset);
    const dictionaryBytes = dictionaryEnd - dictionaryStart;
    assert.ok(dictionaryBytes > 800_000, `a dictionary of ${dictionaryBytes} bytes`);

    let read = 0; // bytes of the dictionary page read (every read counted, overlapping or not)
    const inner = memorySource('first-look.parquet', bytes);
    const source: ByteSource = {
      name: inner.name,
      size: inner.size,
      read: async (offset, length) => {
        const piece = await inner.read(offset, length);
        read += Math.max(0, Math.min(offset + piece.length, dictionaryEnd) - Math.max(offset, dictionaryStart));
        return piece;
      },
    };
    // The inspection's sample and the first 1 000 rows, as the editor's first look reads them.
    const inspection = await inspectTable(source);
    const first = await scanAll(bytes, 'first-look.parquet', inspection, ['reading'], {}, { start: 0, end: 1000 }, source);
    assert.deepEqual(first.values, expected.slice(0, 1000));
    assert.ok(read < dictionaryBytes / 2, `${read} bytes of the dictionary page read, of ${dictionaryBytes}`);
    // The whole group through the same source: its dictionary goes on growing from the entries decoded.
    const all = await scanAll(bytes, 'first-look.parquet', inspection, ['reading'], { batchRows: 4096 }, undefined, source);
    assert.deepEqual(all.values, expected);
    // Snappy copies reaching back beyond the history kept (one byte here): the index stream and the
    // growing dictionary both go on from the page decoded whole.
    const fallback = await scanAll(bytes, 'first-look.parquet', inspection, ['reading'], { batchRows: 4096, snappyHistoryBytes: 1 }, undefined, memorySource('first-look.parquet', bytes));
    assert.deepEqual(fallback.values, expected);
    // A run from the middle of the group, on its own: its first indexes reach far into the dictionary.
    const middle = await scanAll(bytes, 'first-look.parquet', inspection, ['reading'], {}, { start: 600_000, end: 600_100 }, memorySource('first-look.parquet', bytes));
    assert.deepEqual(middle.values, expected.slice(600_000, 600_100));
    // Shared with another thread after a part was decoded: decoded to its end first.
    const partly = memorySource('first-look.parquet', bytes);
    await scanAll(bytes, 'first-look.parquet', inspection, ['reading'], {}, { start: 0, end: 10 }, partly);
    const shared = await shareParquetDictionaries(partly, expected.length / 2);
    assert.ok(shared && shared.length === 1);
    const adopting = memorySource('first-look.parquet', bytes);
    await adoptParquetDictionaries(adopting, structuredClone(shared));
    const rest = await scanAll(bytes, 'first-look.parquet', inspection, ['reading'], { batchRows: 4096 }, { start: 900_000, end: expected.length }, adopting);
    assert.deepEqual(rest.values, expected.slice(900_000));
  });
  it('a cursor finished before its chunk ends leaves its read window and decompression buffer to the next cursor over the column', async () => {
    const { DuckDBInstance } = await import('@duckdb/node-api');
    const connection = await (await DuckDBInstance.create(':memory:')).connect();
    const path = join(folder, 'finish.parquet');
    // Distinct readings (no dictionary), one row group, pages large enough to be streamed.
    await connection.run(`CREATE TABLE pumps AS SELECT (i * 0.37 + 1e-3 * (i % 7))::DOUBLE AS reading FROM range(300000) t(i)`);
    await connection.run(`COPY pumps TO '${path}' (FORMAT parquet, COMPRESSION snappy, ROW_GROUP_SIZE 10000000)`);
    const expected = (await connection.runAndReadAll(`SELECT reading FROM read_parquet('${path}')`)).getRows().map((row) => Number(row[0]));
    connection.closeSync();
    const bytes = new Uint8Array(readFileSync(path));
    const metadata = parquetMetadata(bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer);
    const group = metadata.row_groups[0]!;
    assert.equal(metadata.row_groups.length, 1);
    const source = memorySource('finish.parquet', bytes);
    const read = async (cursor: FlatColumnCursor, rows: number): Promise<number[]> => {
      const values: number[] = [];
      while (values.length < rows) {
        const piece = await cursor.next(rows - values.length);
        assert.equal(piece.levels, null);
        for (let i = 0; i < piece.rows; i++) values.push(Number(piece.values![piece.valueStart + i]));
      }
      return values;
    };
    const buffers = new ColumnBuffers();
    // A first look: the first 1 000 rows, then the caller is done.
    const first = FlatColumnCursor.open(source, metadata, group, 'reading', compressors, DEFAULT_PARQUET_TUNING, undefined, buffers)!;
    assert.deepEqual(await read(first, 1000), expected.slice(0, 1000));
    assert.equal(buffers.window, null, 'the window is the cursor\'s while it reads');
    first.finish();
    const window = buffers.window as Uint8Array | null; // (read back after the assertion above narrowed it)
    assert.ok(window && window.length > 0, 'finishing hands the read window back');
    assert.ok((buffers.snappy as Uint8Array | null)?.length, 'and the streamed page\'s decompression buffer');
    // The next pass reads the whole chunk in that memory, from its start.
    const second = FlatColumnCursor.open(source, metadata, group, 'reading', compressors, DEFAULT_PARQUET_TUNING, undefined, buffers)!;
    assert.equal(buffers.window, null, 'the next cursor took the window');
    assert.deepEqual(await read(second, expected.length), expected);
    assert.equal(buffers.window, window, 'and gave the same memory back at the chunk\'s end');
  });
});
