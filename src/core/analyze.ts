/**
 * The analysis pipeline, the one entry the CLI, the editor's worker and the reference tests call:
 *
 *   inspect → roles → pass 1 (cell checks, per-class moments) → solve (LDA, PCA, tests, findings)
 *   → pass 2 (predictions, cross-validation, plot sample, scores) → FitReport
 *
 * Memory does not grow with the number of rows: both passes stream, the moments are d × d per
 * class, and what is kept per row is bounded (plot budget, misclassified limit, duplicate check).
 *
 * Missing values: policy `drop-rows` drops every row with a missing label or a missing, non-numeric
 * or infinite feature value. Policy `drop-columns` first finds (in pass 1) every feature column with
 * a missing or non-numeric cell, drops those columns, and runs pass 1 again without them; rows with a
 * missing label or an infinite value are still dropped. Either way the finding `missing-values`
 * gives the counts per column and what was dropped.
 */
import { DataError, throwIfAborted } from './errors';
import { createClassifier, createLeaveOneOut, foldClassifiers } from './classify';
import {
  continuousLabelFinding,
  duplicateRowFinding,
  infiniteValueFinding,
  missingValueFinding,
  nearConstantFindings,
  nonNumericCellFindings,
  passThrough,
  sortFindings,
  unusedColumnFindings,
  cvSkippedFinding,
} from './findings';
import type { FeatureCellCounts } from './findings';
import { allocatePlotQuota } from './plotSample';
import { inspectTable } from './read/index';
import type { TableInspection } from './read/types';
import { assignRoles } from './roles';
import type { ColumnRoles } from './roles';
import type { ByteSource, RunControl } from './source';
import type { FitOptions, FitReport, Finding } from './types';
import { foldsToCollect, planCrossValidation } from './pipeline/crossValidation';
import type { CvPlan } from './pipeline/crossValidation';
import { missingCells, nonNumericExamples } from './pipeline/firstPass';
import type { FirstPassResult } from './pipeline/firstPass';
import { fitMoments } from './pipeline/fitMoments';
import type { DroppedColumn } from './pipeline/fitMoments';
import { resolveOptions } from './pipeline/options';
import type { CrossValidator, ScoreBatch } from './pipeline/secondPass';
import type { RangeScanner } from './parallel/rangeScanner';
import { ParallelFallback, parallelPasses, singleThreadPasses } from './parallel/rowPasses';
import type { RowPasses } from './parallel/rowPasses';

export { resolveOptions } from './pipeline/options';
export type { ScoreBatch } from './pipeline/secondPass';

export interface AnalysisResult {
  report: FitReport;
  inspection: TableInspection;
}

export interface AnalysisControl extends RunControl {
  /** Stop reading after this many bytes and mark the report provisional (the editor's quick first answer). */
  provisionalBytes?: number;
  /** Receives the discriminant scores of every data row, in file order, during pass 2. */
  onScores?: (batch: ScoreBatch) => void;
  /**
   * Runs the row passes of splittable text on several workers (src/node/parallelScan.ts on Node);
   * the report is the same as without it (parallel/rowPasses.ts). Not used for the provisional answer.
   */
  scanner?: RangeScanner;
}

/** Features whose values the plot sample keeps: the top ones by univariate F. */
export const PLOT_TOP_FEATURES = 5;

/**
 * The cross-validation models are built on first use, by the single-thread pass 2 only: a parallel
 * pass 2 builds them in every thread from `trainedOn` (passJobs.ts), the calling thread included
 * (k-fold: from the fold models the calling thread solves once, rowPasses.ts).
 * Built twice in one thread they would also cost that thread's pass 2 some 15% more time: V8
 * compiles a closure created once with the values it captures as constants, and the leave-one-out
 * model's row loop is such a closure (measured on the 1 GB table: the calling thread's
 * pass 2 took about 10 ms per MB against the worker thread's 7.9, thread CPU time).
 */
function onFirstUse<T>(build: () => T): () => T {
  let built: { value: T } | null = null;
  return () => (built ??= { value: build() }).value;
}

function now(): number {
  return performance.now();
}

function featureCounts(pass: FirstPassResult, names: readonly string[]): FeatureCellCounts[] {
  return names.map((feature, j) => ({
    feature,
    missing: missingCells(pass, j),
    nonNumeric: pass.summary?.nonNumeric[j] ?? 0,
    nonNumericExamples: nonNumericExamples(pass, j),
    positiveInfinity: pass.positiveInfinity[j]!,
    negativeInfinity: pass.negativeInfinity[j]!,
  }));
}

/** DataErrors for tables the analysis cannot work on, raised after pass 1. */
function checkRows(source: string, roles: ColumnRoles, pass: FirstPassResult): void {
  const label = roles.label.name;
  if (pass.rows === 0) {
    throw new DataError('no-rows', `${source}: the table has no data rows.`, { file: source }, 'Check that the file holds rows below its header (and whether --no-header is needed).');
  }
  if (pass.labelMissing === pass.rows) {
    throw new DataError('label-missing', `${source}: the label column '${label}' is empty in every row.`, { file: source, column: label }, 'Choose the label column with --label.');
  }
  if (pass.used === 0) {
    const worst = roles.features
      .map((c, j) => ({ name: c.name, nan: pass.nanCells[j]! }))
      .sort((a, b) => b.nan - a.nan)[0];
    throw new DataError(
      'no-usable-rows',
      `${source}: every row has a missing label or a missing, non-numeric or infinite feature value (${pass.droppedMissing} with missing values, ${pass.droppedNonFinite} with infinite values)${worst && worst.nan > 0 ? `; column '${worst.name}' alone is missing in ${worst.nan} rows` : ''}.`,
      { file: source, ...(worst && worst.nan > 0 ? { column: worst.name } : {}) },
      'Leave out the columns with many missing values (--exclude) or use --missing drop-columns.',
    );
  }
  if (pass.appearance.length === 1) {
    const only = pass.labels[pass.appearance[0]!]!;
    throw new DataError(
      'one-class',
      `${source}: the label column '${label}' has a single class ('${only}') among the ${pass.used} rows used; separability needs at least two.`,
      { file: source, column: label },
      'Check that --label names the class column, and that the rows of the other classes are not all dropped for missing values.',
    );
  }
  if (pass.used <= pass.appearance.length) {
    throw new DataError(
      'too-few-rows',
      `${source}: each class has a single row (${pass.used} rows, ${pass.appearance.length} classes): no within-class spread can be estimated.`,
      { file: source, column: label },
      roles.labelLooksContinuous
        ? `The label '${label}' looks like a measurement, not a class; name the class column with --label.`
        : 'A separability analysis needs classes with more than one row.',
    );
  }
}

/**
 * At most this many rows in a provisional answer, whatever its bytes hold: its time goes with the
 * rows it reads (both passes, the leave-one-out scoring), and a compact format holds more rows per
 * byte. The 1 GB benchmark table in 3 MiB: 14 012 rows as CSV, 36 590 as Parquet in one row group,
 * whose cold first look (analyze() in a fresh process) took 456–473 ms, and 374–380 ms at 20 000.
 */
export const PROVISIONAL_ROWS_MAX = 20_000;

/**
 * The provisional answer reads the first rows, as many as fit in `provisionalBytes` by the
 * inspection's row estimate (⌈estimatedRows · provisionalBytes / size⌉), at most
 * PROVISIONAL_ROWS_MAX. A row count rather than a byte offset, so both passes cut at the same row
 * whatever the reader's chunking.
 */
function provisionalRowLimit(inspection: TableInspection, size: number, provisionalBytes: number | undefined): number | null {
  if (provisionalBytes === undefined || !(provisionalBytes < size) || size === 0) return null;
  return Math.min(PROVISIONAL_ROWS_MAX, Math.max(1, Math.ceil((inspection.estimatedRows * Math.max(0, provisionalBytes)) / size)));
}

export async function analyze(source: ByteSource, partial?: Partial<FitOptions>, control?: AnalysisControl): Promise<AnalysisResult> {
  if (!control?.scanner) return analyzeWith(singleThreadPasses, source, partial, control);
  try {
    return await analyzeWith(parallelPasses(control.scanner), source, partial, control);
  } catch (error) {
    // What a parallel scan cannot give exactly (e.g. a reader error's line) comes from one thread.
    if (error instanceof ParallelFallback) return analyzeWith(singleThreadPasses, source, partial, control);
    throw error;
  }
}

async function analyzeWith(passes: RowPasses, source: ByteSource, partial?: Partial<FitOptions>, control?: AnalysisControl): Promise<AnalysisResult> {
  const started = now();
  const options = resolveOptions(partial);
  throwIfAborted(control?.signal);
  const progress: RunControl = {
    ...(control?.signal ? { signal: control.signal } : {}),
    ...(control?.onProgress ? { onProgress: control.onProgress } : {}),
  };

  // Inspect and assign roles.
  const inspection = await inspectTable(source, options.read, {
    ...progress,
    onProgress: (p) => control?.onProgress?.({ ...p, pass: 'inspect' }),
  });
  const roles = assignRoles(inspection, options);
  const inspected = now();

  // Pass 1, and for drop-columns a second run without the columns that had missing cells.
  const rowLimit = provisionalRowLimit(inspection, source.size, control?.provisionalBytes);
  let features = roles.features;
  const foldsFor = (d: number): { count: number; seed: number } | undefined => {
    const count = foldsToCollect(options.cv, rowLimit ?? inspection.estimatedRows, d);
    return count === undefined ? undefined : { count, seed: options.seed };
  };
  const runPass1 = (columns: typeof features, folds = foldsFor(columns.length), moments = true): Promise<FirstPassResult> =>
    passes.first(
      source,
      inspection,
      { label: roles.label.index, features: columns.map((c) => c.index), featureNames: columns.map((c) => c.name), ...(folds ? { folds } : {}), moments },
      progress,
      rowLimit,
    );
  let pass1 = await runPass1(features);
  const firstCounts = featureCounts(pass1, features.map((c) => c.name));
  const droppedColumns: DroppedColumn[] = [];
  if (options.missing === 'drop-columns') {
    const withMissing = new Set(features.filter((_, j) => pass1.nanCells[j]! > 0).map((c) => c.name));
    if (withMissing.size > 0) {
      for (const name of withMissing) droppedColumns.push({ feature: name, reason: 'missing-values' });
      features = features.filter((c) => !withMissing.has(c.name));
      if (features.length === 0) {
        throw new DataError(
          'no-features',
          `${source.name}: every feature column has missing or non-numeric cells, so policy drop-columns leaves none.`,
          { file: source.name },
          'Use --missing drop-rows instead.',
        );
      }
      pass1 = await runPass1(features);
    }
  }
  checkRows(source.name, roles, pass1);
  const d = features.length;
  const moments = pass1.moments!;
  const passed1 = now();

  // Solve from the moments.
  const fit = fitMoments(moments, options, droppedColumns);
  const { solution } = fit;
  const findings: Finding[] = [...fit.findings];
  const cv: CvPlan = planCrossValidation(options.cv, fit.report.classes, d);
  if (cv.method === 'none' && cv.reason) findings.push(cvSkippedFinding(cv.reason));
  let crossValidator: CrossValidator = { kind: 'none' };
  if (cv.method === 'loo') {
    const model = onFirstUse(() => createLeaveOneOut(solution, moments));
    crossValidator = {
      kind: 'loo',
      get model() {
        return model();
      },
      trainedOn: { moments },
    };
  } else if (cv.method !== 'none') {
    let folds = pass1.folds;
    if (!folds || folds.kFolds !== cv.folds) {
      // `auto` chose k-fold although the row estimate said leave-one-out: collect the folds now.
      folds = (await runPass1(features, { count: cv.folds, seed: options.seed }, false)).folds;
    }
    const foldOptions = { solver: options.solver, priors: options.priors };
    const classifiers = onFirstUse(() => foldClassifiers(moments, folds!, foldOptions, solution));
    crossValidator = {
      kind: 'kfold',
      get classifiers() {
        return classifiers();
      },
      seed: options.seed,
      trainedOn: { moments, folds: folds!, options: foldOptions },
    };
  }
  const solved = now();

  // Pass 2.
  const topFeatures = fit.univariateByFeature
    .map((u, j) => ({ F: u.F, j }))
    .sort((a, b) => b.F - a.F || a.j - b.j)
    .slice(0, PLOT_TOP_FEATURES)
    .map((t) => t.j);
  const classCounts = fit.report.classes.map((c) => c.count);
  const pass2 = await passes.second(
    {
      source,
      inspection,
      label: roles.label.index,
      features: features.map((c) => c.index),
      solution,
      pca: fit.pca,
      classifier: createClassifier(solution),
      crossValidator,
      appearance: pass1.appearance,
      classCounts,
      plotQuota: allocatePlotQuota(classCounts, options.plotBudget),
      topFeatures,
      majorityCandidates: pass1.majority.candidates,
      misclassifiedLimit: options.misclassifiedLimit,
      rowLimit: pass1.rowLimit,
      ...(control?.onScores ? { onScores: control.onScores } : {}),
    },
    progress,
  );
  const passed2 = now();

  // Findings from the cells and rows.
  const used = pass1.used;
  const finalCounts = featureCounts(pass1, features.map((c) => c.name));
  // Cell counts over every asked-for feature come from the first run of pass 1 (the only one under
  // drop-rows); the infinite values that dropped rows, from the final run.
  const missing = missingValueFinding({
    label: roles.label.name,
    labelMissing: pass1.labelMissing,
    features: firstCounts,
    policy: options.missing,
    rowsDropped: pass1.droppedMissing,
    columnsDropped: droppedColumns.map((c) => c.feature),
  });
  if (missing) findings.push(missing);
  findings.push(...nonNumericCellFindings(firstCounts));
  const infinite = infiniteValueFinding(finalCounts, pass1.droppedNonFinite);
  if (infinite) findings.push(infinite);
  findings.push(...unusedColumnFindings(roles.unusedText.map((c) => c.name), roles.unusedEmpty.map((c) => c.name)));
  if (pass1.summary) findings.push(...passThrough(pass1.summary.notes));
  const duplicate = duplicateRowFinding({ count: pass1.duplicates.count, examples: pass1.duplicates.examples, checked: pass1.duplicates.checked, rowsUsed: used });
  if (duplicate) findings.push(duplicate);
  if (roles.labelLooksContinuous) findings.push(continuousLabelFinding(roles.label.name, fit.report.classes.length, roles.label.integral));
  const constant = new Set(solution.removed.filter((f) => f.reason === 'constant').map((f) => f.feature));
  findings.push(
    ...nearConstantFindings(
      moments.features
        .map((feature, j) => ({
          feature,
          mean: fit.spread[j]!.mean,
          standardDeviation: fit.spread[j]!.standardDeviation,
          mode: { value: pass1.majority.candidates[j]!, count: pass2.majorityCounts[j]! },
        }))
        .filter((f) => !constant.has(f.feature)),
      used,
    ),
  );

  // The report.
  const labels = fit.report.classes.map((c) => c.label);
  const trainingCorrect = pass2.confusion.reduce((sum, row, i) => sum + row[i]!, 0);
  const cvConfusion = pass2.crossValidatedConfusion;
  const cvCorrect = cvConfusion ? cvConfusion.reduce((sum, row, i) => sum + row[i]!, 0) : 0;
  const ratio = (a: number, b: number): number => (b > 0 ? a / b : 0);
  const perClass = labels.map((label, c) => {
    const predictedAs = pass2.confusion.reduce((sum, row) => sum + row[c]!, 0);
    const actual = pass2.confusion[c]!.reduce((a, b) => a + b, 0);
    return {
      label,
      precision: ratio(pass2.confusion[c]![c]!, predictedAs),
      recall: ratio(pass2.confusion[c]![c]!, actual),
      cvRecall: cvConfusion ? ratio(cvConfusion[c]![c]!, cvConfusion[c]!.reduce((a, b) => a + b, 0)) : null,
    };
  });
  const rowsTotal = pass1.rowLimit ?? pass1.rows;
  const droppedRagged = pass1.summary?.raggedRows ?? 0;
  const { topFeatureValues, ...sampleRest } = pass2.sample;
  const report: FitReport = {
    version: 1,
    source: {
      name: source.name,
      format: inspection.format,
      bytes: source.size,
      ...(inspection.delimiter !== undefined ? { delimiter: inspection.delimiter } : {}),
    },
    options,
    label: roles.label.name,
    rows: {
      total: rowsTotal,
      used,
      dropped: rowsTotal - used,
      droppedMissing: pass1.droppedMissing,
      droppedNonFinite: pass1.droppedNonFinite,
      droppedRagged,
    },
    ...fit.report,
    accuracy: {
      training: ratio(trainingCorrect, used),
      crossValidated:
        cv.method === 'none' || !cvConfusion
          ? null
          : { method: cv.method, value: ratio(cvCorrect, used), ...(cv.method !== 'loo' ? { folds: cv.folds } : {}) },
    },
    confusion: { labels, matrix: pass2.confusion },
    crossValidatedConfusion: cvConfusion ? { labels: [...labels], matrix: cvConfusion } : null,
    perClass,
    misclassified: pass2.misclassified,
    misclassifiedTotal: pass2.misclassifiedTotal,
    findings: sortFindings(findings),
    sample: { ...sampleRest, topFeatures: { names: topFeatures.map((j) => moments.features[j]!), values: topFeatureValues } },
    timing: {
      inspect: inspected - started,
      moments: passed1 - inspected,
      solve: solved - passed1,
      rows: passed2 - solved,
      total: now() - started,
    },
    provisional: pass1.rowLimit !== null,
  };
  return { report, inspection };
}
