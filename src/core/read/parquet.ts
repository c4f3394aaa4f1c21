/**
 * Parquet through hyparquet (+ hyparquet-compressors: snappy, gzip, zstd, brotli, lz4), pure
 * JavaScript, so it also runs in a browser worker.
 *
 * The scan reads a row group with one cursor per needed column (parquetCursor.ts), advancing them
 * in lockstep a batch of `batchRows` rows at a time and writing each column's values straight into
 * the batch. A page is read from the source in windows of `readBytes` and a page over
 * `streamPageBytes` is decoded as it is read (DuckDB's default row groups have ~1 MB pages: streamed,
 * they cost no more CPU than hysnappy on the whole page and ~70 MB less peak RSS in a two-worker fit), so memory is bounded by the columns × (two windows + one dictionary) however
 * large a row group or page is (DuckDB writes one page per column chunk, even in a row group of
 * millions of rows). The dictionaries are the part that may be large: DuckDB's can hold most of a
 * column's distinct values. Where they are (32 MiB and more for a share of a group) and the thread
 * has scratch space, the share's dictionary-encoded number columns are spilled first, one column at
 * a time, and its rows read back from the spill in order (parquetSpill.ts).
 */
import { parquetMetadataAsync, parquetRead, type AsyncBuffer, type ColumnData, type DecodedArray, type FileMetaData } from 'hyparquet';
import { compressors } from 'hyparquet-compressors';
import { CancelledError, DataError } from '../errors';
import type { ByteSource, RunControl } from '../source';
import { CELL_MISSING, CELL_TEXT, type CellRules } from './cellValue';
import { ColumnSample } from './columnSample';
import { isParquetMagic } from './format';
import { asyncBufferOf, ParquetFeatureReader, textOf } from './parquetValues';
import { ColumnBuffers, copyNumbers, FlatColumnCursor, forEachValue, GrowingDictionary, isNumberArray, type ColumnPiece, type CursorTuning, type KeptDictionary, type NumberArray } from './parquetCursor';
import { parquetColumns, type ParquetColumn } from './parquetSchema';
import { columnsToSpill, groupSpills, SpillReader, spillName, writeSpill } from './parquetSpill';
import { scratchSpace } from './scratch';
import { PassProgress } from './progress';
import { readCopy } from './readBytes';
import { cellRulesFor } from './textOptions';
import { DEFAULT_MISSING_TOKENS, type CellExample, type ColumnSummary, type ReaderNote, type ReadOptions, type ScanRequest, type ScanSummary, type TableInspection } from './types';

export interface ParquetTuning extends CursorTuning {
  /** Rows per batch handed to onBatch (and decoded at a time from each column). */
  batchRows: number;
  /** Rows summarised by `inspect`. */
  sampleRows: number;
}

export const DEFAULT_PARQUET_TUNING: ParquetTuning = { readBytes: 128 * 1024, streamPageBytes: 64 * 1024, batchRows: 4096, sampleRows: 10_000 };

const EXAMPLES = 5;
const DOUBLE_DIGITS = 15;

interface OpenedParquet {
  file: AsyncBuffer;
  metadata: FileMetaData;
  columns: ParquetColumn[];
  rows: number;
  /**
   * The decoded dictionary pages of the row group read last, by file offset: the next pass over the
   * same group (a file of one large row group is read three times, its dictionaries can be most of
   * its values) takes them from here instead of decoding them again beside the old ones. A large
   * number dictionary is kept as decoded so far (GrowingDictionary): the next pass goes on from there.
   */
  dictionaries: { group: RowGroup | null; byOffset: Map<number, KeptDictionary>; shared: Map<number, DecodedArray> };
  /**
   * Each column's read buffers (the file window, the snappy output, the decoded values: some
   * 0.35 MB a column) left by scans that have ended, for the next scan in this thread. A pass
   * reads a file in many shares, one scanParquet each; with buffers of its own each share left
   * them to the garbage collector, and they outlived young collections, so they gathered in the
   * old generation until a full one: 60-90 MB of dead buffers at the 1 GB table's peak. A scan
   * takes them and gives them back when it ends, so scans that overlap never share them.
   */
  spareBuffers: Map<string, ColumnBuffers[]>;
}

/**
 * Number dictionaries of a row group in memory shared by the threads that read it, by the file
 * offset of their page (SharedArrayBuffer: posting them to a worker copies nothing).
 */
export type SharedDictionaries = [offset: number, values: Float64Array | Float32Array | Int32Array | Uint32Array][];

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
  return { file, metadata, columns, rows: Number(metadata.num_rows), dictionaries: { group: null, byOffset: new Map(), shared: new Map() }, spareBuffers: new Map() };
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

type RowGroup = FileMetaData['row_groups'][number];

/** A damaged column as a DataError naming the file, the rows and the column. */
function columnError(error: unknown, name: string, column: string, row: number): Error {
  if (error instanceof DataError || error instanceof CancelledError) return error;
  return new DataError(
    'parquet-invalid',
    `${name}: column ${column} cannot be decoded from row ${row} on (${(error as Error).message}).`,
    { file: name, row, column },
    'The file may be truncated or damaged; write or copy it again.',
  );
}

/** Working memory for a cursor over `column`: what an earlier scan of the file left (returnBuffers), else new. */
function takeBuffers(opened: OpenedParquet, column: string): ColumnBuffers {
  return opened.spareBuffers.get(column)?.pop() ?? new ColumnBuffers();
}

/** A scan is done with `buffers` (its cursors finished): the next scan over `column` takes them. */
function returnBuffers(opened: OpenedParquet, column: string, buffers: ColumnBuffers): void {
  const spare = opened.spareBuffers.get(column);
  if (spare) spare.push(buffers);
  else opened.spareBuffers.set(column, [buffers]);
}

/**
 * One column of a row group read a batch at a time: through a FlatColumnCursor, or for a column it
 * cannot read (not flat, in another file) through hyparquet's reader, the whole group at once.
 */
class ColumnRows {
  private chunks: ColumnData[] | null = null;
  private row = 0;

  private constructor(
    private readonly opened: OpenedParquet,
    private readonly name: string,
    readonly column: string,
    private readonly groupStart: number,
    private readonly groupRows: number,
    private readonly cursor: FlatColumnCursor | null,
  ) {}

  static open(opened: OpenedParquet, source: ByteSource, group: RowGroup, groupStart: number, column: string, tuning: ParquetTuning, buffers?: ColumnBuffers): ColumnRows {
    const kept = opened.dictionaries;
    if (kept.group !== group) {
      kept.group = group;
      kept.byOffset = new Map(kept.shared);
    }
    const cursor = FlatColumnCursor.open(source, opened.metadata, group, column, compressors, tuning, kept.byOffset, buffers);
    return new ColumnRows(opened, source.name, column, groupStart, Number(group.num_rows), cursor);
  }

  /** The caller reads no more rows: the cursor's working memory goes back to its ColumnBuffers. */
  finish(): void {
    this.cursor?.finish();
  }

  /** Passes over the next `rows` rows of the group (the rows before a share's first). */
  async skip(rows: number): Promise<void> {
    try {
      if (this.cursor) await this.cursor.skip(rows);
    } catch (error) {
      throw columnError(error, this.name, this.column, this.groupStart + this.row);
    }
    this.row += rows;
  }

  /** Calls onPiece for the next `rows` rows of the group, in order, with the batch position of each piece's first row. */
  async read(rows: number, onPiece: (piece: ColumnPiece, at: number) => void): Promise<void> {
    let done = 0;
    try {
      if (this.cursor) {
        while (done < rows) {
          const piece = await this.cursor.next(rows - done);
          onPiece(piece, done);
          done += piece.rows;
        }
      } else {
        this.chunks ??= await readColumnRows(this.opened, this.name, this.column, this.groupStart, this.groupStart + this.groupRows);
        const values: unknown[] = [];
        forEachRow(this.chunks, this.groupStart + this.row, this.groupStart + this.row + rows, (_row, value) => values.push(value));
        if (values.length !== rows) throw new Error(`${values.length} of ${rows} rows`);
        onPiece({ rows, levels: null, levelStart: 0, presentLevel: 0, values: values as DecodedArray, indexes: null, dictionary: null, valueStart: 0 }, 0);
      }
    } catch (error) {
      throw columnError(error, this.name, this.column, this.groupStart + this.row + done);
    }
    this.row += rows;
  }
}

/** Calls `visit(row, value)` for rows [rowStart, rowEnd) of a column's chunks, in row order. */
function forEachRow(chunks: readonly ColumnData[], rowStart: number, rowEnd: number, visit: (row: number, value: unknown) => void): void {
  for (const chunk of chunks) {
    const from = Math.max(rowStart, chunk.rowStart);
    const to = Math.min(rowEnd, chunk.rowEnd, chunk.rowStart + chunk.columnData.length);
    for (let row = from; row < to; row++) visit(row, chunk.columnData[row - chunk.rowStart]);
  }
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
    // The first row group through a cursor when it holds the whole sample (only the sampled rows are decoded), else hyparquet's reader across groups.
    const firstGroup = opened.metadata.row_groups[0];
    if (Number(firstGroup.num_rows) >= sampledRows) {
      const buffers = takeBuffers(opened, column.name);
      const rows = ColumnRows.open(opened, source, firstGroup, 0, column.name, tuning, buffers);
      try {
        await rows.read(sampledRows, (piece, at) => forEachValue(piece, at, visit));
      } finally {
        rows.finish();
        returnBuffers(opened, column.name, buffers);
      }
    } else forEachRow(await readColumnRows(opened, source.name, column.name, 0, sampledRows), 0, sampledRows, visit);
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

/** A needed column of a scan: the feature slots it fills, and whether it is the label. */
interface ScanTarget {
  column: string;
  slots: number[];
  label: boolean;
  buffers: ColumnBuffers;
}

/**
 * One scan's batch of rows and what the scan counts while filling it. A class, and the batch loop
 * (readRows) a method of it apart from scanParquet's setup, for V8's sake: a parallel pass calls
 * scanParquet once per share, and one optimised function holding both the loop and the setup (whose
 * rarely run code meets other object shapes in the next share: "wrong map") was thrown away and
 * compiled again for every share (~70 ms of compiling each time, measured with --trace-opt on
 * the 1 GB table), the share meanwhile running in the interpreter. Closures made per scan and
 * inlined into the loop are dropped with it; methods on a prototype are not.
 */
class ParquetBatch {
  readonly values: Float64Array;
  readonly labels: Int32Array;
  readonly labelTexts: string[] = [];
  readonly nonNumeric: number[];
  readonly nonNumericExamples: CellExample[][];
  readonly lostPrecision: number[];
  private readonly labelIds = new Map<string, number>();
  /** A dictionary-encoded label column: the id of each dictionary entry, found once (-2: not yet). */
  private labelDictionary: DecodedArray | null = null;
  private labelOfIndex = new Int32Array(0);
  /** File rows read so far. */
  scanned = 0;

  private readonly d: number;
  private readonly batchRows: number;
  private readonly hasLabel: boolean;
  private readonly rules: CellRules;
  private readonly reader: ParquetFeatureReader;
  private readonly onBatch: ScanRequest['onBatch'];
  private readonly progress: PassProgress;
  /** The source's bytes per row, for progress by rows read. */
  private readonly bytesPerRow: number;

  constructor(scan: { d: number; batchRows: number; hasLabel: boolean; rules: CellRules; onBatch: ScanRequest['onBatch']; progress: PassProgress; bytesPerRow: number }) {
    const { d, batchRows } = scan;
    this.d = d;
    this.batchRows = batchRows;
    this.hasLabel = scan.hasLabel;
    this.rules = scan.rules;
    this.reader = new ParquetFeatureReader(scan.rules);
    this.onBatch = scan.onBatch;
    this.progress = scan.progress;
    this.bytesPerRow = scan.bytesPerRow;
    this.values = new Float64Array(batchRows * d);
    this.labels = new Int32Array(batchRows);
    this.nonNumeric = new Array<number>(d).fill(0);
    this.nonNumericExamples = Array.from({ length: d }, () => []);
    this.lostPrecision = new Array<number>(d).fill(0);
  }

  /**
   * Rows [from, to) of a row group, a batch at a time: each column's rows from its cursor, the
   * spilled columns' from the spill (`from` being its first row), each batch handed to onBatch.
   */
  async readRows(
    columns: readonly { target: ScanTarget; rows: ColumnRows }[],
    spill: { reader: SpillReader; columns: readonly { target: ScanTarget; index: number }[] } | null,
    from: number,
    to: number,
  ): Promise<void> {
    const { values, labels, batchRows, d, onBatch, progress, bytesPerRow } = this;
    const spilled = spill?.columns ?? [];
    for (let first = from; first < to; first += batchRows) {
      const n = Math.min(batchRows, to - first);
      if (d > 0) values.fill(NaN, 0, n * d);
      if (!this.hasLabel) labels.fill(-1, 0, n);
      for (const { target, rows } of columns) await rows.read(n, (piece, at) => this.storePiece(target, piece, at, first));
      for (const { target, index } of spilled) {
        const { values: column, at } = await spill!.reader.rowsOf(index, first - from, n);
        for (const slot of target.slots) for (let i = 0; i < n; i++) values[i * d + slot] = column[at + i]!;
      }
      onBatch({ rows: n, firstRow: first, values: values.subarray(0, n * d), labels: labels.subarray(0, n) }, this.labelTexts);
      this.scanned += n;
      progress.update(Math.round(bytesPerRow * (first + n)));
    }
  }

  /** Labels are interned in row order, so ids follow the order of first appearance. */
  private labelId(value: unknown): number {
    const text = textOf(value, this.rules);
    if (text === undefined) return -1;
    let id = this.labelIds.get(text);
    if (id === undefined) {
      id = this.labelTexts.length;
      this.labelIds.set(text, id);
      this.labelTexts.push(text);
    }
    return id;
  }

  private storeFeature(slot: number, batchRow: number, row: number, value: unknown): void {
    const { values, d, reader } = this;
    if (typeof value === 'number') {
      values[batchRow * d + slot] = value;
      return;
    }
    values[batchRow * d + slot] = reader.valueOf(value);
    if (reader.lostPrecision) this.lostPrecision[slot]++;
    if (reader.lastKind === CELL_TEXT) {
      this.nonNumeric[slot]++;
      if (this.nonNumericExamples[slot]!.length < EXAMPLES) this.nonNumericExamples[slot]!.push({ row, text: textOf(value, this.rules) ?? '' });
    }
  }

  /** Writes a piece of column `target` into batch rows at…, `first` being the file row of batch row 0. */
  private storePiece(target: ScanTarget, piece: ColumnPiece, at: number, first: number): void {
    const { levels, levelStart, presentLevel, indexes, dictionary, valueStart } = piece;
    const rows = piece.rows;
    if (target.label) {
      const labels = this.labels;
      if (indexes && dictionary) {
        if (this.labelDictionary !== dictionary) {
          this.labelDictionary = dictionary;
          this.labelOfIndex = new Int32Array(dictionary.length).fill(-2);
        }
        const labelOfIndex = this.labelOfIndex;
        let next = valueStart;
        for (let i = 0; i < rows; i++) {
          if (levels && levels[levelStart + i] !== presentLevel) {
            labels[at + i] = -1;
            continue;
          }
          const index = indexes[next++]!;
          let id = labelOfIndex[index]!;
          if (id === -2) id = labelOfIndex[index] = this.labelId(dictionary[index]);
          labels[at + i] = id;
        }
      } else {
        forEachValue(piece, at, (batchRow, value) => (labels[batchRow] = this.labelId(value)));
      }
    }
    for (const slot of target.slots) {
      if (copyNumbers(piece, this.values, at, this.d, slot)) continue;
      forEachValue(piece, at, (batchRow, value) => this.storeFeature(slot, batchRow, first + batchRow, value));
    }
  }
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
  const progress = new PassProgress(request.control, request.pass ?? 'rows', source.size);
  const bytesPerRow = source.size / Math.max(1, opened.rows);
  const batch = new ParquetBatch({ d: features.length, batchRows: Math.max(1, tuning.batchRows), hasLabel: label !== undefined, rules, onBatch: request.onBatch, progress, bytesPerRow });
  const targets: ScanTarget[] = needed.map((column) => ({
    column,
    slots: features.flatMap((feature, slot) => (feature.name === column ? [slot] : [])),
    label: label?.name === column,
    buffers: takeBuffers(opened, column),
  }));

  const only = request.rows;
  try {
    let groupStart = 0;
    for (const [groupIndex, group] of opened.metadata.row_groups.entries()) {
      const groupRows = Number(group.num_rows);
      const groupEnd = groupStart + groupRows;
      const from = only ? Math.max(groupStart, only.start) : groupStart;
      const to = only ? Math.min(groupEnd, only.end) : groupEnd;
      if (from >= to) {
        groupStart = groupEnd;
        continue;
      }
      // A provisional answer's limit: the rows after it will not be read.
      const readTo = Math.min(to, Math.max(from, request.rowLimit ?? to));
      const spill = await spillOf(opened, source, group, groupIndex, groupStart, from, to, readTo - from, targets, tuning, rules, () => progress.update(Math.round(bytesPerRow * from)));
      const spilled = spill ? { reader: spill.reader, columns: targets.flatMap((target) => (spill.columns.includes(target.column) ? [{ target, index: spill.columns.indexOf(target.column) }] : [])) } : null;
      const columns = targets.filter((target) => !spill?.columns.includes(target.column)).map((target) => ({ target, rows: ColumnRows.open(opened, source, group, groupStart, target.column, tuning, target.buffers) }));
      try {
        // Rows of the group before a share's first row are passed over.
        if (from > groupStart) for (const { rows } of columns) await rows.skip(from - groupStart);
        await batch.readRows(columns, spilled, from, to);
      } finally {
        for (const { rows } of columns) rows.finish();
        await spill?.reader.close();
      }
      groupStart = groupEnd;
    }
  } finally {
    for (const { column, buffers } of targets) returnBuffers(opened, column, buffers);
  }
  progress.finish();

  const { nonNumeric, nonNumericExamples, lostPrecision } = batch;
  const notes = [...(inspection.notes ?? schemaNotes(opened.columns))];
  const imprecise = features.filter((_, slot) => lostPrecision[slot]! > 0).map((column) => column.name);
  if (imprecise.length > 0) {
    const counts = features.map((column, slot) => (lostPrecision[slot]! > 0 ? `${column.name}: ${lostPrecision[slot]}` : '')).filter((text) => text !== '');
    notes.push({
      code: 'int64-precision',
      severity: 'warning',
      message: `INT64 values beyond ±2^53 were rounded to the nearest double (${counts.join(', ')} values).`,
      columns: imprecise,
    });
  }
  return { rows: only ? batch.scanned : opened.rows, labels: batch.labelTexts.slice(), nonNumeric, nonNumericExamples, raggedRows: 0, raggedExamples: [], notes };
}

/**
 * The share's spill (parquetSpill.ts), when this thread has scratch space and the dictionaries of
 * the share's feature columns are large: the one an earlier pass wrote, or one written now.
 */
async function spillOf(
  opened: OpenedParquet,
  source: ByteSource,
  group: RowGroup,
  groupIndex: number,
  groupStart: number,
  from: number,
  to: number,
  rowsToRead: number,
  targets: readonly { column: string; slots: number[]; label: boolean }[],
  tuning: ParquetTuning,
  rules: ReturnType<typeof cellRulesFor>,
  check: () => void,
): Promise<{ columns: string[]; reader: SpillReader } | null> {
  const scratch = scratchSpace();
  if (!scratch) return null;
  const space = scratch.space;
  const candidates = targets.filter((target) => !target.label && target.slots.length > 0).map((target) => target.column);
  const columns = columnsToSpill(opened.metadata, group, candidates, rowsToRead, scratch.limits);
  if (columns.length === 0) return null;
  const name = spillName(source, groupIndex, from, to, columns);
  const open = (): Promise<SpillReader | null> => SpillReader.open(space, name, columns.length, to - from);
  let reader = await open();
  if (!reader) {
    const rows = { source, metadata: opened.metadata, group, groupStart, from, to, columns };
    const fail = (error: unknown, column: string, row: number): Error => columnError(error, source.name, column, row);
    if (!(await writeSpill(space, name, rows, { compressors, tuning, rules, check, columnError: fail }))) return null;
    reader = await open();
  }
  return reader ? { columns, reader } : null;
}

/**
 * For a file of one row group read by several threads (each its own run of rows, every one needing
 * every dictionary): the number dictionaries this thread has decoded for the group (inspect and
 * earlier passes decode them, in part: decoded to their ends here) moved into shared memory, so
 * that the threads hold them once. Null
 * when there is nothing to share, when the threads spill their shares instead (scratch space and
 * large dictionaries: parquetSpill.ts), or no shared memory (a browser page that is not cross-origin isolated).
 */
export async function shareParquetDictionaries(source: ByteSource, shareRows: number): Promise<SharedDictionaries | null> {
  if (typeof SharedArrayBuffer === 'undefined') return null;
  const opened = await openParquet(source);
  const kept = opened.dictionaries;
  if (opened.metadata.row_groups.length !== 1 || kept.group !== opened.metadata.row_groups[0]) return null;
  // Dictionaries too large to hold: each thread spills its share instead (parquetSpill.ts).
  const scratch = scratchSpace();
  if (scratch && groupSpills(opened.metadata, kept.group, shareRows, scratch.limits)) return null;
  const shared: SharedDictionaries = [];
  for (const [offset, entry] of kept.byOffset) {
    // A dictionary decoded in part so far (GrowingDictionary) is decoded to its end: the other threads read anywhere in it.
    if (entry instanceof GrowingDictionary) await entry.fillTo(entry.values.length);
    const values = entry instanceof GrowingDictionary ? entry.values : entry;
    if (!isNumberArray(values)) continue;
    let copy: NumberArray = values;
    if (!(values.buffer instanceof SharedArrayBuffer)) {
      const Type = values.constructor as new (buffer: SharedArrayBuffer) => NumberArray;
      copy = new Type(new SharedArrayBuffer(values.byteLength));
      copy.set(values as never);
      kept.byOffset.set(offset, copy);
    }
    kept.shared.set(offset, copy);
    shared.push([offset, copy]);
  }
  return shared.length > 0 ? shared : null;
}

/** Takes dictionaries shared by another thread (shareParquetDictionaries) for this thread's reads of the source. */
export async function adoptParquetDictionaries(source: ByteSource, shared: SharedDictionaries): Promise<void> {
  const kept = (await openParquet(source)).dictionaries;
  for (const [offset, values] of shared) {
    const known = kept.shared.get(offset);
    if (known && isNumberArray(known) && known.buffer === values.buffer) continue;
    kept.shared.set(offset, values);
    kept.byOffset.set(offset, values);
  }
}

/** The number of rows in each row group, in file order (a parallel scan splits between groups). */
export async function parquetRowGroups(source: ByteSource): Promise<number[]> {
  const opened = await openParquet(source);
  return opened.metadata.row_groups.map((group) => Number(group.num_rows));
}

