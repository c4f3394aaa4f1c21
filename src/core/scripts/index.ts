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
import { momentsQueryStatements } from './sql';
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
  /** Where the columns came from, for the comment on top (e.g. the file's name and SHA-256). */
  fileDescription: string;
  maxAggregates?: number;
}

/**
 * The moments query for a table holding the columns of a file: its label and the features that
 * screen rows, each shifted by `shifts[j]` (an estimate of its mean, rounded to 6 significant
 * digits here; any finite value is correct, a close one keeps the sums accurate).
 */
export function momentsQueryForTable(label: string, features: readonly string[], shifts: readonly number[], options: MomentsQueryOptions): string {
  return momentsQueryStatementsForTable(label, features, shifts, options).join('\n\n') + '\n';
}

/** The same query as separate statements (each a complete query ending in `;`). */
export function momentsQueryStatementsForTable(label: string, features: readonly string[], shifts: readonly number[], options: MomentsQueryOptions): string[] {
  return momentsQueryStatements({
    dialect: options.dialect,
    table: options.table,
    ...(options.schema !== undefined ? { schema: options.schema } : {}),
    label,
    features: [...features],
    shifts: shifts.map(roundedShift),
    ...(options.maxAggregates !== undefined ? { maxAggregates: options.maxAggregates } : {}),
    provenance: [
      `Per-class moments for ${options.generator}: run on a table with the columns of ${options.fileDescription}.`,
      'Fitting the result (scatterwise fit --moments RESULT.csv) gives the figures of fitting the rows themselves.',
    ],
  });
}

/** The shifts for `features` from moments (the overall mean of each; 0 for a feature they lack). */
export function shiftsFromMoments(moments: Moments, features: readonly string[]): number[] {
  const mean = overallMean(moments);
  return features.map((name) => {
    const j = moments.features.indexOf(name);
    return j < 0 ? 0 : mean[j]!;
  });
}

/** The features that screen rows in a fit (solved and removed ones, not those dropped for missing values), in file order. */
export { screenedFeatures } from './plan';
