/**
 * The analysis with its row passes split over several workers gives the single-thread report:
 * counts exactly (rows, confusion matrices, misclassified rows, the plot sample's rows, findings),
 * moments and what follows from them to rounding. The workers here take turns in this thread
 * (inProcessScanner: the same jobs, ranges and merges as the worker threads, with every message
 * passed through structuredClone); parallelScan.test.ts runs the real threads.
 */
import { strict as assert } from 'node:assert';
import { analyze } from '../../src/core/analyze';
import type { AnalysisControl } from '../../src/core/analyze';
import { DataError } from '../../src/core/errors';
import { FoldAssigner } from '../../src/core/folds';
import { inProcessScanner } from '../../src/core/parallel/inProcessScanner';
import type { RangeScanner } from '../../src/core/parallel/rangeScanner';
import type { ScoreBatch } from '../../src/core/pipeline/secondPass';
import type { ByteSource } from '../../src/core/source';
import type { FitOptions, FitReport } from '../../src/core/types';
import { parquetWriteBuffer } from 'hyparquet-writer';
import { memorySource } from '../../src/core/source';
import { openFileSource } from '../../src/node/fileSource';
import { addColumn, pumpTable, sourceOf, toCsv, uniform, writeTemporary } from './generatedTables';
import { assertClose, assertSameReport } from './reportComparison';

/** The scanner, recording the kind of each job it runs and how many ranges each had. */
function recording(scanner: RangeScanner): RangeScanner & { jobs: string[] } {
  const jobs: string[] = [];
  return {
    workers: scanner.workers,
    minimumBytes: scanner.minimumBytes,
    ...(scanner.rangeBytes !== undefined ? { rangeBytes: scanner.rangeBytes } : {}),
    jobs,
    run(job, count, task, onPart, control) {
      jobs.push(`${job.kind}×${count}`);
      return scanner.run(job, count, task, onPart, control);
    },
  };
}

let lastJobs: string[] = [];

async function both(text: string, options: Partial<FitOptions>, workers: number, rangeBytes: number, control: AnalysisControl = {}): Promise<[FitReport, FitReport]> {
  const source = sourceOf(text);
  const single = (await analyze(source, options, control)).report;
  const scanner = recording(inProcessScanner(source, { workers, rangeBytes }));
  const parallel = (await analyze(source, options, { ...control, scanner })).report;
  lastJobs = scanner.jobs;
  return [single, parallel];
}

/** The jobs of the last parallel run, without range counts, and that each had several ranges. */
function jobKinds(): string[] {
  for (const job of lastJobs) assert.ok(Number(job.split('×')[1]) > 2, `${job}: several ranges`);
  return lastJobs.map((job) => job.split('×')[0]!);
}

/** A pump table with planted defects: missing cells, a non-numeric cell, a duplicated row, an infinite value. */
function defectiveTable(rows: number, seed: number): string {
  const third = Math.floor(rows / 3);
  let table = pumpTable([third, third, rows - 2 * third], 5, seed);
  const draw = uniform(seed + 1);
  table = addColumn(table, 'spare_channel', () => (draw() < 0.02 ? 'NA' : (draw() * 10).toFixed(3)));
  const lines = table.rows;
  lines[17]![2] = 'n/a?';
  lines[Math.floor(rows / 2)]![3] = '';
  lines[rows - 5]![1] = 'Inf';
  lines.splice(rows - 40, 0, [...lines[rows - 200]!]);
  return toCsv(table);
}

describe('parallel analysis: the same report as one thread', function () {
  this.timeout(60000);

  it('leave-one-out, planted defects, 3 workers over many small ranges', async () => {
    const text = defectiveTable(3000, 11);
    const [single, parallel] = await both(text, { cv: 'loo' }, 3, 4096);
    assert.ok(single.findings.some((f) => f.code === 'duplicate-rows'), 'the planted duplicate row is found');
    assert.ok(single.findings.some((f) => f.code === 'non-numeric-cells'));
    assertSameReport(single, parallel);
    assert.deepEqual(jobKinds(), ['first', 'second']);
  });

  it('reads a file through one source shared by the workers (a source may reuse its read buffer)', async () => {
    const path = writeTemporary('fleet.csv', toCsv(pumpTable([2000, 1500, 2500], 6, 13)));
    const source = await openFileSource(path);
    try {
      const single = (await analyze(source, { cv: 'kfold:4' })).report;
      const scanner = recording(inProcessScanner(source, { workers: 3, rangeBytes: 16 * 1024 }));
      const parallel = (await analyze(source, { cv: 'kfold:4' }, { scanner })).report;
      lastJobs = scanner.jobs;
      assertSameReport(single, parallel);
      assert.deepEqual(jobKinds(), ['first', 'folds', 'second']);
    } finally {
      await source.close();
    }
  });

  it('Parquet: shares of whole row groups, or runs of rows inside few groups; rows numbered in the file', async () => {
    const table = pumpTable([900, 700, 1100], 5, 19);
    const columnOf = (j: number, type: 'DOUBLE' | 'STRING') => ({
      name: table.header[j]!,
      type,
      data: table.rows.map((row) => (type === 'DOUBLE' ? Number(row[j]) : row[j]!)),
    });
    const columnData = table.header.map((name, j) => columnOf(j, name.startsWith('feature') ? 'DOUBLE' : 'STRING'));
    // 11 groups: whole groups; 2 groups for 3 workers: each in 3 runs; one group: 3 runs sharing its dictionaries.
    for (const [rowGroupSize, shares] of [
      [250, 11],
      [1500, 6],
      [100_000, 3],
    ] as const) {
      const bytes = new Uint8Array(parquetWriteBuffer({ columnData, rowGroupSize }));
      const source = memorySource('fleet.parquet', bytes);
      const single = (await analyze(source, { cv: 'kfold:5' })).report;
      const scanner = recording(inProcessScanner(source, { workers: 3 }));
      const parallel = (await analyze(source, { cv: 'kfold:5' }, { scanner })).report;
      lastJobs = scanner.jobs;
      assertSameReport(single, parallel);
      assert.deepEqual(lastJobs, ['first', 'folds', 'second'].map((kind) => `${kind}×${shares}`));
    }
  });

  it('k-fold cross-validation: folds continue across ranges', async () => {
    const text = toCsv(pumpTable([700, 500, 900], 6, 5));
    for (const cv of ['kfold:5', 'kfold:10'] as const) {
      const [single, parallel] = await both(text, { cv }, 2, 3000);
      assert.equal(single.accuracy.crossValidated?.method, cv);
      assertSameReport(single, parallel);
      assert.deepEqual(jobKinds(), ['first', 'folds', 'second']);
    }
  });

  it('drop-columns policy re-runs pass 1 without the columns that have missing cells', async () => {
    const text = defectiveTable(2400, 21);
    const [single, parallel] = await both(text, { missing: 'drop-columns', cv: 'kfold:4' }, 3, 5000);
    assert.ok(single.findings.some((f) => f.code === 'missing-values' && f.message.includes('spare_channel')));
    assertSameReport(single, parallel);
    assert.deepEqual(jobKinds(), ['first', 'first', 'folds', 'second']);
  });

  it('the plot sample, cut to a budget, is the same rows in the same order', async () => {
    const text = toCsv(pumpTable([1000, 400, 1200], 3, 3));
    const [single, parallel] = await both(text, { plotBudget: 777 }, 3, 3333);
    assert.equal(single.sample.rows.length, 777);
    assertSameReport(single, parallel);
    assert.deepEqual(jobKinds(), ['first', 'second']);
  });

  it('scores reach the caller in file order, one per data row', async () => {
    const text = defectiveTable(1500, 31);
    const collect = (): { batches: ScoreBatch[]; control: AnalysisControl } => {
      const batches: ScoreBatch[] = [];
      return { batches, control: { onScores: (b) => batches.push({ ...b, scores: Float64Array.from(b.scores) }) } };
    };
    const source = sourceOf(text);
    const one = collect();
    const many = collect();
    await analyze(source, {}, one.control);
    await analyze(source, {}, { ...many.control, scanner: inProcessScanner(source, { workers: 3, rangeBytes: 4000 }) });
    const flat = (batches: ScoreBatch[]): { rows: number[]; scores: number[] } => {
      const rows: number[] = [];
      const scores: number[] = [];
      for (const b of batches) for (let i = 0; i < b.rows; i++) {
        rows.push(b.firstRow + i);
        for (let j = 0; j < b.k; j++) scores.push(b.scores[i * b.k + j]!);
      }
      return { rows, scores };
    };
    const a = flat(one.batches);
    const b = flat(many.batches);
    assert.deepEqual(b.rows, a.rows);
    assert.deepEqual(a.rows, Array.from({ length: a.rows.length }, (_, i) => i));
    assertClose(b.scores, a.scores, 'scores');
  });

  it('a reader error in a late range is reported as one thread reports it (real line)', async () => {
    const lines = toCsv(pumpTable([500, 500, 500], 3, 2)).split('\n');
    lines[1200] = `${lines[1200]},extra`;
    const text = lines.join('\n');
    const errorOf = async (control: AnalysisControl): Promise<DataError> => {
      try {
        await analyze(sourceOf(text), {}, control);
      } catch (error) {
        assert.ok(error instanceof DataError);
        return error;
      }
      assert.fail('a ragged row must fail');
    };
    const single = await errorOf({});
    const parallel = await errorOf({ scanner: inProcessScanner(sourceOf(text), { workers: 2, rangeBytes: 2000 }) });
    assert.equal(single.where.line, 1201);
    assert.equal(parallel.message, single.message);
    assert.deepEqual(parallel.where, single.where);
  });

  it('skipped ragged rows give the same counts and note', async () => {
    const lines = toCsv(pumpTable([300, 300, 300], 3, 4)).split('\n');
    lines[700] = `${lines[700]},extra`;
    const [single, parallel] = await both(lines.join('\n'), { read: { skipRaggedRows: true } }, 2, 2000);
    assert.equal(single.rows.droppedRagged, 1);
    assertSameReport(single, parallel);
    assert.deepEqual(jobKinds(), ['first'], 'pass 1 saw the skipped row and left the file to one thread');
  });

  it('is cancelled by its signal', async () => {
    const text = toCsv(pumpTable([2000, 2000, 2000], 4, 8));
    const source: ByteSource = sourceOf(text);
    const abort = new AbortController();
    const running = analyze(source, {}, {
      signal: abort.signal,
      scanner: inProcessScanner(source, { workers: 2, rangeBytes: 4096 }),
      onProgress: (p) => {
        if (p.pass === 'moments' && p.bytesRead > 0) abort.abort();
      },
    });
    await assert.rejects(running, (error: Error) => error.name === 'CancelledError');
  });
});

describe('FoldAssigner.skip: a later range continues the fold sequence', () => {
  it('equals calling foldOf that many times, at every offset and block phase', () => {
    for (const kFolds of [2, 3, 5, 10]) {
      for (const seed of [0, 1, 12345]) {
        const reference = new FoldAssigner(kFolds, seed);
        const folds: number[] = [];
        for (let j = 0; j < 60; j++) folds.push(reference.foldOf(1));
        for (let start = 0; start <= 40; start += 1) {
          for (const hop of [0, 1, kFolds - 1, kFolds, 2 * kFolds + 1]) {
            const skipped = new FoldAssigner(kFolds, seed);
            skipped.skip(1, start);
            skipped.skip(1, hop);
            const rest: number[] = [];
            for (let j = start + hop; j < 60; j++) rest.push(skipped.foldOf(1));
            assert.deepEqual(rest, folds.slice(start + hop), `k=${kFolds} seed=${seed} start=${start} hop=${hop}`);
          }
        }
      }
    }
  });

  it('skips after some rows were assigned, and leaves other classes alone', () => {
    const reference = new FoldAssigner(7, 3);
    const expected: number[] = [];
    for (let j = 0; j < 100; j++) expected.push(reference.foldOf(0));
    const other = new FoldAssigner(7, 3);
    const got: number[] = [];
    for (let j = 0; j < 9; j++) got.push(other.foldOf(0));
    other.skip(0, 50);
    other.skip(2, 1000);
    for (let j = 59; j < 100; j++) got.push(other.foldOf(0));
    assert.deepEqual(got, [...expected.slice(0, 9), ...expected.slice(59)]);
  });
});
