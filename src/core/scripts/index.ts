/**
 * Generated scripts that reproduce or scale out a fit: a Python or R script that refits the same
 * file and checks the figures (`reproductionScript`), and a SQL query that computes the per-class
 * moments inside a database (`momentsQueryForTable`). Used by `scatterwise script` and the editor's
 * "generate fit script" command; both only read the data file.
 */
import type { Moments } from '../moments';
import { overallMean } from '../moments';
import type { TableInspection } from '../read/types';
import type { FitReport } from '../types';
import { planFromReport } from './plan';
import { pythonScript } from './python';
import { rScript } from './r';
import { momentsQuery } from './sql';
import type { SqlDialect } from './quoting';

export { SQL_DIALECTS, type SqlDialect } from './quoting';
export { planFromReport, type ReproductionPlan } from './plan';

export const SCRIPT_LANGUAGES = ['python', 'r', 'sql'] as const;
export type ScriptLanguage = (typeof SCRIPT_LANGUAGES)[number];

/** The Python or R script for a finished fit of `dataPath` (the report must carry the file's SHA-256). */
export function reproductionScript(language: 'python' | 'r', report: FitReport, inspection: TableInspection, generator: string, dataPath: string): string {
  const plan = planFromReport(report, inspection, generator, dataPath);
  return language === 'python' ? pythonScript(plan) : rScript(plan);
}

/** `value` rounded to 6 significant digits: a shift only needs to lie near the data. */
function roundedShift(value: number): number {
  return Number.isFinite(value) ? Number(value.toPrecision(6)) : 0;
}

export interface MomentsQueryOptions {
  dialect: SqlDialect;
  table: string;
  schema?: string;
  generator: string;
  /** Where the shifts came from, for the comment on top (e.g. the file's name and SHA-256). */
  fileDescription: string;
  maxAggregates?: number;
}

/**
 * The moments query for a table holding the same columns as the file whose moments are given: the
 * same label and features (every feature that screens rows), each shifted by its overall mean
 * (rounded), so the sums lose few digits to cancellation.
 */
export function momentsQueryForTable(moments: Moments, label: string, options: MomentsQueryOptions): string {
  const mean = overallMean(moments);
  return momentsQuery({
    dialect: options.dialect,
    table: options.table,
    ...(options.schema !== undefined ? { schema: options.schema } : {}),
    label,
    features: [...moments.features],
    shifts: moments.features.map((_, j) => roundedShift(mean[j]!)),
    ...(options.maxAggregates !== undefined ? { maxAggregates: options.maxAggregates } : {}),
    provenance: [
      `Per-class moments for ${options.generator}: run on a table with the columns of ${options.fileDescription}.`,
      'Fitting the result (scatterwise fit --moments RESULT.csv) gives the figures of fitting the rows themselves.',
    ],
  });
}
