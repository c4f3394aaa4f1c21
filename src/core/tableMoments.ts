/**
 * The per-class moments of a table, with the same column roles and row screening as a fit
 * (analyze.ts): `scatterwise moments FILE --out PART.json` writes them so parts computed from
 * shards on different machines merge into the fit of the whole (momentsIO.readMomentsInputs).
 * Policy `drop-columns` drops the feature columns with a missing or non-numeric cell in this part;
 * parts then only merge when they kept the same columns, which the merge checks.
 */
import { DataError } from './errors';
import type { Moments } from './moments';
import { firstPass } from './pipeline/firstPass';
import { resolveOptions } from './pipeline/options';
import { inspectTable } from './read/index';
import { assignRoles } from './roles';
import type { ByteSource, RunControl } from './source';
import type { FitOptions } from './types';

export interface TableMoments {
  moments: Moments;
  label: string;
  rows: { total: number; used: number; droppedMissing: number; droppedNonFinite: number };
  /** Feature columns dropped under policy drop-columns. */
  droppedColumns: string[];
}

/** `byteBudget`: read only about this many leading bytes (a quick estimate, e.g. of the means). */
export async function tableMoments(source: ByteSource, partial?: Partial<FitOptions>, control?: RunControl, byteBudget?: number): Promise<TableMoments> {
  const options = resolveOptions(partial);
  const inspection = await inspectTable(source, options.read, control);
  const roles = assignRoles(inspection, options);
  let features = roles.features;
  const pass = (columns: typeof features) =>
    firstPass(source, inspection, { label: roles.label.index, features: columns.map((c) => c.index), featureNames: columns.map((c) => c.name), moments: true }, control, byteBudget !== undefined && byteBudget < source.size ? byteBudget : undefined);
  let result = await pass(features);
  const droppedColumns: string[] = [];
  if (options.missing === 'drop-columns') {
    const withMissing = new Set(features.filter((_, j) => result.nanCells[j]! > 0).map((c) => c.name));
    if (withMissing.size === features.length) {
      throw new DataError(
        'no-features',
        `${source.name}: every feature column has missing or non-numeric cells, so policy drop-columns leaves none.`,
        { file: source.name },
        'Use --missing drop-rows instead.',
      );
    }
    if (withMissing.size > 0) {
      droppedColumns.push(...withMissing);
      features = features.filter((c) => !withMissing.has(c.name));
      result = await pass(features);
    }
  }
  return {
    moments: result.moments!,
    label: roles.label.name,
    rows: { total: result.rows, used: result.used, droppedMissing: result.droppedMissing, droppedNonFinite: result.droppedNonFinite },
    droppedColumns,
  };
}
