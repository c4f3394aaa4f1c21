/**
 * A report from per-class moments alone (`scatterwise fit --moments …`): the moments of a SQL
 * query's result, of shards merged from several machines, or of `scatterwise moments`. Everything
 * that follows from the moments is the same computation as a fit of the file (pipeline/fitMoments),
 * so the figures equal those of fitting the raw rows to rounding. What needs the rows themselves —
 * training and cross-validated accuracy, confusion matrices, per-class precision and recall,
 * misclassified rows, the plot sample — is absent, and the finding `rows-not-available` says so.
 *
 * Contract note: FitReport does not yet allow `accuracy.training` and `confusion` to be null, nor a
 * source format `moments`; MomentsFitReport is FitReport with exactly those three changes.
 */
import { DataError } from './errors';
import { passThrough, sortFindings } from './findings';
import type { Moments } from './moments';
import { fitMoments } from './pipeline/fitMoments';
import { resolveOptions } from './pipeline/options';
import type { FitOptions, FitReport, Finding } from './types';

export type MomentsFitReport = Omit<FitReport, 'source' | 'accuracy' | 'confusion'> & {
  source: Omit<FitReport['source'], 'format'> & { format: 'moments' };
  accuracy: { training: null; crossValidated: null };
  confusion: null;
};

export const ROWS_NOT_AVAILABLE = 'rows-not-available';

/**
 * The report of moments named `name` (the files they came from). Options that need rows (cv, seed,
 * plot budget, misclassified limit, reading) are kept in the report as given but have no effect.
 */
export function fitFromMoments(moments: Moments, name: string, partial: Partial<FitOptions> = {}, bytes = 0, labelName?: string): MomentsFitReport {
  const started = performance.now();
  const options = resolveOptions(partial);
  const classes = moments.classes.filter((c) => c.count > 0);
  if (classes.length < 2) {
    throw new DataError('one-class', `${name}: the moments hold ${classes.length === 1 ? `a single class ('${classes[0]!.label}')` : 'no class'}; separability needs at least two.`, { file: name }, 'Check that every part was computed with the label column and that the rows of the other classes were not all dropped.');
  }
  const n = classes.reduce((sum, c) => sum + c.count, 0);
  if (n <= classes.length) {
    throw new DataError('too-few-rows', `${name}: each class has a single row (${n} rows, ${classes.length} classes): no within-class spread can be estimated.`, { file: name }, 'A separability analysis needs classes with more than one row.');
  }
  const fit = fitMoments({ features: moments.features, classes }, options);
  const solved = performance.now();
  const notAvailable: Finding = passThrough([
    {
      code: ROWS_NOT_AVAILABLE,
      severity: 'info',
      message:
        'Fitted from per-class moments without the rows: training and cross-validated accuracy, the confusion matrices, misclassified rows and the plot sample need the rows and are not available.',
    },
  ])[0]!;
  const report: MomentsFitReport = {
    version: 1,
    source: { name, format: 'moments', bytes },
    options,
    label: options.label ?? labelName ?? 'label',
    rows: { total: n, used: n, dropped: 0, droppedMissing: 0, droppedNonFinite: 0, droppedRagged: 0 },
    ...fit.report,
    accuracy: { training: null, crossValidated: null },
    confusion: null,
    crossValidatedConfusion: null,
    perClass: [],
    misclassified: [],
    misclassifiedTotal: 0,
    findings: sortFindings([...fit.findings, notAvailable]),
    sample: { total: 0, rows: [], classIndex: [], ld: [], pc: [], topFeatures: { names: [], values: [] } },
    timing: { inspect: 0, moments: 0, solve: solved - started, rows: 0, total: performance.now() - started },
    provisional: false,
  };
  return report;
}

/**
 * The same report in the FitReport shape the shared formatting helpers take (format/text.ts,
 * format/verdict.ts): training accuracy NaN, an empty confusion matrix, source format `moments`.
 * Only for the parts those helpers read that moments determine (momentsFitText.ts).
 */
export function asRenderableReport(report: MomentsFitReport): FitReport {
  return {
    ...report,
    source: report.source as unknown as FitReport['source'],
    accuracy: { training: NaN, crossValidated: null },
    confusion: { labels: [], matrix: [] },
  };
}
