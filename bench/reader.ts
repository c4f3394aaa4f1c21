/**
 * Reader benchmark (not a unit test). Generates a numeric CSV — 20 float features printed with 6
 * significant digits (two of every eight in exponent form), 5 string labels, one quoted with a
 * comma inside — of `--mb N` megabytes (default 1024) into the git-ignored `bench-data/`, and two
 * Parquet copies written by DuckDB: with its default row groups (122 880 rows) and in one huge row
 * group (the worst case for memory). Then, alternating over `--rounds R`
 * rounds (default 3), each measurement in a child process of its own (so its peak RSS is its own,
 * from process.resourceUsage().maxRSS):
 *   floor      Node reads the file in 4 MiB chunks and counts line feeds (Buffer.indexOf)
 *   csv-parse  csv-parse 7 streaming with cast: true, records counted
 *   scan       our inspectTable + scanTable feeding per-class moments (MomentsAccumulator)
 *   parquet    our Parquet scan of the copy feeding the same moments (MB/s of the CSV's size)
 *   parquet-1  the same on the one-row-group copy
 * (`--skip-parquet` leaves the Parquet runs out) and prints medians with the targets: scan ≥ 50% of the floor, ≥ 4× csv-parse, peak RSS < 200 MB;
 * parquet ≥ scan, and under 200 MB for both Parquet copies.
 *
 *   node esbuild.mjs && node out/bench/reader.js --mb 50        (quick, for CI)
 */
import { spawnSync } from 'node:child_process';
import { closeSync, createReadStream, existsSync, mkdirSync, openSync, readSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { parse } from 'csv-parse';
import { MomentsAccumulator } from '../src/core/moments';
import { inspectTable, scanTable } from '../src/core/read/index';
import { openFileSource } from '../src/node/fileSource';
import { PUMP_FAULTS, writePumpCsv } from './pumpTable';

const FEATURES = 20;
const LABELS = PUMP_FAULTS.slice(0, 5);
const KINDS = ['floor', 'csv-parse', 'scan', 'parquet', 'parquet-1'] as const;
type Kind = (typeof KINDS)[number];

interface Measurement {
  kind: Kind;
  seconds: number;
  rows: number;
  maxRssBytes: number;
}

function argument(name: string, fallback: string): string {
  const at = process.argv.indexOf(`--${name}`);
  return at >= 0 && at + 1 < process.argv.length ? process.argv[at + 1] : fallback;
}

/** Writes the CSV: the benchmarks' pump table (pumpTable.ts), 20 features and 5 classes. */
function generateCsv(path: string, bytes: number): void {
  writePumpCsv(path, { features: FEATURES, classes: LABELS.length, bytes });
}

/** The Parquet copies: DuckDB's default row groups, and one row group for the whole table. */
const parquetPaths = (csv: string): { parquet: string; oneGroup: string } => ({
  parquet: csv.replace(/\.csv$/, '.parquet'),
  oneGroup: csv.replace(/\.csv$/, '-1group.parquet'),
});

async function generateParquet(csv: string): Promise<void> {
  // DuckDB is a dev dependency: the benchmark's second, independent writer.
  const { DuckDBInstance } = await import('@duckdb/node-api');
  const connection = await (await DuckDBInstance.create(':memory:')).connect();
  const quoted = (path: string): string => `'${path.replace(/'/g, "''")}'`;
  const { parquet, oneGroup } = parquetPaths(csv);
  await connection.run(`COPY (SELECT * FROM read_csv(${quoted(csv)}, header = true)) TO ${quoted(parquet)} (FORMAT parquet, COMPRESSION snappy)`);
  await connection.run(`COPY (SELECT * FROM read_csv(${quoted(csv)}, header = true)) TO ${quoted(oneGroup)} (FORMAT parquet, COMPRESSION snappy, ROW_GROUP_SIZE 100000000)`);
  connection.closeSync();
}

/** The consumer every scan feeds: clean rows into per-class moments, as the pipeline's first pass does. */
function momentsConsumer(d: number) {
  const accumulator = new MomentsAccumulator(Array.from({ length: d }, (_, j) => `feature_${j + 1}`));
  let clean = new Float64Array(0);
  let cleanLabels = new Int32Array(0);
  let rows = 0;
  return {
    onBatch(batch: { rows: number; values: Float64Array; labels: Int32Array }, labels: readonly string[]): void {
      if (clean.length < batch.values.length) {
        clean = new Float64Array(batch.values.length);
        cleanLabels = new Int32Array(batch.rows);
      }
      let kept = 0;
      for (let r = 0; r < batch.rows; r++) {
        let finite = batch.labels[r] >= 0;
        for (let j = 0; j < d && finite; j++) finite = Number.isFinite(batch.values[r * d + j]);
        if (!finite) continue;
        for (let j = 0; j < d; j++) clean[kept * d + j] = batch.values[r * d + j];
        cleanLabels[kept++] = batch.labels[r];
      }
      accumulator.add(clean, cleanLabels, kept, labels);
      rows += batch.rows;
    },
    finish(): number {
      accumulator.result();
      return rows;
    },
  };
}

async function measure(kind: Kind, path: string): Promise<number> {
  if (kind === 'floor') {
    const file = openSync(path, 'r');
    const buffer = Buffer.allocUnsafe(4 * 1024 * 1024);
    let lines = 0;
    for (let position = 0; ; ) {
      const read = readSync(file, buffer, 0, buffer.length, position);
      if (read === 0) break;
      position += read;
      for (let at = buffer.indexOf(10, 0); at >= 0 && at < read; at = buffer.indexOf(10, at + 1)) lines++;
    }
    closeSync(file);
    return lines - 1;
  }
  if (kind === 'csv-parse') {
    let rows = 0;
    const parser = createReadStream(path).pipe(parse({ cast: true, from_line: 2 }));
    for await (const record of parser) if ((record as unknown[]).length > 0) rows++;
    return rows;
  }
  const source = await openFileSource(path);
  try {
    const inspection = await inspectTable(source);
    const label = inspection.columns.findIndex((column) => column.name === 'fault');
    const features = inspection.columns.map((column) => column.index).filter((index) => index !== label);
    const consumer = momentsConsumer(features.length);
    await scanTable({ source, inspection, plan: { label, features }, onBatch: consumer.onBatch, pass: 'moments' });
    return consumer.finish();
  } finally {
    await source.close();
  }
}

async function child(kind: Kind | 'generate', path: string): Promise<void> {
  if (kind === 'generate') {
    const megabytes = Number(argument('mb', '1024'));
    if (!existsSync(path) || statSync(path).size < megabytes * 1e6) generateCsv(path, megabytes * 1e6);
    if (!existsSync(parquetPaths(path).oneGroup)) await generateParquet(path);
    return;
  }
  const started = process.hrtime.bigint();
  const rows = await measure(kind, path);
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  const result: Measurement = { kind, seconds, rows, maxRssBytes: process.resourceUsage().maxRSS * 1024 };
  process.stdout.write(JSON.stringify(result) + '\n');
}

const median = (values: number[]): number => {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
};

async function main(): Promise<void> {
  const childKind = argument('child', '');
  if (childKind !== '') return child(childKind as Kind | 'generate', argument('file', ''));

  const megabytes = Number(argument('mb', '1024'));
  const rounds = Number(argument('rounds', '3'));
  const folder = resolve('bench-data');
  mkdirSync(folder, { recursive: true });
  const csv = join(folder, `pumps-${megabytes}mb.csv`);
  const { parquet, oneGroup } = parquetPaths(csv);
  const kinds = KINDS.filter((kind) => !(process.argv.includes('--skip-parquet') && kind.startsWith('parquet')));
  const fileOf = (kind: Kind): string => (kind === 'parquet' ? parquet : kind === 'parquet-1' ? oneGroup : csv);
  // Generated in a child process: on Linux a child's maxRSS starts from its parent's at spawn
  // time, so the parent must stay small for the children's peaks to be their own.
  if (!existsSync(csv) || statSync(csv).size < megabytes * 1e6 || !existsSync(oneGroup)) {
    console.log(`writing ${csv} and its Parquet copies …`);
    const made = spawnSync(process.execPath, [process.argv[1], '--child', 'generate', '--file', csv, '--mb', String(megabytes)], { stdio: 'inherit' });
    if (made.status !== 0) throw new Error('generating the data failed');
  }
  const bytes = statSync(csv).size;
  const results = new Map<Kind, Measurement[]>(kinds.map((kind) => [kind, []]));
  for (let round = 0; round < rounds; round++) {
    for (const kind of kinds) {
      const run = spawnSync(process.execPath, [process.argv[1], '--child', kind, '--file', fileOf(kind)], { encoding: 'utf8', maxBuffer: 1 << 20 });
      if (run.status !== 0) throw new Error(`${kind} failed: ${run.stderr}`);
      const measurement = JSON.parse(run.stdout.trim().split('\n').pop()!) as Measurement;
      results.get(kind)!.push(measurement);
      console.log(`round ${round + 1} ${kind.padEnd(9)} ${(bytes / 1e6 / measurement.seconds).toFixed(1).padStart(7)} MB/s  ${(measurement.maxRssBytes / 2 ** 20).toFixed(0).padStart(5)} MiB  ${measurement.rows} rows`);
    }
  }
  const speed = (kind: Kind): number => median(results.get(kind)!.map((m) => bytes / 1e6 / m.seconds));
  const rss = (kind: Kind): number => Math.max(...results.get(kind)!.map((m) => m.maxRssBytes)) / 1e6;
  const parentRss = process.resourceUsage().maxRSS / 1e3;
  console.log(`\n${(bytes / 1e6).toFixed(0)} MB CSV, ${FEATURES} features, ${rounds} rounds, medians (peak RSS = largest of the rounds;`);
  console.log(`a child's maxRSS cannot be below its parent's at spawn time, here ${parentRss.toFixed(0)} MB)\n`);
  console.log('| path | MB/s | peak RSS MB | ÷ floor | ÷ csv-parse |');
  console.log('|---|---|---|---|---|');
  for (const kind of kinds) {
    console.log(`| ${kind} | ${speed(kind).toFixed(1)} | ${rss(kind).toFixed(0)} | ${(speed(kind) / speed('floor')).toFixed(2)} | ${(speed(kind) / speed('csv-parse')).toFixed(1)} |`);
  }
  const targets: [string, boolean][] = [
    ['scan ≥ 50% of the floor', speed('scan') >= 0.5 * speed('floor')],
    ['scan ≥ 4× csv-parse', speed('scan') >= 4 * speed('csv-parse')],
    ['scan peak RSS < 200 MB', rss('scan') < 200],
  ];
  if (kinds.includes('parquet')) targets.push(['parquet (default row groups) peak RSS < 200 MB', rss('parquet') < 200]);
  // Issue #7: Parquet at least as fast as the CSV of the same table, and bounded memory in one huge row group.
  if (kinds.includes('parquet') && kinds.includes('scan')) targets.push(['parquet ≥ the CSV scan of the same table', speed('parquet') >= speed('scan')]);
  if (kinds.includes('parquet-1')) targets.push(['parquet-1 (one row group) peak RSS < 200 MB', rss('parquet-1') < 200]);
  console.log('');
  for (const [target, holds] of targets) console.log(`${holds ? 'holds ' : 'MISSED'}  ${target}`);
  const rowCounts = new Set(kinds.map((kind) => results.get(kind)![0].rows));
  if (rowCounts.size !== 1) throw new Error(`the paths counted different rows: ${[...rowCounts].join(', ')}`);
}

main().catch((error: unknown) => {
  console.error(error);
  process.exit(1);
});
