/**
 * The dictionary-encoded number columns of a huge row group, spilled to scratch space
 * (scratch.ts) as plain doubles before a pass reads the group's rows.
 *
 * Why: a writer may dictionary-encode every column of a row group of millions of rows with most of
 * its distinct values (DuckDB's one-group copy of the 1 GB benchmark table: some 840 000 doubles a
 * column, 129 MB of dictionary pages for its 20 features). Read row by row, every dictionary is
 * held at once, on top of the fit's own memory, and every value is a load from a random place in
 * all of them, which no cache holds (20–28 ns a value, measured). Spilled, a share of the group is
 * decoded one column at a time, with one dictionary in memory (dropped before the next), into a
 * scratch file of doubles, column after column; every pass then reads the share's rows from it
 * in order. The file is named by the source, the group, the rows and the columns, and committed
 * whole, so whichever thread reads the same share in a later pass takes it as it is.
 *
 * Only columns read as plain numbers are spilled (DOUBLE, FLOAT, INT32 without a logical type
 * that changes their meaning), with the values the row-by-row scan would store: a missing value
 * (or a stored NaN) is NaN.
 */
import type { Compressors, FileMetaData } from 'hyparquet';
import { getSchemaPath, isFlatColumn } from 'hyparquet/src/schema.js';
import type { ByteSource } from '../source';
import { ColumnBuffers, copyNumbers, FlatColumnCursor, forEachValue, plainNumbers, type CursorTuning } from './parquetCursor';
import { ParquetFeatureReader } from './parquetValues';
import { ScratchUnavailable, type ScratchReader, type ScratchSpace, type SpillLimits } from './scratch';
import type { CellRules } from './cellValue';
import { hashBytes } from './labelDictionary';

type RowGroup = FileMetaData['row_groups'][number];

/** Rows of a spilled column decoded and written, or read back, at a time. */
const SPILL_WINDOW_ROWS = 16_384;

const SPILLED_TYPES = new Set(['DOUBLE', 'FLOAT', 'INT32']);

/** Bytes of the column's dictionary pages in the group (0 when it has none). */
function dictionaryBytes(meta: NonNullable<RowGroup['columns'][number]['meta_data']>): number {
  if (meta.dictionary_page_offset === undefined) return 0;
  return Math.max(0, Number(meta.data_page_offset) - Number(meta.dictionary_page_offset));
}

/** Bytes of the dictionary pages of column `name`'s chunk in the group, when its type is one the spill takes (else 0). */
function candidateBytes(group: RowGroup, name: string): number {
  const chunk = group.columns.find((candidate) => candidate.meta_data?.path_in_schema.length === 1 && candidate.meta_data.path_in_schema[0] === name);
  const meta = chunk?.meta_data;
  if (!chunk || !meta || chunk.file_path !== undefined || !SPILLED_TYPES.has(meta.type)) return 0;
  return dictionaryBytes(meta);
}

/** Whether column `name` is flat and read as plain numbers (no logical type that changes its meaning). */
function plainFlatColumn(metadata: FileMetaData, name: string): boolean {
  const schemaPath = getSchemaPath(metadata.schema, [name]);
  return isFlatColumn(schemaPath) && plainNumbers(schemaPath[schemaPath.length - 1]!.element);
}

/**
 * The columns of a share of `rows` rows of the group to spill (of `candidates`, in their order):
 * none unless their dictionaries are large. The sizes come from the footer's offsets first: a
 * group of small dictionaries (the common case, checked for every group of every scan) is turned
 * down without a look at the schema.
 */
export function columnsToSpill(metadata: FileMetaData, group: RowGroup, candidates: readonly string[], rows: number, limits: SpillLimits): string[] {
  if (rows < limits.minRows) return [];
  const sized = candidates.map((name) => ({ name, bytes: candidateBytes(group, name) })).filter((c) => c.bytes > 0);
  if (sized.reduce((sum, c) => sum + c.bytes, 0) < limits.dictionaryBytes) return [];
  const spilled = sized.filter((c) => plainFlatColumn(metadata, c.name));
  return spilled.reduce((sum, c) => sum + c.bytes, 0) >= limits.dictionaryBytes ? spilled.map((c) => c.name) : [];
}

/** Whether a share of `rows` rows of the group would be spilled whatever features a pass reads (the dictionaries of all its columns). */
export function groupSpills(metadata: FileMetaData, group: RowGroup, rows: number, limits: SpillLimits): boolean {
  const names = group.columns.flatMap((chunk) => (chunk.meta_data?.path_in_schema.length === 1 ? [chunk.meta_data.path_in_schema[0]!] : []));
  return columnsToSpill(metadata, group, names, rows, limits).length > 0;
}

/** The label dictionary's FNV-1a over the text's UTF-8 bytes, as 8 hex digits (a name, not a checksum). */
function fingerprint(text: string): string {
  const bytes = new TextEncoder().encode(text);
  return (hashBytes(bytes, 0, bytes.length) >>> 0).toString(16).padStart(8, '0');
}

/** The scratch file's name for rows [from, to) of group `group` of the source, spilled columns `columns`. */
export function spillName(source: ByteSource, group: number, from: number, to: number, columns: readonly string[]): string {
  return `parquet-${fingerprint([source.name, String(source.size), ...columns].join('\u0000'))}-g${group}-r${from}-${to}.f64`;
}

/** What a spill holds: rows [from, to) of some columns of one row group (`groupStart` being the group's first row). */
export interface SpillRows {
  source: ByteSource;
  metadata: FileMetaData;
  group: RowGroup;
  groupStart: number;
  from: number;
  to: number;
  columns: readonly string[];
}

/** How a spill is written: `check` is called between windows (it throws to cancel); `columnError` turns a reader failure into the scan's DataError. */
export interface SpillOptions {
  compressors: Compressors;
  tuning: CursorTuning;
  rules: CellRules;
  check: () => void;
  columnError: (error: unknown, column: string, row: number) => Error;
}

/**
 * Decodes rows [from, to) of each column into the scratch file `name`: column i's rows at
 * doubles [i · rows, (i + 1) · rows). False when the scratch space cannot take it (the scan then
 * reads the rows as they are).
 */
export async function writeSpill(space: ScratchSpace, name: string, spill: SpillRows, options: SpillOptions): Promise<boolean> {
  const { source, metadata, group, groupStart, from, to, columns } = spill;
  const { compressors, tuning, rules, check, columnError } = options;
  let writer;
  try {
    writer = await space.create(name);
  } catch (error) {
    if (error instanceof ScratchUnavailable) return false;
    throw error;
  }
  const rows = to - from;
  const window = new Float64Array(SPILL_WINDOW_ROWS);
  const bytes = new Uint8Array(window.buffer);
  const reader = new ParquetFeatureReader(rules);
  const buffers = new ColumnBuffers();
  try {
    for (let c = 0; c < columns.length; c++) {
      const column = columns[c]!;
      // No kept dictionaries: this column's goes with its cursor, before the next column's is read.
      const cursor = FlatColumnCursor.open(source, metadata, group, column, compressors, tuning, undefined, buffers);
      if (!cursor) throw new Error(`column ${column} cannot be spilled`);
      let done = 0;
      try {
        if (from > groupStart) await cursor.skip(from - groupStart);
        while (done < rows) {
          const n = Math.min(SPILL_WINDOW_ROWS, rows - done);
          let k = 0;
          while (k < n) {
            const piece = await cursor.next(n - k);
            // A missing value is NaN (reader.valueOf(null)), as the scan stores it.
            if (!copyNumbers(piece, window, k, 1, 0)) forEachValue(piece, k, (row, value) => (window[row] = reader.valueOf(value)));
            k += piece.rows;
          }
          await writer.write((c * rows + done) * 8, bytes.subarray(0, n * 8));
          done += n;
          check();
        }
      } catch (error) {
        if (error instanceof ScratchUnavailable) throw error;
        throw columnError(error, column, from + done);
      }
    }
    await writer.commit();
    return true;
  } catch (error) {
    await writer.discard();
    if (error instanceof ScratchUnavailable) return false;
    throw error;
  }
}

/** Reads a share's spilled columns back, a window of rows per column at a time. */
export class SpillReader {
  private readonly windows: Float64Array[];
  private readonly starts: number[];
  private readonly lengths: number[];

  private constructor(
    private readonly file: ScratchReader,
    columns: number,
    private readonly rows: number,
    private readonly name: string,
  ) {
    this.windows = Array.from({ length: columns }, () => new Float64Array(0));
    this.starts = new Array<number>(columns).fill(0);
    this.lengths = new Array<number>(columns).fill(0);
  }

  /** The committed spill `name` of `columns` columns × `rows` rows, or null when there is none. */
  static async open(space: ScratchSpace, name: string, columns: number, rows: number): Promise<SpillReader | null> {
    const file = await space.open(name);
    return file ? new SpillReader(file, columns, rows, name) : null;
  }

  /** Rows [start, start + n) of spilled column `column` (relative to the share): at `at` of `values`. */
  async rowsOf(column: number, start: number, n: number): Promise<{ values: Float64Array; at: number }> {
    let values = this.windows[column]!;
    const windowStart = this.starts[column]!;
    if (start >= windowStart && start + n <= windowStart + this.lengths[column]!) return { values, at: start - windowStart };
    if (start < 0 || start + n > this.rows) throw new RangeError(`rows ${start}–${start + n} of a spill of ${this.rows} rows (${this.name})`);
    const length = Math.min(Math.max(SPILL_WINDOW_ROWS, n), this.rows - start);
    if (values.length < length) values = this.windows[column] = new Float64Array(Math.max(SPILL_WINDOW_ROWS, n));
    await this.file.read((column * this.rows + start) * 8, new Uint8Array(values.buffer, 0, length * 8));
    this.starts[column] = start;
    this.lengths[column] = length;
    return { values, at: 0 };
  }

  close(): Promise<void> {
    return this.file.close();
  }
}
