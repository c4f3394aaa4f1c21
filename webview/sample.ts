/**
 * The report's plot sample as typed columns (one array per discriminant and principal component),
 * built once per report, and the lookup from a data row to its place in the sample.
 */
import type { FitReport } from '../src/core/types';
import type { PackedSample } from '../src/shared/packedSample';

/** The sample's columns as typed arrays, built once per report. */
export interface SampleColumns {
  count: number;
  classIndex: Int32Array;
  discriminant: Float64Array[];
  principal: Float64Array[];
  /** Data row → sample index, or undefined when the row is not in the sample. */
  indexOfRow: (row: number) => number | undefined;
}

/**
 * Finds a data row among the sampled rows. The sample lists rows in file order, so a binary search
 * over them needs no index at all (a map of a million rows would take seconds to build); rows in
 * any other order get a map, built on first use.
 */
export function rowLookup(rows: readonly number[]): (row: number) => number | undefined {
  let sorted = true;
  for (let i = 1; i < rows.length && sorted; i++) sorted = rows[i - 1] < rows[i];
  if (sorted) {
    return (row) => {
      let low = 0;
      let high = rows.length - 1;
      while (low <= high) {
        const middle = (low + high) >> 1;
        if (rows[middle] === row) return middle;
        if (rows[middle] < row) low = middle + 1;
        else high = middle - 1;
      }
      return undefined;
    };
  }
  let map: Map<number, number> | null = null;
  return (row) => {
    map ??= new Map(rows.map((r, i) => [r, i]));
    return map.get(row);
  };
}

/** `packed`: the same sample as it arrived in typed columns; its columns are used as they are. */
export function sampleColumns(report: FitReport, packed?: PackedSample): SampleColumns {
  const { sample } = report;
  const count = sample.rows.length;
  if (packed && packed.rows.length === count) {
    const ldCount = Math.min(packed.ld.length, report.discriminant.eigenvalues.length);
    const pcCount = Math.min(packed.pc.length, report.pca.explainedRatio.length, 2);
    return {
      count,
      classIndex: packed.classIndex,
      discriminant: packed.ld.slice(0, ldCount),
      principal: packed.pc.slice(0, pcCount),
      indexOfRow: rowLookup(sample.rows),
    };
  }
  const column = (rows: number[][], j: number): Float64Array => {
    const out = new Float64Array(count);
    for (let i = 0; i < count; i++) out[i] = rows[i]?.[j] ?? NaN;
    return out;
  };
  const ldCount = Math.min(sample.ld[0]?.length ?? 0, report.discriminant.eigenvalues.length);
  const pcCount = Math.min(sample.pc[0]?.length ?? 0, report.pca.explainedRatio.length, 2);
  return {
    count,
    classIndex: Int32Array.from(sample.classIndex),
    discriminant: Array.from({ length: ldCount }, (_, j) => column(sample.ld, j)),
    principal: Array.from({ length: pcCount }, (_, j) => column(sample.pc, j)),
    indexOfRow: rowLookup(sample.rows),
  };
}
