/**
 * Delimited text, well-formed: dialect and header guessing, column names and summaries, missing
 * tokens, comments, byte-range scans, progress and cancellation. Invented pump-fleet data.
 */
import { strict as assert } from 'node:assert';
import { CancelledError } from '../../../src/core/errors';
import { formatFromName, inspectTable, scanTable } from '../../../src/core/read/index';
import { inspectDelimitedText } from '../../../src/core/read/textInspect';
import { DEFAULT_TEXT_TUNING } from '../../../src/core/read/textOptions';
import { scanDelimitedText } from '../../../src/core/read/textScan';
import type { ReadOptions, ScanPlan, TableInspection } from '../../../src/core/read/types';
import { memorySource, type ByteSource, type Progress } from '../../../src/core/source';
import { TableCollector } from './referenceTable';

const encoder = new TextEncoder();
const textSource = (name: string, text: string): ByteSource => memorySource(name, encoder.encode(text));

const FAULTS = ['healthy', 'bearing wear', 'cavitation', 'impeller imbalance', 'seal leak'];

/** A pump table: `rows` rows of rms velocity, kurtosis, acoustic level and the fault. */
function pumpTable(rows: number, delimiter = ',', decimal = '.'): string {
  const lines = [['vibration_rms', 'kurtosis', 'acoustic_db', 'fault'].join(delimiter)];
  for (let r = 0; r < rows; r++) {
    const number = (value: number): string => value.toFixed(3).replace('.', decimal);
    lines.push([number(1 + (r % 7) * 0.25), number(3 + (r % 5) * 0.5), number(60 + (r % 11)), FAULTS[r % FAULTS.length]].join(delimiter));
  }
  return lines.join('\n') + '\n';
}

async function collect(source: ByteSource, inspection: TableInspection, plan: ScanPlan, range?: { start: number; end: number }) {
  const collector = new TableCollector();
  const summary = await scanTable({ source, inspection, plan, onBatch: collector.onBatch, range });
  return { table: collector.finish(summary), summary };
}

describe('delimited text: reading', function () {
  // Real I/O and long generated inputs on a shared 2-core machine: mocha's 2 s default is too tight.
  this.timeout(120_000);

  describe('dialect', () => {
    for (const [delimiter, name] of [[',', 'comma'], ['\t', 'tab'], [';', 'semicolon'], ['|', 'pipe']] as const) {
      it(`sniffs the ${name} delimiter and the header`, async () => {
        const inspection = await inspectTable(textSource('pumps.txt', pumpTable(30, delimiter)));
        assert.equal(inspection.delimiter, delimiter);
        assert.equal(inspection.header, true);
        assert.equal(inspection.format, delimiter === '\t' ? 'tsv' : 'csv');
        assert.deepEqual(inspection.columns.map((column) => column.name), ['vibration_rms', 'kurtosis', 'acoustic_db', 'fault']);
        assert.deepEqual(inspection.columns.map((column) => column.kind), ['numeric', 'numeric', 'numeric', 'text']);
      });
    }

    it('reads decimal commas with a semicolon delimiter when asked', async () => {
      const source = textSource('pumps.csv', pumpTable(10, ';', ','));
      const inspection = await inspectTable(source, { decimalComma: true });
      assert.equal(inspection.delimiter, ';');
      const { table } = await collect(source, inspection, { label: 3, features: [0, 1] });
      assert.deepEqual(table.values.slice(0, 4), [1, 3, 1.25, 3.5]);
    });

    it('takes a first row of numbers as data, naming the columns by position', async () => {
      const source = textSource('plain.csv', '1.5,2,ok\n2.5,3,worn\n');
      const inspection = await inspectTable(source);
      assert.equal(inspection.header, false);
      assert.deepEqual(inspection.columns.map((column) => column.name), ['column_1', 'column_2', 'column_3']);
      const { table } = await collect(source, inspection, { label: 2, features: [0, 1] });
      assert.deepEqual(table.values, [1.5, 2, 2.5, 3]);
      assert.deepEqual(table.lines, [1, 2]);
    });

    it('makes repeated and blank header names unique, with notes that the scan repeats', async () => {
      const source = textSource('dup.csv', 'rms,rms,,rms_2,fault\n1,2,3,4,ok\n');
      const inspection = await inspectTable(source);
      assert.deepEqual(inspection.columns.map((column) => column.name), ['rms', 'rms_3', 'column_3', 'rms_2', 'fault']);
      const codes = (inspection.notes ?? []).map((note) => note.code);
      assert.deepEqual(codes, ['duplicate-column-names', 'blank-column-names']);
      assert.match(inspection.notes![0].message, /"rms" at positions 1 and 2/);
      const { summary } = await collect(source, inspection, { label: 4, features: [0] });
      assert.deepEqual(summary.notes.map((note) => note.code), codes);
    });

    it('honours the header and delimiter options over the guesses', async () => {
      const source = textSource('forced.csv', 'a;b,c\n1;2,3\n');
      const inspection = await inspectTable(source, { delimiter: ';', header: false });
      assert.equal(inspection.header, false);
      assert.deepEqual(inspection.columns.map((column) => column.name), ['column_1', 'column_2']);
    });
  });

  describe('cells', () => {
    it('reads missing tokens, infinities and non-numeric cells, and reports examples with row and line', async () => {
      const text = 'x,y,fault\n1,NA,ok\n,Inf,ok\n?,-inf,worn\nn/a,oops,worn\n"2.5",1e3,NA\n';
      const source = textSource('cells.csv', text);
      const inspection = await inspectTable(source);
      const { table, summary } = await collect(source, inspection, { label: 2, features: [0, 1] });
      assert.deepEqual(table.values, [1, NaN, NaN, Infinity, NaN, -Infinity, NaN, NaN, 2.5, 1000]);
      assert.deepEqual(table.labelIds, [0, 0, 1, 1, -1]);
      assert.deepEqual(summary.nonNumeric, [1, 1]);
      assert.deepEqual(summary.nonNumericExamples, [[{ row: 3, line: 5, text: 'n/a' }], [{ row: 3, line: 5, text: 'oops' }]]);
      // 2 numbers among 3 present cells: below the 90% that makes a column numeric.
      assert.deepEqual(inspection.columns[0], { name: 'x', index: 0, kind: 'text', distinct: 3, integral: false, missing: 2 });
    });

    it('uses the caller’s missing tokens instead of the default ones', async () => {
      const source = textSource('tokens.csv', 'x,fault\n-999,ok\nNA,ok\n');
      const inspection = await inspectTable(source, { missingTokens: ['-999'] });
      const { table, summary } = await collect(source, inspection, { label: 1, features: [0] });
      assert.deepEqual(table.values, [NaN, NaN]);
      assert.deepEqual(summary.nonNumeric, [1]);
    });

    it('gives every row the label -1 when the label column is entirely missing', async () => {
      const source = textSource('nolabel.csv', 'x,fault\n1,\n2,NA\n3,\n');
      const inspection = await inspectTable(source);
      const { table, summary } = await collect(source, inspection, { label: 1, features: [0] });
      assert.deepEqual(table.labelIds, [-1, -1, -1]);
      assert.deepEqual(summary.labels, []);
      assert.equal(inspection.columns[1].kind, 'empty');
    });

    it('skips comment lines only when a comment marker is given', async () => {
      const text = '# pump survey\nx,fault\n1,ok\n# calibration pause\n2,worn\n';
      const withComments = textSource('commented.csv', text);
      const inspection = await inspectTable(withComments, { comment: '#' });
      const { table } = await collect(withComments, inspection, { label: 1, features: [0] });
      assert.deepEqual(table.values, [1, 2]);
      assert.deepEqual(table.lines, [3, 5]);
      const plain = await inspectTable(textSource('commented.csv', text), { skipRaggedRows: true });
      assert.equal(plain.columns[0].name, '# pump survey');
    });

    it('reads a BOM, CRLF line ends, blank and trailing empty lines', async () => {
      const source = textSource('windows.csv', '\uFEFFx,fault\r\n1,ok\r\n\r\n2,worn\r\n\r\n\r\n');
      const inspection = await inspectTable(source);
      assert.equal(inspection.columns[0].name, 'x');
      const { table } = await collect(source, inspection, { label: 1, features: [0] });
      assert.deepEqual(table.values, [1, 2]);
      assert.deepEqual(table.lines, [2, 4]);
      assert.deepEqual(table.labels, ['ok', 'worn']);
    });
  });

  describe('inspection', () => {
    it('estimates the row count of a long file from its head, and is exact for a short one', async () => {
      const text = pumpTable(20_000);
      const source = textSource('long.csv', text);
      const inspection = await inspectDelimitedText(source, 'csv', {}, undefined, { ...DEFAULT_TEXT_TUNING, headBytes: 8192 });
      assert.ok(Math.abs(inspection.estimatedRows - 20_000) < 400, `estimated ${inspection.estimatedRows}`);
      assert.ok(inspection.sampledRows < 1000);
      assert.equal((await inspectTable(textSource('short.csv', pumpTable(10)))).estimatedRows, 10);
    });

    it('says the file is not splittable when a quoted field holds a line break', async () => {
      assert.equal((await inspectTable(textSource('split.csv', pumpTable(5)))).splittable, true);
      assert.equal((await inspectTable(textSource('nosplit.csv', 'x,note\n1,"two\nlines"\n'))).splittable, false);
    });

    it('names formats from file names', () => {
      assert.equal(formatFromName('pumps.CSV'), 'csv');
      assert.equal(formatFromName('dir.v2/pumps.tsv'), 'tsv');
      assert.equal(formatFromName('pumps.tab'), 'tsv');
      assert.equal(formatFromName('REF:data/pumps.parquet'), 'parquet');
      assert.equal(formatFromName('pumps'), undefined);
      assert.equal(formatFromName('pumps.csv.gz'), undefined);
    });
  });

  describe('byte-range scans', () => {
    it('cover every row exactly once, with absolute rows and lines, wherever the cuts fall', async () => {
      const text = '# survey\n' + pumpTable(500).replace(/\n(?=3\.)/g, '\n\n# pause\n');
      const source = textSource('ranges.csv', text);
      const options: ReadOptions = { comment: '#' };
      const inspection = await inspectTable(source, options);
      assert.equal(inspection.splittable, true);
      const plan = { label: 3, features: [0, 1, 2] };
      const whole = (await collect(source, inspection, plan)).table;
      for (const parts of [2, 3, 7]) {
        const cuts = [0, ...Array.from({ length: parts - 1 }, (_, i) => Math.floor(((i + 1) * text.length) / parts) + (i % 3) - 1), source.size];
        const rows: number[] = [];
        const lines: number[] = [];
        const values: number[] = [];
        const labels: string[] = [];
        for (let i = 0; i < parts; i++) {
          const { table } = await collect(source, inspection, plan, { start: cuts[i], end: cuts[i + 1] });
          rows.push(...table.rows);
          lines.push(...table.lines);
          values.push(...table.values);
          labels.push(...table.labelIds.map((id) => table.labels[id]));
        }
        assert.deepEqual(rows, whole.rows, `${parts} parts`);
        assert.deepEqual(lines, whole.lines, `${parts} parts`);
        assert.deepEqual(values, whole.values, `${parts} parts`);
        assert.deepEqual(labels, whole.labelIds.map((id) => whole.labels[id]), `${parts} parts`);
      }
    });
  });

  describe('progress and cancellation', () => {
    it('reports progress at most every ~1% and ends at the total, under the caller’s pass name', async () => {
      const source = textSource('progress.csv', pumpTable(50_000));
      const inspection = await inspectTable(source);
      const events: Progress[] = [];
      await scanDelimitedText(
        { source, inspection, plan: { label: 3, features: [0] }, onBatch: () => {}, pass: 'moments', control: { onProgress: (progress) => events.push(progress) } },
        { ...DEFAULT_TEXT_TUNING, chunkBytes: 4096 },
      );
      assert.ok(events.length >= 50 && events.length <= 110, `${events.length} events`);
      assert.ok(events.every((event) => event.pass === 'moments' && event.bytesTotal === source.size));
      for (let i = 1; i < events.length; i++) assert.ok(events[i].bytesRead > events[i - 1].bytesRead);
      assert.equal(events[events.length - 1].bytesRead, source.size);
    });

    it('stops with CancelledError when the signal aborts', async () => {
      const source = textSource('cancel.csv', pumpTable(50_000));
      const inspection = await inspectTable(source);
      const controller = new AbortController();
      let batches = 0;
      await assert.rejects(
        scanDelimitedText(
          {
            source,
            inspection,
            plan: { label: 3, features: [0] },
            onBatch: () => {
              if (++batches === 2) controller.abort();
            },
            control: { signal: controller.signal },
          },
          { ...DEFAULT_TEXT_TUNING, chunkBytes: 4096, batchRows: 100 },
        ),
        CancelledError,
      );
      assert.ok(batches < 10, `${batches} batches after the abort`);
      controller.abort();
      await assert.rejects(inspectTable(source, {}, { signal: controller.signal }), CancelledError);
    });

    it('hands batches of at most batchRows rows whose arrays are reused', async () => {
      const source = textSource('batches.csv', pumpTable(1000));
      const inspection = await inspectTable(source);
      const arrays = new Set<ArrayBufferLike>();
      let rows = 0;
      await scanDelimitedText(
        {
          source,
          inspection,
          plan: { label: 3, features: [0, 1] },
          onBatch: (batch) => {
            assert.ok(batch.rows <= 64);
            assert.equal(batch.values.length, 2 * batch.rows);
            assert.equal(batch.firstRow, rows);
            rows += batch.rows;
            arrays.add(batch.values.buffer);
          },
        },
        { ...DEFAULT_TEXT_TUNING, batchRows: 64 },
      );
      assert.equal(rows, 1000);
      assert.equal(arrays.size, 1);
    });
  });
});
