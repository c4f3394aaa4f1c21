/**
 * The parallel row passes on real worker threads (src/node/parallelScan.ts, its worker bundled from
 * the current sources into a temporary folder): a file analysed by two and by three workers gives
 * the single-thread report; cancelling stops the workers; a reader error comes back with the line
 * a single thread reports. Invented pump-fleet data written into os.tmpdir().
 */
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { createHash } from 'node:crypto';
import { analyze } from '../../src/core/analyze';
import { DataError } from '../../src/core/errors';
import type { FitOptions, FitReport } from '../../src/core/types';
import { openFileSource } from '../../src/node/fileSource';
import { createParallelScanner } from '../../src/node/parallelScan';
import { removeScratchFolder, useScratchFolder } from '../../src/node/scratchFiles';
import type { FirstWorkerResult } from '../../src/core/parallel/rangeScanner';
import { pumpTable, toCsv, writeTemporary } from './generatedTables';
import { assertSameReport } from './reportComparison';

const REPOSITORY = resolve(__dirname, '..', '..', '..');

/** Bundles the scan worker as esbuild.mjs does, so the test runs the current sources. */
function buildWorker(folder: string): string {
  const outfile = join(folder, 'scanWorker.js');
  const script = `require('esbuild').build({ entryPoints: ['src/node/parallelScanWorker.ts'], bundle: true, platform: 'node', format: 'cjs', target: 'node20', outfile: ${JSON.stringify(outfile)}, logLevel: 'error' }).catch(() => process.exit(1))`;
  const run = spawnSync(process.execPath, ['-e', script], { cwd: REPOSITORY, encoding: 'utf8' });
  if (run.status !== 0) throw new Error(`Building the scan worker failed:\n${run.stderr}`);
  return outfile;
}

/**
 * jobs: each pass's kind × share count; rowsPerThread: for each pass 1, the rows each thread (the
 * workers, then the calling thread) put into its moments.
 */
async function fitFile(path: string, options: Partial<FitOptions>, workers: number, workerScript: string, signal?: AbortSignal, jobs?: string[], rowsPerThread?: number[][]): Promise<FitReport> {
  const source = await openFileSource(path);
  const scanner = workers > 1 ? createParallelScanner(path, source.name, { workers, minimumBytes: 0, rangeBytes: 24 * 1024, workerScript }) : undefined;
  if (scanner && jobs) {
    const run = scanner.run.bind(scanner);
    scanner.run = async (job, count, ...rest) => {
      jobs.push(`${job.kind}×${count}`);
      const results = await run(job, count, ...rest);
      if (job.kind === 'first') rowsPerThread?.push((results as FirstWorkerResult[]).map((r) => r.moments.classes.reduce((sum, c) => sum + c.count, 0)));
      return results;
    };
  }
  try {
    return (await analyze(source, options, { ...(scanner ? { scanner } : {}), ...(signal ? { signal } : {}) })).report;
  } finally {
    await scanner?.close();
    await source.close();
  }
}

describe('parallel row passes on worker threads', function () {
  this.timeout(120000);
  let folder: string;
  let workerScript: string;
  let file: string;

  before(() => {
    folder = mkdtempSync(join(tmpdir(), 'scatterwise-parallel-'));
    workerScript = buildWorker(folder);
    file = writeTemporary('fleet.csv', toCsv(pumpTable([2500, 1800, 3100], 8, 17)));
  });
  after(() => rmSync(folder, { recursive: true, force: true }));

  /** The CSV as Parquet in one row group, written by DuckDB (npm @duckdb/node-api, a dev dependency), with a column `coarse` of few distinct values. */
  async function oneGroupParquet(parquet: string): Promise<string> {
    const { DuckDBInstance } = await import('@duckdb/node-api');
    const connection = await (await DuckDBInstance.create(':memory:')).connect();
    await connection.run(`COPY (SELECT *, round(feature_1 * 4, 0) AS coarse FROM read_csv('${file}', header = true)) TO '${parquet}' (FORMAT parquet, COMPRESSION snappy, ROW_GROUP_SIZE 1000000)`);
    connection.closeSync();
    return parquet;
  }

  it('two and three workers give the single-thread report (leave-one-out and k-fold)', async () => {
    const before = createHash('sha256').update(readFileSync(file)).digest('hex');
    const modified = statSync(file).mtimeMs;
    for (const cv of ['loo', 'kfold:5'] as const) {
      const single = await fitFile(file, { cv, plotBudget: 2000 }, 1, workerScript);
      for (const workers of [2, 3]) assertSameReport(single, await fitFile(file, { cv, plotBudget: 2000 }, workers, workerScript));
    }
    assert.equal(createHash('sha256').update(readFileSync(file)).digest('hex'), before, 'the data file is unchanged');
    assert.equal(statSync(file).mtimeMs, modified);
  });

  it('a Parquet file of one row group: two and three workers, each a run of its rows, give the single-thread report', async () => {
    // `coarse` has few distinct values, so it is dictionary-encoded and its dictionary is shared.
    const parquet = await oneGroupParquet(join(folder, 'fleet.parquet'));
    const single = await fitFile(parquet, { cv: 'kfold:5', plotBudget: 2000 }, 1, workerScript);
    assert.equal(single.rows.total, 7400);
    for (const workers of [2, 3]) {
      const jobs: string[] = [];
      const rowsPerThread: number[][] = [];
      assertSameReport(single, await fitFile(parquet, { cv: 'kfold:5', plotBudget: 2000 }, workers, workerScript, undefined, jobs, rowsPerThread));
      assert.deepEqual(jobs, ['first', 'folds', 'second'].map((kind) => `${kind}×${workers}`));
      // As many runs as threads: each thread reads one (none holds two while another waits).
      assert.equal(rowsPerThread.length, 1);
      assert.equal(rowsPerThread[0]!.length, workers);
      for (const rows of rowsPerThread[0]!) assert.ok(rows >= Math.floor(7400 / workers) - 1 && rows <= Math.ceil(7400 / workers) + 1, `rows per thread ${rowsPerThread[0]!.join(', ')}`);
    }
  });

  it('a Parquet file of one row group spilled to scratch files: each thread spills its run once, and the report is the single-thread one', async () => {
    // `coarse` is dictionary-encoded. The limits are lowered so that this small file spills (the
    // defaults: dictionaries of 32 MiB, runs of 131 072 rows).
    const parquet = await oneGroupParquet(join(folder, 'fleet-spilled.parquet'));
    const single = await fitFile(parquet, { cv: 'kfold:5', plotBudget: 2000 }, 1, workerScript);
    const scratch = join(folder, 'scratch');
    useScratchFolder(scratch, { dictionaryBytes: 1, minRows: 100 });
    try {
      const jobs: string[] = [];
      assertSameReport(single, await fitFile(parquet, { cv: 'kfold:5', plotBudget: 2000 }, 2, workerScript, undefined, jobs));
      assert.deepEqual(jobs, ['first×2', 'folds×2', 'second×2']);
      // Two runs, one file each, written by the first pass and read by the folds and the second.
      const files = readdirSync(scratch).sort();
      assert.equal(files.length, 2, files.join(', '));
      for (const name of files) assert.match(name, /^parquet-[0-9a-f]{8}-g0-r\d+-\d+\.f64$/);
      assert.deepEqual(files.map((name) => Number(/-r(\d+)-/.exec(name)![1])).sort((a, b) => a - b), [0, 3700]);
      // One spilled column (coarse) × 3 700 rows × 8 bytes each.
      for (const name of files) assert.equal(statSync(join(scratch, name)).size, 3700 * 8);
      // One thread alone spills the whole group.
      assertSameReport(single, await fitFile(parquet, { cv: 'kfold:5', plotBudget: 2000 }, 1, workerScript));
      assert.equal(readdirSync(scratch).length, 3);
    } finally {
      useScratchFolder(null);
      removeScratchFolder(scratch);
    }
  });

  it('a cancelled analysis rejects with CancelledError', async () => {
    const abort = new AbortController();
    const running = fitFile(file, {}, 2, workerScript, abort.signal);
    setTimeout(() => abort.abort(), 50);
    await assert.rejects(running, (error: Error) => error.name === 'CancelledError');
  });

  it('a reader error in a worker is reported with the line one thread reports', async () => {
    const lines = toCsv(pumpTable([1500, 1500, 1500], 4, 3)).split('\n');
    lines[3000] = `${lines[3000]!.split(',').slice(0, 3).join(',')}`;
    const broken = writeTemporary('broken.csv', lines.join('\n'));
    const errorOf = async (workers: number): Promise<DataError> => {
      try {
        await fitFile(broken, {}, workers, workerScript);
      } catch (error) {
        assert.ok(error instanceof DataError, String(error));
        return error;
      }
      assert.fail('a short row must fail');
    };
    const single = await errorOf(1);
    const parallel = await errorOf(2);
    assert.equal(single.where.line, 3001);
    assert.equal(parallel.message, single.message);
  });
});
