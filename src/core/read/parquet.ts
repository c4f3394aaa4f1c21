/**
 * Parquet through hyparquet (+ hyparquet-compressors: snappy, gzip, zstd, brotli, lz4), pure
 * JavaScript, so it also runs in a browser worker.
 *
 * The scan reads one row group at a time, one column at a time, and turns each column into a
 * typed array at once (8 bytes a feature value, 4 a label id), so the decoded JavaScript values of
 * only one column chunk are alive at any moment. A whole row group is decoded page by page
 * (parquetPages.ts). A row group too large for `wholeGroupBytes` is read in slices of `sliceRows`
 * rows through hyparquet's rowStart/rowEnd when every needed column chunk has an offset index
 * (hyparquet then decodes only the pages of the slice) or is small; otherwise a slice would decode
 * its column from the row group's first page again (measured 4.6× slower on a DuckDB file, whose
 * column chunks are a single page), so such a group is read whole too. Memory is therefore
 * bounded by the rows read at a time × (8·features + 4) bytes plus one decoded column chunk: a
 * file written in one huge row group without offset indexes needs memory in proportion to it
 * (see bench/reader.ts).
 */
import { parquetMetadataAsync, parquetRead, type AsyncBuffer, type ColumnData, type FileMetaData } from 'hyparquet';
import { compressors } from 'hyparquet-compressors';
import { CancelledError, DataError } from '../errors';
import type { ByteSource, RunControl } from '../source';
import { CELL_MISSING, CELL_TEXT } from './cellValue';
import { ColumnSample } from './columnSample';
import { isParquetMagic } from './format';
import { asyncBufferOf, ParquetFeatureReader, textOf } from './parquetValues';
import { readFlatColumnPages, type FlatPage } from './parquetPages';
import { parquetColumns, type ParquetColumn } from './parquetSchema';
import { PassProgress } from './progress';
import { readCopy } from './readBytes';
import { cellRulesFor } from './textOptions';
import { DEFAULT_MISSING_TOKENS, type CellExample, type ColumnSummary, type ReaderNote, type ReadOptions, type ScanRequest, type ScanSummary, type TableInspection } from './types';

export interface ParquetTuning {
  /** A row group whose rows need at most this many bytes in typed arrays is read whole. */
  wholeGroupBytes: number;
  /** Rows decoded at a time within a larger row group, when it can be sliced. */
  sliceRows: number;
  /** Rows per batch handed to onBatch. */
  batchRows: number;
  /** Rows summarised by `inspect`. */
  sampleRows: number;
}

export const DEFAULT_PARQUET_TUNING: ParquetTuning = { wholeGroupBytes: 64 * 1024 * 1024, sliceRows: 65_536, batchRows: 4096, sampleRows: 10_000 };

const EXAMPLES = 5;
const DOUBLE_DIGITS = 15;

interface OpenedParquet {
  file: AsyncBuffer;
  metadata: FileMetaData;
  columns: ParquetColumn[];
  rows: number;
}

/**
 * The footer of each source already opened: a parallel scan reads a file in many shares of row
 * groups, and a large footer (row groups × columns) would be decoded again for each.
 */
const openedFooters = new WeakMap<ByteSource, Promise<OpenedParquet>>();

function openParquet(source: ByteSource): Promise<OpenedParquet> {
  let opened = openedFooters.get(source);
  if (!opened) {
    opened = readFooter(source);
    openedFooters.set(source, opened);
    opened.catch(() => openedFooters.delete(source));
  }
  return opened;
}

async function readFooter(source: ByteSource): Promise<OpenedParquet> {
  const name = source.name;
  const invalid = (why: string, hint: string): DataError => new DataError('parquet-invalid', `${name} is not a readable Parquet file: ${why}`, { file: name }, hint);
  if (source.size < 12) throw invalid(`it is only ${source.size} bytes long.`, 'The file is truncated; write it again.');
  const head = await readCopy(source, 0, 4);
  const tail = await readCopy(source, source.size - 4, 4);
  if (!isParquetMagic(head, 0)) throw invalid('it does not start with the Parquet magic bytes "PAR1".', 'Check that this is a Parquet file.');
  if (!isParquetMagic(tail, 0)) {
    throw invalid('it does not end with the magic bytes "PAR1", so its footer is missing or damaged (a truncated copy?).', 'Write or copy the file again completely.');
  }
  const file = asyncBufferOf(source);
  let metadata: FileMetaData;
  try {
    metadata = await parquetMetadataAsync(file);
  } catch (error) {
    throw invalid(`its footer cannot be decoded (${(error as Error).message}).`, 'Write or copy the file again completely.');
  }
  const columns = parquetColumns(metadata);
  return { file, metadata, columns, rows: Number(metadata.num_rows) };
}

/**
 * The values of one column for rows [rowStart, rowEnd), as hyparquet's chunks (a chunk may also
 * cover rows outside the range: callers index by each chunk's rowStart).
 */
async function readColumnRows(opened: OpenedParquet, name: string, column: string, rowStart: number, rowEnd: number): Promise<ColumnData[]> {
  const chunks: ColumnData[] = [];
  if (rowEnd <= rowStart) return chunks;
  try {
    await parquetRead({
      file: opened.file,
      metadata: opened.metadata,
      columns: [column],
      rowStart,
      rowEnd,
      compressors,
      useOffsetIndex: true,
      onChunk: (chunk) => chunks.push(chunk),
    });
  } catch (error) {
    if (error instanceof DataError || error instanceof CancelledError) throw error;
    throw new DataError(
      'parquet-invalid',
      `${name}: rows ${rowStart}–${rowEnd - 1} of column ${column} cannot be decoded (${(error as Error).message}).`,
      { file: name, row: rowStart, column },
      'The file may be truncated or damaged; write or copy it again.',
    );
  }
  return chunks;
}

/** readFlatColumnPages with its errors as DataErrors naming the file, row group and column. */
async function readFlatColumn(opened: OpenedParquet, name: string, group: FileMetaData['row_groups'][number], column: string, onPage: (page: FlatPage) => void, rowLimit?: number): Promise<boolean> {
  try {
    return await readFlatColumnPages(opened.file, opened.metadata, group, column, compressors, onPage, rowLimit);
  } catch (error) {
    if (error instanceof DataError || error instanceof CancelledError) throw error;
    throw new DataError(
      'parquet-invalid',
      `${name}: column ${column} of a row group cannot be decoded (${(error as Error).message}).`,
      { file: name, column },
      'The file may be truncated or damaged; write or copy it again.',
    );
  }
}

/**
 * Stores a page's rows through `store(row, value)`; when the page has no nulls and its values are
 * a typed array of numbers, feature columns (`numericTargets`, unless the column is also the
 * label) are filled by one typed copy instead.
 */
function storePage(page: FlatPage, groupStart: number, store: (row: number, value: unknown) => void, numericTargets: Float64Array[], rangeStart: number): void {
  const { values, definitionLevels, presentLevel } = page;
  const first = groupStart + page.firstRow;
  const typedNumbers = values instanceof Float64Array || values instanceof Float32Array || values instanceof Int32Array || values instanceof Uint32Array;
  if (definitionLevels.length === 0 && typedNumbers && numericTargets.length > 0) {
    for (const target of numericTargets) target.set(values.subarray(0, page.rows), first - rangeStart);
    return;
  }
  if (definitionLevels.length === 0) {
    for (let i = 0; i < page.rows; i++) store(first + i, values[i]);
    return;
  }
  let next = 0;
  for (let i = 0; i < page.rows; i++) store(first + i, definitionLevels[i] === presentLevel ? values[next++] : null);
}

/** Calls `visit(row, value)` for rows [rowStart, rowEnd) of a column's chunks, in row order. */
function forEachRow(chunks: readonly ColumnData[], rowStart: number, rowEnd: number, visit: (row: number, value: unknown) => void): void {
  for (const chunk of chunks) {
    const from = Math.max(rowStart, chunk.rowStart);
    const to = Math.min(rowEnd, chunk.rowEnd, chunk.rowStart + chunk.columnData.length);
    for (let row = from; row < to; row++) visit(row, chunk.columnData[row - chunk.rowStart]);
  }
}

/** A column chunk this small (uncompressed) costs little to decode again for every slice. */
const SMALL_CHUNK_BYTES = 1024 * 1024;

/**
 * Row ranges of a row group read at a time: the whole group when its rows fit `wholeGroupBytes`
 * as typed arrays (`rowBytes` each) or when it cannot be sliced cheaply; else slices, when every
 * needed column chunk has an offset index or is small.
 */
function rowRanges(group: FileMetaData['row_groups'][number], groupStart: number, needed: ReadonlySet<string>, rowBytes: number, tuning: ParquetTuning): [number, number][] {
  const rows = Number(group.num_rows);
  const sliceRows = tuning.sliceRows;
  const sliceable = rows * rowBytes > tuning.wholeGroupBytes && group.columns.every(
    (chunk) =>
      !needed.has(chunk.meta_data?.path_in_schema[0] ?? '') ||
      (chunk.offset_index_offset !== undefined && (chunk.offset_index_length ?? 0) > 0) ||
      Number(chunk.meta_data?.total_uncompressed_size ?? Infinity) <= SMALL_CHUNK_BYTES,
  );
  const step = sliceable ? Math.max(1, sliceRows) : Math.max(1, rows);
  const ranges: [number, number][] = [];
  for (let start = groupStart; start < groupStart + rows; start += step) ranges.push([start, Math.min(start + step, groupStart + rows)]);
  return ranges;
}

function schemaNotes(columns: ParquetColumn[]): ReaderNote[] {
  const notes: ReaderNote[] = [];
  const nested = columns.filter((column) => column.kind === 'nested').map((column) => column.name);
  if (nested.length > 0) {
    notes.push({ code: 'nested-columns-ignored', severity: 'info', message: `Nested columns (groups, lists, maps) cannot be features and are ignored: ${nested.join(', ')}.`, columns: nested });
  }
  const wideDecimals = columns.filter((column) => column.decimalDigits > DOUBLE_DIGITS).map((column) => column.name);
  if (wideDecimals.length > 0) {
    notes.push({ code: 'decimal-precision', severity: 'info', message: `DECIMAL columns with more than ${DOUBLE_DIGITS} digits are read as doubles and may lose their last digits: ${wideDecimals.join(', ')}.`, columns: wideDecimals });
  }
  return notes;
}

export async function inspectParquet(source: ByteSource, options: ReadOptions, control?: RunControl, tuning: ParquetTuning = DEFAULT_PARQUET_TUNING): Promise<TableInspection> {
  const progress = new PassProgress(control, 'inspect', source.size);
  const opened = await openParquet(source);
  if (opened.rows === 0) {
    throw new DataError('no-data-rows', `${source.name} is a Parquet file without rows.`, { file: source.name }, 'Check that the file was written completely.');
  }
  const rules = cellRulesFor(options);
  const sampledRows = Math.min(opened.rows, tuning.sampleRows);
  const reader = new ParquetFeatureReader(rules);
  const columns: ColumnSummary[] = [];
  for (const column of opened.columns) {
    const sample = new ColumnSample(column.name, column.index);
    if (column.kind === 'nested') {
      columns.push(sample.summary('nested'));
      continue;
    }
    const visit = (row: number, value: unknown): void => {
      if (row >= sampledRows) return;
      if (column.kind === 'numeric') {
        const number = reader.valueOf(value);
        if (reader.lastKind === CELL_MISSING) sample.addMissing();
        else sample.addNumber(number);
      } else {
        const text = textOf(value, rules);
        if (text === undefined) sample.addMissing();
        else sample.addText(text);
      }
    };
    // The first row group page by page when it holds the whole sample, else hyparquet's reader across groups.
    const firstGroup = opened.metadata.row_groups[0];
    const paged = Number(firstGroup.num_rows) >= sampledRows && (await readFlatColumn(opened, source.name, firstGroup, column.name, (page) => storePage(page, 0, visit, [], 0), sampledRows));
    if (!paged) forEachRow(await readColumnRows(opened, source.name, column.name, 0, sampledRows), 0, sampledRows, visit);
    const summary = sample.summary();
    columns.push(summary.kind === 'empty' ? summary : { ...summary, kind: column.kind });
    progress.update(0);
  }
  progress.finish();
  return {
    source: source.name,
    format: 'parquet',
    header: true,
    columns,
    sampledRows,
    estimatedRows: opened.rows,
    splittable: false,
    options: { ...options, format: 'parquet', missingTokens: options.missingTokens ?? DEFAULT_MISSING_TOKENS },
    notes: schemaNotes(opened.columns),
  };
}

export async function scanParquet(request: ScanRequest, tuning: ParquetTuning = DEFAULT_PARQUET_TUNING): Promise<ScanSummary> {
  const { source, inspection, plan } = request;
  const name = source.name;
  const opened = await openParquet(source);
  const rules = cellRulesFor(inspection.options);
  const columnOf = (index: number): ParquetColumn => {
    const column = opened.columns[index];
    if (column === undefined) throw new RangeError(`scan plan: column ${index} is not a column of ${name}`);
    if (column.kind === 'nested') {
      throw new DataError('nested-column', `${name}: column ${column.name} is nested (a group, list or map) and cannot be read as a feature or label.`, { file: name, column: column.name }, 'Choose a flat column.');
    }
    return column;
  };
  const features = plan.features.map(columnOf);
  const label = plan.label >= 0 ? columnOf(plan.label) : undefined;
  const needed = [...new Set([...(label ? [label.name] : []), ...features.map((column) => column.name)])];
  const d = features.length;
  const batchRows = Math.max(1, tuning.batchRows);
  const values = new Float64Array(batchRows * d);
  const labels = new Int32Array(batchRows);
  const labelIds = new Map<string, number>();
  const labelTexts: string[] = [];
  const nonNumeric = new Array<number>(d).fill(0);
  const nonNumericExamples: CellExample[][] = features.map(() => []);
  const lostPrecision = new Array<number>(d).fill(0);
  const reader = new ParquetFeatureReader(rules);
  const progress = new PassProgress(request.control, request.pass ?? 'rows', source.size);
  // The rows being read, column by column: one typed array per feature, one of label ids.
  let columnValues: Float64Array[] = features.map(() => new Float64Array(0));
  let columnLabels = new Int32Array(0);

  const labelId = (value: unknown): number => {
    const text = textOf(value, rules);
    if (text === undefined) return -1;
    let id = labelIds.get(text);
    if (id === undefined) {
      id = labelTexts.length;
      labelIds.set(text, id);
      labelTexts.push(text);
    }
    return id;
  };

  const only = request.rows;
  let scanned = 0;
  let groupStart = 0;
  for (const group of opened.metadata.row_groups) {
    const groupEnd = groupStart + Number(group.num_rows);
    if (only && (groupEnd <= only.start || groupStart >= only.end)) {
      groupStart = groupEnd;
      continue;
    }
    for (const [fullStart, fullEnd] of rowRanges(group, groupStart, new Set(needed), 8 * d + 4, tuning)) {
      const rangeStart = only ? Math.max(fullStart, only.start) : fullStart;
      const rangeEnd = only ? Math.min(fullEnd, only.end) : fullEnd;
      if (rangeStart >= rangeEnd) continue;
      const rows = rangeEnd - rangeStart;
      scanned += rows;
      if (columnLabels.length < rows) {
        columnValues = features.map(() => new Float64Array(rows));
        columnLabels = new Int32Array(rows);
      }
      if (!label) columnLabels.fill(-1, 0, rows);
      for (const [k, column] of needed.entries()) {
        const slots = features.flatMap((feature, slot) => (feature.name === column ? [slot] : []));
        for (const slot of slots) columnValues[slot].fill(NaN, 0, rows);
        // Labels are interned in row order, so ids follow the order of first appearance.
        const store = (row: number, value: unknown): void => {
          if (label?.name === column) columnLabels[row - rangeStart] = labelId(value);
          for (const slot of slots) {
            if (typeof value === 'number') {
              columnValues[slot][row - rangeStart] = value;
              continue;
            }
            columnValues[slot][row - rangeStart] = reader.valueOf(value);
            if (reader.lostPrecision) lostPrecision[slot]++;
            if (reader.lastKind === CELL_TEXT) {
              nonNumeric[slot]++;
              if (nonNumericExamples[slot].length < EXAMPLES) nonNumericExamples[slot].push({ row, text: textOf(value, rules) ?? '' });
            }
          }
        };
        const wholeGroup = rangeStart === groupStart && rangeEnd === groupStart + Number(group.num_rows);
        const paged = wholeGroup && (await readFlatColumn(opened, name, group, column, (page) => storePage(page, groupStart, store, label?.name === column ? [] : slots.map((slot) => columnValues[slot]), rangeStart)));
        if (!paged) forEachRow(await readColumnRows(opened, name, column, rangeStart, rangeEnd), rangeStart, rangeEnd, store);
        progress.update(Math.round((source.size * (rangeStart + (rows * (k + 1)) / needed.length)) / Math.max(1, opened.rows)));
      }
      for (let batchStart = 0; batchStart < rows; batchStart += batchRows) {
        const n = Math.min(batchRows, rows - batchStart);
        for (let slot = 0; slot < d; slot++) {
          const column = columnValues[slot];
          for (let i = 0; i < n; i++) values[i * d + slot] = column[batchStart + i];
        }
        labels.set(columnLabels.subarray(batchStart, batchStart + n));
        request.onBatch({ rows: n, firstRow: rangeStart + batchStart, values: values.subarray(0, n * d), labels: labels.subarray(0, n) }, labelTexts);
      }
      progress.update(Math.round((source.size * rangeEnd) / Math.max(1, opened.rows)));
    }
    groupStart += Number(group.num_rows);
  }
  progress.finish();

  const notes = [...(inspection.notes ?? schemaNotes(opened.columns))];
  const imprecise = features.filter((_, slot) => lostPrecision[slot] > 0).map((column) => column.name);
  if (imprecise.length > 0) {
    const counts = features.map((column, slot) => (lostPrecision[slot] > 0 ? `${column.name}: ${lostPrecision[slot]}` : '')).filter((text) => text !== '');
    notes.push({
      code: 'int64-precision',
      severity: 'warning',
      message: `INT64 values beyond ±2^53 were rounded to the nearest double (${counts.join(', ')} values).`,
      columns: imprecise,
    });
  }
  return { rows: only ? scanned : opened.rows, labels: labelTexts.slice(), nonNumeric, nonNumericExamples, raggedRows: 0, raggedExamples: [], notes };
}

/** The number of rows in each row group, in file order (a parallel scan splits between groups). */
export async function parquetRowGroups(source: ByteSource): Promise<number[]> {
  const opened = await openParquet(source);
  return opened.metadata.row_groups.map((group) => Number(group.num_rows));
}

