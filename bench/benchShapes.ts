/**
 * The tables of the side-by-side benchmark and how each is made. Data is generated on the fly into
 * the git-ignored bench-data/ folder (never committed) and kept there for the next run; the
 * narrow CSV and its Parquet copies have the names and bytes bench/reader.ts uses, so the two
 * benchmarks share them.
 */
import { existsSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { asyncBufferFromFile, parquetMetadataAsync } from 'hyparquet';
import { writePumpCsv } from './pumpTable';

export type ShapeId = 'narrow' | 'wide200' | 'wide1000' | 'parquet' | 'parquet-1' | 'kernel' | 'frames' | 'editor';

export const ALL_SHAPES: ShapeId[] = ['narrow', 'wide200', 'wide1000', 'parquet', 'parquet-1', 'kernel', 'frames', 'editor'];
/** The VS Code host takes minutes to start: left out of --quick unless asked for. */
export const QUICK_SHAPES: ShapeId[] = ['narrow', 'wide200', 'wide1000', 'parquet', 'parquet-1', 'kernel', 'frames'];

export interface TableShape {
  id: Extract<ShapeId, 'narrow' | 'wide200' | 'wide1000' | 'parquet' | 'parquet-1'>;
  title: string;
  file: string;
  format: 'csv' | 'parquet';
  /** The CSV of the same table (a Parquet shape's MB/s are the CSV's bytes per second). */
  csv: string;
  features: number;
  classes: number;
}

export interface Sizes {
  narrowMegabytes: number;
  wide200Megabytes: number;
  wide1000Rows: number;
  wide1000Features: number;
}

export function sizes(quick: boolean): Sizes {
  return quick
    ? { narrowMegabytes: 10, wide200Megabytes: 3, wide1000Rows: 1000, wide1000Features: 300 }
    : { narrowMegabytes: 1024, wide200Megabytes: 100, wide1000Rows: 20000, wide1000Features: 1000 };
}

export function tableShapes(folder: string, s: Sizes): TableShape[] {
  const narrow = join(folder, `pumps-${s.narrowMegabytes}mb.csv`);
  return [
    { id: 'narrow', title: `${s.narrowMegabytes} MB CSV, 20 features, 5 classes`, file: narrow, format: 'csv', csv: narrow, features: 20, classes: 5 },
    {
      id: 'wide200',
      title: `${s.wide200Megabytes} MB CSV, 200 features, 5 classes`,
      file: join(folder, `pumps-200f-${s.wide200Megabytes}mb.csv`),
      format: 'csv',
      csv: join(folder, `pumps-200f-${s.wide200Megabytes}mb.csv`),
      features: 200,
      classes: 5,
    },
    {
      id: 'wide1000',
      title: `${s.wide1000Rows.toLocaleString('en')} rows × ${s.wide1000Features} features, 10 classes (CSV)`,
      file: join(folder, `pumps-${s.wide1000Features}f-${s.wide1000Rows}rows.csv`),
      format: 'csv',
      csv: join(folder, `pumps-${s.wide1000Features}f-${s.wide1000Rows}rows.csv`),
      features: s.wide1000Features,
      classes: 10,
    },
    { id: 'parquet', title: `the ${s.narrowMegabytes} MB table as snappy Parquet (DuckDB, default row groups)`, file: narrow.replace(/\.csv$/, '.parquet'), format: 'parquet', csv: narrow, features: 20, classes: 5 },
    { id: 'parquet-1', title: `the same in one row group`, file: narrow.replace(/\.csv$/, '-1group.parquet'), format: 'parquet', csv: narrow, features: 20, classes: 5 },
  ];
}

/** Writes what is missing of one table (in the calling process: run it in a child to keep this one small). */
export async function prepareTable(shape: TableShape, s: Sizes): Promise<void> {
  if (shape.id === 'narrow' || shape.id === 'parquet' || shape.id === 'parquet-1') {
    const bytes = s.narrowMegabytes * 1e6;
    if (!existsSync(shape.csv) || statSync(shape.csv).size < bytes) writePumpCsv(shape.csv, { features: 20, classes: 5, bytes });
    if (shape.format === 'parquet' && !existsSync(shape.file)) await writeParquet(shape.csv, shape.file, shape.id === 'parquet-1');
  } else if (shape.id === 'wide200') {
    const bytes = s.wide200Megabytes * 1e6;
    if (!existsSync(shape.file) || statSync(shape.file).size < bytes) writePumpCsv(shape.file, { features: 200, classes: 5, bytes });
  } else if (!existsSync(shape.file)) {
    writePumpCsv(shape.file, { features: s.wide1000Features, classes: 10, rows: s.wide1000Rows });
  }
}

/**
 * The Parquet copy, written by a second, independent tool: DuckDB (@duckdb/node-api, a dev
 * dependency), snappy, with DuckDB's default row groups or one row group for the whole table.
 */
export async function writeParquet(csv: string, parquet: string, oneGroup: boolean): Promise<void> {
  const { DuckDBInstance } = await import('@duckdb/node-api');
  const connection = await (await DuckDBInstance.create(':memory:')).connect();
  const quoted = (path: string): string => `'${path.replace(/'/g, "''")}'`;
  const groups = oneGroup ? ', ROW_GROUP_SIZE 100000000' : '';
  await connection.run(`COPY (SELECT * FROM read_csv(${quoted(csv)}, header = true)) TO ${quoted(parquet)} (FORMAT parquet, COMPRESSION snappy${groups})`);
  connection.closeSync();
}

/** What a Parquet copy holds, from its footer: a reader's memory and speed depend on it. */
export interface ParquetLayout {
  rowGroups: number;
  /** Dictionary-encoded column chunks, of all column chunks. */
  dictionaryChunks: number;
  columnChunks: number;
  /**
   * Bytes of the largest row group's dictionary pages (from each chunk's dictionary page offset to
   * its first data page: header included, as stored): a reader holds a group's dictionaries while
   * it reads the group, since any index may point anywhere in its dictionary.
   */
  largestGroupDictionaryBytes: number;
}

export async function parquetLayout(file: string): Promise<ParquetLayout> {
  const metadata = await parquetMetadataAsync(await asyncBufferFromFile(file));
  let dictionaryChunks = 0;
  let columnChunks = 0;
  let largestGroupDictionaryBytes = 0;
  for (const group of metadata.row_groups) {
    let groupBytes = 0;
    for (const chunk of group.columns) {
      columnChunks++;
      const meta = chunk.meta_data;
      if (meta?.dictionary_page_offset === undefined) continue;
      dictionaryChunks++;
      groupBytes += Number(meta.data_page_offset) - Number(meta.dictionary_page_offset);
    }
    largestGroupDictionaryBytes = Math.max(largestGroupDictionaryBytes, groupBytes);
  }
  return { rowGroups: metadata.row_groups.length, dictionaryChunks, columnChunks, largestGroupDictionaryBytes };
}

/** The layout in a few words, for the table's heading. */
export function layoutText(layout: ParquetLayout): string {
  const groups = `${layout.rowGroups.toLocaleString('en')} row group${layout.rowGroups === 1 ? '' : 's'}`;
  if (layout.dictionaryChunks === 0) return `${groups}, no dictionary pages`;
  return `${groups}, ${layout.dictionaryChunks} of ${layout.columnChunks} column chunks dictionary-encoded, the largest group's dictionary pages ${(layout.largestGroupDictionaryBytes / 1e6).toFixed(0)} MB`;
}
