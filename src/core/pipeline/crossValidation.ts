/**
 * Which cross-validation runs. `auto` means exact leave-one-out while n·d² ≤ 2·10⁹ (leave-one-out by
 * downdating costs O(d²) per row; 2·10⁹ multiply-adds is a few seconds here — common practice, no
 * source), else stratified 10-fold. Leave-one-out needs at least 2 rows in every class, k-fold at
 * least k; otherwise no cross-validation runs and the finding `cv-skipped` says why.
 */
import type { CvMethod } from '../types';
import { foldCount } from './options';

/** Largest n·d² for which `auto` picks leave-one-out. */
export const AUTO_LOO_LIMIT = 2e9;
/** Folds `auto` uses above that limit. */
export const AUTO_FOLDS = 10;

export type CvPlan = { method: 'loo' } | { method: `kfold:${number}`; folds: number } | { method: 'none'; reason?: string };

/** The method `auto` chooses for n used rows and d features. */
export function autoMethod(n: number, d: number): 'loo' | `kfold:${number}` {
  return n * d * d <= AUTO_LOO_LIMIT ? 'loo' : `kfold:${AUTO_FOLDS}`;
}

/**
 * Share of the leave-one-out limit from which `auto` collects fold parts in pass 1: the row
 * estimate comes from the bytes per row of a sample and is rarely off by more than a few percent;
 * when it was too low after all, the pipeline collects the folds in an extra pass.
 */
export const COLLECT_FOLDS_FROM = 0.95;

/**
 * Fold count to collect in pass 1, before n is known: the asked k, or for `auto` 10 when the
 * inspection's row estimate puts n·d² within 5% of the leave-one-out limit or above it. A wider
 * margin made large leave-one-out fits accumulate ten fold parts they did not use (a third more
 * work in pass 1).
 */
export function foldsToCollect(cv: CvMethod, estimatedRows: number, d: number): number | undefined {
  if (cv === 'auto') return estimatedRows * d * d > AUTO_LOO_LIMIT * COLLECT_FOLDS_FROM ? AUTO_FOLDS : undefined;
  return foldCount(cv);
}

/** The cross-validation to run once the class sizes are known. */
export function planCrossValidation(cv: CvMethod, classes: readonly { label: string; count: number }[], d: number): CvPlan {
  if (cv === 'none') return { method: 'none' };
  const n = classes.reduce((a, c) => a + c.count, 0);
  const method = cv === 'auto' ? autoMethod(n, d) : cv;
  let smallest = classes[0]!;
  for (const c of classes) if (c.count < smallest.count) smallest = c;
  const chosen = cv === 'auto' ? ` (chosen by auto for n·d² = ${(n * d * d).toPrecision(3)})` : '';
  if (method === 'loo') {
    if (smallest.count < 2) return { method: 'none', reason: `leave-one-out${chosen} needs at least 2 rows in every class, and class '${smallest.label}' has ${smallest.count}.` };
    return { method: 'loo' };
  }
  const folds = foldCount(method)!;
  if (smallest.count < folds) {
    return {
      method: 'none',
      reason: `${folds}-fold cross-validation${chosen} needs at least ${folds} rows in every class, and class '${smallest.label}' has ${smallest.count}; kfold:N needs 2 ≤ N ≤ the smallest class count (or use --cv loo).`,
    };
  }
  return { method, folds };
}
