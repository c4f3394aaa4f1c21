/**
 * The one-line verdict of a report in plain words, reused by the text and Markdown reports, the
 * panel and the CI comment: how many discriminants matter, how much the first carries, the
 * cross-validated accuracy and method, and the class pair most often confused.
 */
import type { FitReport } from '../types';
import { formatCount, formatPercent } from './numbers';

/** Significance level for "a discriminant matters" (Bartlett's sequential test). */
export const DISCRIMINANT_ALPHA = 0.05;

/**
 * Number of discriminants that matter: Bartlett's entry j tests discriminants j+1..k together, so
 * count the leading entries with p < 0.05 and stop at the first that is not.
 */
export function significantDiscriminants(report: FitReport): number {
  let count = 0;
  for (const test of report.tests.bartlett) {
    if (!(test.p < DISCRIMINANT_ALPHA)) break;
    count++;
  }
  return count;
}

/** `leave-one-out` or `10-fold`. */
export function describeCvMethod(method: string): string {
  if (method === 'loo') return 'leave-one-out';
  const folds = /^kfold:(\d+)$/.exec(method);
  return folds ? `stratified ${folds[1]}-fold` : method;
}

/** The pair (i ≠ j) with the most rows of one predicted as the other, both directions added. */
export function worstConfusedPair(confusion: { labels: string[]; matrix: number[][] }): { a: string; b: string; rows: number } | null {
  let best: { a: string; b: string; rows: number } | null = null;
  const { labels, matrix } = confusion;
  for (let i = 0; i < labels.length; i++) {
    for (let j = i + 1; j < labels.length; j++) {
      const rows = (matrix[i]?.[j] ?? 0) + (matrix[j]?.[i] ?? 0);
      if (rows > 0 && (best === null || rows > best.rows)) best = { a: labels[i]!, b: labels[j]!, rows };
    }
  }
  return best;
}

export function verdict(report: FitReport): string {
  const k = report.discriminant.eigenvalues.length;
  const parts: string[] = [];
  if (k === 0) {
    parts.push('No discriminant direction: the class means do not differ in the features used.');
  } else {
    const significant = significantDiscriminants(report);
    const untestable = report.tests.bartlett.length === 0 || Number.isNaN(report.tests.bartlett[significant]?.p ?? 0);
    const matter = untestable && significant === 0
      ? `${k} discriminant${k > 1 ? 's' : ''}, whose significance cannot be tested here (too few rows for the features)`
      : significant === 0
        ? `None of the ${k} discriminant${k > 1 ? 's' : ''} is significant (Bartlett p ≥ ${DISCRIMINANT_ALPHA})`
        : `${significant} of ${k} discriminant${k > 1 ? 's' : ''} ${significant === 1 ? 'matters' : 'matter'} (Bartlett p < ${DISCRIMINANT_ALPHA})`;
    const first = k > 1 ? `; the first carries ${formatPercent(report.discriminant.explainedRatio[0] ?? 0)} of the separation` : '';
    parts.push(`${matter}${first}.`);
  }
  const cv = report.accuracy.crossValidated;
  if (cv) parts.push(`Cross-validated accuracy ${formatPercent(cv.value)} (${describeCvMethod(cv.method)}).`);
  else parts.push(`Training accuracy ${formatPercent(report.accuracy.training)} (not cross-validated, so optimistic).`);
  const pair = worstConfusedPair(report.crossValidatedConfusion ?? report.confusion);
  parts.push(pair ? `Most confused: ${pair.a} ↔ ${pair.b} (${formatCount(pair.rows)} row${pair.rows > 1 ? 's' : ''}).` : 'No two classes are confused.');
  return parts.join(' ');
}
