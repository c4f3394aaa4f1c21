/**
 * The plot sample as pass 2 draws it, kept in growable flat typed arrays: a point is a handful of
 * numbers, and a small array per point and per field (what the report holds, FitReport['sample'])
 * would be garbage for the collector while the pass runs and slow to copy between threads. The
 * nested arrays are made once, at the end.
 */
import type { FitReport } from '../types';

/** The sample of a pass (or of one range of it) in flat arrays. */
export interface PackedSample {
  total: number;
  rows: Int32Array;
  /** Absent for formats without lines. */
  lines: Int32Array | null;
  classIndex: Int32Array;
  /** rows × ldAxes, row-major. */
  ld: Float64Array;
  ldAxes: number;
  /** rows × 2. */
  pc: Float64Array;
  /** rows × topCount. */
  top: Float64Array;
  topCount: number;
}

export class SampleCollector {
  total = 0;
  count = 0;
  hasLines = true;
  private rows = new Int32Array(256);
  private lines = new Int32Array(256);
  private classIndex = new Int32Array(256);
  private ld: Float64Array;
  private pc = new Float64Array(512);
  private top: Float64Array;

  constructor(
    readonly ldAxes: number,
    readonly topCount: number,
  ) {
    this.ld = new Float64Array(256 * ldAxes);
    this.top = new Float64Array(256 * topCount);
  }

  /** One drawn point: its discriminant scores (first ldAxes of `ld`), principal scores, and the values of `topFeatures` in `values` from `offset`. */
  add(row: number, line: number | undefined, classIndex: number, ld: Float64Array, pc: Float64Array, values: Float64Array, offset: number, topFeatures: readonly number[]): void {
    const n = this.count;
    if (n === this.rows.length) this.grow(2 * n);
    this.rows[n] = row;
    this.lines[n] = line ?? 0;
    this.classIndex[n] = classIndex;
    for (let a = 0; a < this.ldAxes; a++) this.ld[n * this.ldAxes + a] = ld[a]!;
    this.pc[2 * n] = pc[0]!;
    this.pc[2 * n + 1] = pc[1]!;
    for (let f = 0; f < this.topCount; f++) this.top[n * this.topCount + f] = values[offset + topFeatures[f]!]!;
    this.count = n + 1;
  }

  private grow(size: number): void {
    const grown = <T extends Int32Array | Float64Array>(old: T, width: number): T => {
      const next = new (old.constructor as new (length: number) => T)(size * width);
      next.set(old);
      return next;
    };
    this.rows = grown(this.rows, 1);
    this.lines = grown(this.lines, 1);
    this.classIndex = grown(this.classIndex, 1);
    this.ld = grown(this.ld, this.ldAxes);
    this.pc = grown(this.pc, 2);
    this.top = grown(this.top, this.topCount);
  }

  packed(): PackedSample {
    const n = this.count;
    return {
      total: this.total,
      rows: this.rows.slice(0, n),
      lines: this.hasLines ? this.lines.slice(0, n) : null,
      classIndex: this.classIndex.slice(0, n),
      ld: this.ld.slice(0, n * this.ldAxes),
      ldAxes: this.ldAxes,
      pc: this.pc.slice(0, 2 * n),
      top: this.top.slice(0, n * this.topCount),
      topCount: this.topCount,
    };
  }
}

/** The first `width` numbers from `at` of `values` as a new array (no view, no iterator: this runs for every point). */
function slice(values: Float64Array, at: number, width: number): number[] {
  const out = new Array<number>(width);
  for (let i = 0; i < width; i++) out[i] = values[at + i]!;
  return out;
}

/**
 * The report's form of packed samples, joined in order (the ranges of a parallel pass, or one
 * pass). The arrays are sized once: this builds some 150 000 small arrays for a full sample, at
 * the end of the run when memory peaks, so nothing here makes garbage it can avoid.
 */
export function unpackSamples(parts: readonly PackedSample[]): Omit<FitReport['sample'], 'topFeatures'> & { topFeatureValues: number[][] } {
  let n = 0;
  let total = 0;
  let hasLines = true;
  for (const packed of parts) {
    n += packed.rows.length;
    total += packed.total;
    if (!packed.lines) hasLines = false;
  }
  const rows = new Array<number>(n);
  const lines = hasLines ? new Array<number>(n) : null;
  const classIndex = new Array<number>(n);
  const ld = new Array<number[]>(n);
  const pc = new Array<number[]>(n);
  const topFeatureValues = new Array<number[]>(n);
  let at = 0;
  for (const packed of parts) {
    for (let i = 0; i < packed.rows.length; i++, at++) {
      rows[at] = packed.rows[i]!;
      if (lines) lines[at] = packed.lines![i]!;
      classIndex[at] = packed.classIndex[i]!;
      ld[at] = slice(packed.ld, i * packed.ldAxes, packed.ldAxes);
      pc[at] = [packed.pc[2 * i]!, packed.pc[2 * i + 1]!];
      topFeatureValues[at] = slice(packed.top, i * packed.topCount, packed.topCount);
    }
  }
  return { total, rows, ...(lines ? { lines } : {}), classIndex, ld, pc, topFeatureValues };
}
