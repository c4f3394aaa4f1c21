/**
 * What a reproduction script must do, in language-neutral terms: which file and how to read it,
 * which rows and columns, which solver, priors and cross-validation, and the figures it must
 * reproduce. Built from a finished FitReport and the inspection of its file; the Python and R
 * generators only translate it.
 */
import type { TableInspection } from '../read/types';
import { DEFAULT_MISSING_TOKENS } from '../read/types';
import type { FitOptions, FitReport } from '../types';

/** The figures a script prints and `--check` compares (report order of classes throughout). */
export interface ExpectedFigures {
  rowsUsed: number;
  labels: string[];
  counts: number[];
  eigenvalues: number[];
  explainedRatio: number[];
  shrinkage: number;
  trainingAccuracy: number;
  confusion: number[][];
  crossValidation: { method: 'loo' | 'kfold'; folds?: number; accuracy: number; confusion: number[][] } | null;
}

export interface ReproductionPlan {
  /** Program and version that wrote the script. */
  generator: string;
  /** The data file as the user named it (shown in the header, used as the default path). */
  dataPath: string;
  fileName: string;
  sha256: string;
  format: 'csv' | 'tsv' | 'parquet';
  /** Text formats: the field delimiter and whether the first record names the columns. */
  delimiter: string;
  header: boolean;
  missingTokens: string[];
  decimalComma: boolean;
  thousandsSeparator: string | null;
  label: string;
  /** Every feature whose missing or non-finite value drops a row, in file order. */
  screenedFeatures: string[];
  /** The features the fit solved with, in input order (a subset of screenedFeatures). */
  features: string[];
  solver: 'exact' | 'shrinkage';
  priors: 'empirical' | 'uniform';
  cv: { method: 'none' } | { method: 'loo' } | { method: 'kfold'; folds: number; seed: number };
  /** The options as given, for the header. */
  options: FitOptions;
  expected: ExpectedFigures;
  /** Relative tolerance of `--check` (see `withinTolerance` in the scripts). */
  tolerance: number;
}

/** Relative tolerance of the generated checks: the acceptance figure of the spec. */
export const SCRIPT_TOLERANCE = 1e-8;

/**
 * The reasons (RemovedFeature / report `removedFeatures[].reason`) for which a feature was never
 * part of the rows' screening: dropped before pass 1's moments because of its missing values.
 */
const UNSCREENED_REASONS = new Set(['missing-values', 'missing']);

/** Every feature whose missing or non-finite value drops a row in this fit, in file order. */
export function screenedFeatures(report: FitReport, columnsInFileOrder: readonly string[]): string[] {
  const removed = new Set(report.removedFeatures.filter((r) => !UNSCREENED_REASONS.has(r.reason)).map((r) => r.feature));
  const used = new Set(report.features);
  return columnsInFileOrder.filter((name) => used.has(name) || removed.has(name));
}

export function planFromReport(report: FitReport, inspection: TableInspection, generator: string, dataPath: string): ReproductionPlan {
  if (report.source.sha256 === undefined) throw new RangeError('The report has no SHA-256 of its data file; compute it before generating a script.');
  if (report.provisional) throw new RangeError('A provisional report (from the first bytes only) cannot be reproduced; fit the whole file first.');
  const screened = screenedFeatures(report, inspection.columns.map((c) => c.name));
  const cvUsed = report.accuracy.crossValidated;
  const folds = cvUsed && cvUsed.method.startsWith('kfold:') ? Number(cvUsed.method.slice('kfold:'.length)) : undefined;
  const cv: ReproductionPlan['cv'] =
    cvUsed === null ? { method: 'none' } : folds === undefined ? { method: 'loo' } : { method: 'kfold', folds, seed: report.options.seed };
  const read = inspection.options;
  return {
    generator,
    dataPath,
    fileName: report.source.name,
    sha256: report.source.sha256,
    format: report.source.format,
    delimiter: inspection.delimiter ?? (report.source.format === 'tsv' ? '\t' : ','),
    header: inspection.header,
    missingTokens: [...(read.missingTokens ?? DEFAULT_MISSING_TOKENS)],
    decimalComma: read.decimalComma === true,
    thousandsSeparator: read.thousandsSeparator !== undefined && read.thousandsSeparator !== '' ? read.thousandsSeparator : null,
    label: report.label,
    screenedFeatures: screened,
    features: [...report.features],
    solver: report.solver,
    priors: report.options.priors,
    cv,
    options: report.options,
    expected: {
      rowsUsed: report.rows.used,
      labels: report.classes.map((c) => c.label),
      counts: report.classes.map((c) => c.count),
      eigenvalues: [...report.discriminant.eigenvalues],
      explainedRatio: [...report.discriminant.explainedRatio],
      shrinkage: report.shrinkage,
      trainingAccuracy: report.accuracy.training,
      confusion: report.confusion.matrix.map((row) => [...row]),
      crossValidation:
        cvUsed === null || report.crossValidatedConfusion === null
          ? null
          : { method: folds === undefined ? 'loo' : 'kfold', ...(folds !== undefined ? { folds } : {}), accuracy: cvUsed.value, confusion: report.crossValidatedConfusion.matrix.map((row) => [...row]) },
    },
    tolerance: SCRIPT_TOLERANCE,
  };
}

/** The options worth listing in a script's header, one `name=value` each. */
export function optionSummary(plan: ReproductionPlan): string[] {
  const o = plan.options;
  const lines = [
    `solver=${o.solver} (solved: ${plan.solver})`,
    `priors=${o.priors}`,
    `cv=${o.cv} (used: ${plan.cv.method === 'kfold' ? `kfold:${plan.cv.folds}` : plan.cv.method})`,
    `seed=${o.seed}`,
    `missing=${o.missing}`,
  ];
  return lines;
}
