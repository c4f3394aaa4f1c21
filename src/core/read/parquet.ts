/**
 * Parquet through hyparquet (+ hyparquet-compressors: snappy, gzip, zstd, brotli, lz4), pure
 * JavaScript, so it also runs in a browser worker. The scan reads one row group at a time and,
 * within a row group, slices of `sliceRows` rows (hyparquet's rowStart/rowEnd; with an offset
 * index only the pages of the slice are fetched, without one the column chunk is fetched per
 * slice and the pages before the slice are skipped undecoded), so memory stays bounded by a slice
 * of the needed columns plus, at worst, their compressed column chunks.
 */
import { parquetMetadataAsync, parquetRead, type AsyncBuffer, type ColumnData, type FileMetaData } from 'hyparquet';
import { compressors } from 'hyparquet-compressors';
import { CancelledError, DataError } from '../errors';
import type { ByteSource, RunControl } from '../source';
import { CELL_MISSING, CELL_TEXT } from './cellValue';
import { ColumnSample } from './columnSample';
import { isParquetMagic } from './format';
import { asyncBufferOf, ParquetFeatureReader, textOf } from './parquetValues';
import { parquetColumns, type ParquetColumn } from './parquetSchema';
import { PassProgress } from './progress';
import { readCopy } from './readBytes';
import { cellRulesFor } from './textOptions';
import { DEFAULT_MISSING_TOKENS, type CellExample, type ReaderNote, type ReadOptions, type ScanRequest, type ScanSummary, type TableInspection } from './types';

export interface ParquetTuning {
  /** Rows decoded at a time within a row group. */
  sliceRows: number;
  /** Rows per batch handed to onBatch. */
  batchRows: number;
  /** Rows summarised by `inspect`. */
  sampleRows: number;
}

export const DEFAULT_PARQUET_TUNING: ParquetTuning = { sliceRows: 65_536, batchRows: 4096, sampleRows: 10_000 };

const EXAMPLES = 5;
const DOUBLE_DIGITS = 15;

interface OpenedParquet {
  file: AsyncBuffer;
  metadata: FileMetaData;
  columns: ParquetColumn[];
  rows: number;
}

async function openParquet(source: ByteSource): Promise<OpenedParquet> {
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

/** Column data of rows [rowStart, rowEnd) collected from hyparquet's onChunk (chunks may cover more rows). */
class SliceColumns {
  private readonly chunks = new Map<string, ColumnData[]>();

  add(chunk: ColumnData): void {
    const list = this.chunks.get(chunk.columnName);
    if (list) list.push(chunk);
    else this.chunks.set(chunk.columnName, [chunk]);
  }

  /** The value of `column` at absolute row `row`. */
  valueAt(column: string, row: number): unknown {
    const list = this.chunks.get(column);
    if (list === undefined) return undefined;
    for (const chunk of list) if (row >= chunk.rowStart && row < chunk.rowEnd) return chunk.columnData[row - chunk.rowStart];
    return undefined;
  }

  /** The chunk of `column` holding `row`, to index it directly in the hot loop. */
  chunkAt(column: string, row: number): ColumnData | undefined {
    const list = this.chunks.get(column);
    return list?.find((chunk) => row >= chunk.rowStart && row < chunk.rowEnd);
  }
}

async function readSlice(opened: OpenedParquet, name: string, columns: string[], rowStart: number, rowEnd: number): Promise<SliceColumns> {
  const slice = new SliceColumns();
  if (columns.length === 0 || rowEnd <= rowStart) return slice;
  try {
    await parquetRead({
      file: opened.file,
      metadata: opened.metadata,
      columns,
      rowStart,
      rowEnd,
      compressors,
      useOffsetIndex: true,
      onChunk: (chunk) => slice.add(chunk),
    });
  } catch (error) {
    if (error instanceof DataError || error instanceof CancelledError) throw error;
    throw new DataError(
      'parquet-invalid',
      `${name}: rows ${rowStart}–${rowEnd - 1} of columns ${columns.join(', ')} cannot be decoded (${(error as Error).message}).`,
      { file: name, row: rowStart, column: columns[0] },
      'The file may be truncated or damaged; write or copy it again.',
    );
  }
  return slice;
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
  const rules = cellRulesFor(options);
  const flat = opened.columns.filter((column) => column.kind !== 'nested');
  const sampledRows = Math.min(opened.rows, tuning.sampleRows);
  const slice = await readSlice(opened, source.name, flat.map((column) => column.name), 0, sampledRows);
  const reader = new ParquetFeatureReader(rules);
  const columns = opened.columns.map((column) => {
    const sample = new ColumnSample(column.name, column.index);
    if (column.kind === 'nested') return sample.summary('nested');
    for (let row = 0; row < sampledRows; row++) {
      const value = slice.valueAt(column.name, row);
      if (column.kind === 'numeric') {
        const number = reader.valueOf(value);
        if (reader.lastKind === CELL_MISSING) sample.addMissing();
        else sample.addNumber(number);
      } else {
        const text = textOf(value, rules);
        if (text === undefined) sample.addMissing();
        else sample.addText(text);
      }
    }
    const summary = sample.summary();
    return summary.kind === 'empty' ? summary : { ...summary, kind: column.kind };
  });
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

  let groupStart = 0;
  for (const group of opened.metadata.row_groups) {
    const groupRows = Number(group.num_rows);
    for (let sliceStart = groupStart; sliceStart < groupStart + groupRows; sliceStart += tuning.sliceRows) {
      const sliceEnd = Math.min(sliceStart + tuning.sliceRows, groupStart + groupRows);
      const slice = await readSlice(opened, name, needed, sliceStart, sliceEnd);
      for (let batchStart = sliceStart; batchStart < sliceEnd; batchStart += batchRows) {
        const n = Math.min(batchRows, sliceEnd - batchStart);
        if (label) {
          const chunk = slice.chunkAt(label.name, batchStart);
          for (let i = 0; i < n; i++) {
            const text = textOf(chunk?.columnData[batchStart + i - chunk.rowStart], rules);
            let id = -1;
            if (text !== undefined) {
              id = labelIds.get(text) ?? -1;
              if (id < 0) {
                id = labelTexts.length;
                labelIds.set(text, id);
                labelTexts.push(text);
              }
            }
            labels[i] = id;
          }
        } else labels.fill(-1, 0, n);
        for (let slot = 0; slot < d; slot++) {
          const chunk = slice.chunkAt(features[slot].name, batchStart);
          const data = chunk?.columnData;
          const offset = chunk ? batchStart - chunk.rowStart : 0;
          for (let i = 0; i < n; i++) {
            const value = data?.[offset + i];
            const number = typeof value === 'number' ? value : reader.valueOf(value);
            values[i * d + slot] = number;
            if (typeof value === 'number') continue;
            if (reader.lostPrecision) lostPrecision[slot]++;
            if (reader.lastKind === CELL_TEXT) {
              nonNumeric[slot]++;
              if (nonNumericExamples[slot].length < EXAMPLES) nonNumericExamples[slot].push({ row: batchStart + i, text: textOf(value, rules) ?? '' });
            }
          }
        }
        request.onBatch({ rows: n, firstRow: batchStart, values: values.subarray(0, n * d), labels: labels.subarray(0, n) }, labelTexts);
      }
      progress.update(Math.round((source.size * sliceEnd) / Math.max(1, opened.rows)));
    }
    groupStart += groupRows;
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
  return { rows: opened.rows, labels: labelTexts.slice(), nonNumeric, nonNumericExamples, raggedRows: 0, raggedExamples: [], notes };
}

