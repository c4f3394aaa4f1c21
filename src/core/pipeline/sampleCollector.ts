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

/** The report's form of packed samples, joined in order (the ranges of a parallel pass, or one pass). */
export function unpackSamples(parts: readonly PackedSample[]): Omit<FitReport['sample'], 'topFeatures'> & { topFeatureValues: number[][] } {
  const sample: Omit<FitReport['sample'], 'topFeatures'> & { topFeatureValues: number[][] } = { total: 0, rows: [], lines: [], classIndex: [], ld: [], pc: [], topFeatureValues: [] };
  let hasLines = true;
  for (const packed of parts) {
    sample.total += packed.total;
    if (!packed.lines) hasLines = false;
    for (let i = 0; i < packed.rows.length; i++) {
      sample.rows.push(packed.rows[i]!);
      if (packed.lines) sample.lines!.push(packed.lines[i]!);
      sample.classIndex.push(packed.classIndex[i]!);
      sample.ld.push(Array.from(packed.ld.subarray(i * packed.ldAxes, (i + 1) * packed.ldAxes)));
      sample.pc.push([packed.pc[2 * i]!, packed.pc[2 * i + 1]!]);
      sample.topFeatureValues.push(Array.from(packed.top.subarray(i * packed.topCount, (i + 1) * packed.topCount)));
    }
  }
  if (!hasLines) delete sample.lines;
  return sample;
}
