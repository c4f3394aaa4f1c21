/**
 * The report's plot sample as it travels from the fit worker to the host and on to the panel: one
 * typed array per column instead of an array of small arrays per point.
 *
 * Why: a message is copied at each hop (worker → host by structured cloning, host → panel by VS
 * Code's serialization, then cloned again into the webview's frame). An array of arrays costs each
 * hop work per element, on the host's event loop too: measured ~0.7–0.9 s to post a 50 000-point
 * report and ~11 s to clone a million points in Chromium. A typed array is copied in one piece, is
 * transferred (not copied) out of the worker, and VS Code posts ArrayBuffers to a webview outside
 * the JSON text since 1.57. The panel draws from columns anyway (webview/sample.ts).
 */
import type { FitReport } from '../core/types';

export interface PackedSample {
  /** Rows of the fitted data the sample was drawn from. */
  total: number;
  /** 0-based data row of each point, in file order. Float64: exact for any row count. */
  rows: Float64Array;
  /** 1-based line of each point in a text file. */
  lines?: Float64Array;
  /** Index into report.classes of each point. */
  classIndex: Int32Array;
  /** One column per discriminant score (up to 3), each as long as `rows`. */
  ld: Float64Array[];
  /** One column per principal component score (up to 2). */
  pc: Float64Array[];
  /** The top univariate features: their names and one column of values per name. */
  topFeatures: { names: string[]; values: Float64Array[] };
}

/** A report as the panel receives it: everything as in FitReport but the sample, which is packed. */
export type PanelReport = Omit<FitReport, 'sample'> & { sample: PackedSample };

/** Column `j` of rows × columns data; a missing cell is NaN. */
function column(rows: readonly (readonly number[] | undefined)[], j: number): Float64Array {
  const out = new Float64Array(rows.length);
  for (let i = 0; i < rows.length; i++) out[i] = rows[i]?.[j] ?? NaN;
  return out;
}

/** Columns as many as the widest row has. */
function columns(rows: readonly (readonly number[] | undefined)[]): Float64Array[] {
  let width = 0;
  for (const row of rows) if (row && row.length > width) width = row.length;
  return Array.from({ length: width }, (_, j) => column(rows, j));
}

export function packSample(sample: FitReport['sample']): PackedSample {
  return {
    total: sample.total,
    rows: Float64Array.from(sample.rows),
    ...(sample.lines ? { lines: Float64Array.from(sample.lines) } : {}),
    classIndex: Int32Array.from(sample.classIndex),
    ld: columns(sample.ld),
    pc: columns(sample.pc),
    topFeatures: {
      names: [...sample.topFeatures.names],
      values: sample.topFeatures.names.map((_, f) => column(sample.topFeatures.values, f)),
    },
  };
}

export function packReport(report: FitReport): PanelReport {
  return { ...report, sample: packSample(report.sample) };
}

/** Rows × columns again, for code that takes a FitReport (comparisons, scripts). */
export function unpackSample(sample: PackedSample): FitReport['sample'] {
  const count = sample.rows.length;
  const rowsOf = (cols: readonly Float64Array[]): number[][] => Array.from({ length: count }, (_, i) => cols.map((c) => c[i]!));
  return {
    total: sample.total,
    rows: Array.from(sample.rows),
    ...(sample.lines ? { lines: Array.from(sample.lines) } : {}),
    classIndex: Array.from(sample.classIndex),
    ld: rowsOf(sample.ld),
    pc: rowsOf(sample.pc),
    topFeatures: { names: [...sample.topFeatures.names], values: rowsOf(sample.topFeatures.values) },
  };
}

export function unpackReport(report: PanelReport): FitReport {
  return { ...report, sample: unpackSample(report.sample) };
}

/** The buffers of a packed sample, for a worker's transfer list (they are moved, not copied). */
export function sampleBuffers(sample: PackedSample): ArrayBuffer[] {
  const arrays = [sample.rows, sample.classIndex, ...sample.ld, ...sample.pc, ...sample.topFeatures.values, ...(sample.lines ? [sample.lines] : [])];
  return [...new Set(arrays.map((array) => array.buffer as ArrayBuffer))];
}

/** Checks the shape of a packed sample: the right kinds of arrays, all of one length. */
export function isPackedSample(v: unknown): v is PackedSample {
  if (typeof v !== 'object' || v === null) return false;
  const s = v as Record<string, unknown>;
  if (!(s.rows instanceof Float64Array) || !(s.classIndex instanceof Int32Array) || typeof s.total !== 'number') return false;
  const count = s.rows.length;
  const isColumn = (c: unknown): boolean => c instanceof Float64Array && c.length === count;
  const isColumns = (c: unknown): boolean => Array.isArray(c) && c.every(isColumn);
  const top = s.topFeatures as Record<string, unknown> | undefined;
  return (
    s.classIndex.length === count &&
    (s.lines === undefined || isColumn(s.lines)) &&
    isColumns(s.ld) &&
    isColumns(s.pc) &&
    typeof top === 'object' &&
    top !== null &&
    Array.isArray(top.names) &&
    top.names.every((name) => typeof name === 'string') &&
    isColumns(top.values) &&
    (top.values as unknown[]).length === top.names.length
  );
}
