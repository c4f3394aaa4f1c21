/**
 * The reader contract: `inspect` looks at the head of a source and describes its columns;
 * `scan` streams the chosen columns as row batches in one pass with bounded memory.
 */
import type { ByteSource, Progress, RunControl } from '../source';

export type SourceFormat = 'csv' | 'tsv' | 'parquet';

/** The tokens read as a missing value unless the caller gives its own list (compared exactly). */
export const DEFAULT_MISSING_TOKENS: readonly string[] = ['', 'NA', 'N/A', 'NaN', 'nan', 'null', 'NULL', '?'];

export interface ReadOptions {
  /** Default: from the file name (.csv, .tsv/.tab, .parquet), else sniffed from the bytes. */
  format?: SourceFormat;
  /** One of `,` `\t` `;` `|`; default sniffed from the first lines. */
  delimiter?: string;
  /** Whether the first row is a header; default detected. */
  header?: boolean;
  /** Cells read as missing; default DEFAULT_MISSING_TOKENS. */
  missingTokens?: readonly string[];
  /** Lines starting with this string are skipped; default: none (comments only when asked for). */
  comment?: string;
  /** Read `1,5` as 1.5 (only with a delimiter other than `,`). Default false. */
  decimalComma?: boolean;
  /** A thousands separator to ignore inside numbers, e.g. `_` or ` `. Default none. */
  thousandsSeparator?: string;
  /** Skip rows whose field count differs from the header's (counted and reported) instead of failing. */
  skipRaggedRows?: boolean;
}

export type ColumnKind = 'numeric' | 'text' | 'empty' | 'nested';

export interface ColumnSummary {
  name: string;
  /** Position in the file, 0-based. */
  index: number;
  /** What the sampled cells look like; `nested` only for Parquet groups/lists (ignored with a finding). */
  kind: ColumnKind;
  /** Distinct non-missing values among the sampled rows, capped at 1000. */
  distinct: number;
  /** Whether every sampled non-missing numeric value is an integer. */
  integral: boolean;
  /** Missing cells among the sampled rows. */
  missing: number;
}

export interface TableInspection {
  source: string;
  format: SourceFormat;
  /** Text formats only. */
  delimiter?: string;
  header: boolean;
  columns: ColumnSummary[];
  /** Rows looked at to build the summaries. */
  sampledRows: number;
  /** Exact for Parquet; an estimate from the sampled bytes for text. */
  estimatedRows: number;
  /** Whether byte-range scans may start at any line start (false when a quoted field holds a newline). */
  splittable: boolean;
  /** The options in force after sniffing, to pass to `scan`. */
  options: Required<Pick<ReadOptions, 'missingTokens'>> & ReadOptions;
  /** What the reader noticed while inspecting (renamed duplicate or blank header names, nested Parquet columns…); `scan` repeats them in its summary. */
  notes?: ReaderNote[];
}

/** A finding the reader itself makes. */
export interface ReaderNote {
  code: string;
  severity: 'info' | 'warning' | 'error';
  message: string;
  columns?: string[];
}

/** Which columns to stream: the label and the features, by 0-based file position. */
export interface ScanPlan {
  label: number;
  features: number[];
}

/** A block of rows, at most a few thousand, in file order. */
export interface RowBatch {
  rows: number;
  /** 0-based data row (file order, header excluded, skipped ragged rows included) of the first row. */
  firstRow: number;
  /** rows × features.length, row-major. NaN = missing or not a number; ±Infinity kept as read. */
  values: Float64Array;
  /** Index into the scan's label dictionary; -1 = missing label. */
  labels: Int32Array;
  /** 1-based line where each row starts (text formats); absent for Parquet. */
  lines?: Int32Array;
}

/** Where a cell or row sits, for messages and for "reveal in file". */
export interface CellExample {
  row: number;
  line?: number;
  text: string;
}

export interface ScanSummary {
  /** Data rows seen (including skipped ragged rows). */
  rows: number;
  /** Label dictionary, in order of first appearance. */
  labels: string[];
  /** Per feature (plan order): cells that were present but not a number nor a missing token. */
  nonNumeric: number[];
  /** Per feature: first few such cells. */
  nonNumericExamples: CellExample[][];
  /** Rows skipped because their field count was wrong (only with skipRaggedRows). */
  raggedRows: number;
  raggedExamples: CellExample[];
  /** Findings the reader itself makes (Parquet INT64 precision loss, nested columns ignored, …). */
  notes: ReaderNote[];
  /** Text formats: the 1-based line where the scan stopped (the line of the next row after the range). */
  endLine?: number;
}

/** A byte range of a text source for a parallel scan; the reader aligns it to row starts. */
export interface ByteRange {
  start: number;
  end: number;
  /**
   * The 1-based line and 0-based data row at `start`, when the caller knows them and `start` is a
   * row start (just after a line feed): the reader then skips counting the rows before the range.
   * A caller that numbers rows relative to the range passes { line: 1, row: 0 }.
   */
  origin?: { line: number; row: number };
}

export interface ScanRequest {
  source: ByteSource;
  inspection: TableInspection;
  plan: ScanPlan;
  /** Called for each batch; the batch's arrays are reused after the call returns. */
  onBatch: (batch: RowBatch, labels: readonly string[]) => void;
  control?: RunControl;
  /** Text formats: scan only rows that start inside this range. */
  range?: ByteRange;
  /** Parquet: scan only the data rows [start, end) (a parallel scan's share: whole row groups). */
  rows?: { start: number; end: number };
  /**
   * The caller stops the scan at this data row (a provisional answer's limit): a reader need not
   * prepare for the rows after it (the Parquet reader spills no row group for a first look).
   */
  rowLimit?: number;
  /** Which pass of the caller this scan is, for its progress events; default `rows`. */
  pass?: Progress['pass'];
}
