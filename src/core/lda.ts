/**
 * Multi-class Fisher linear discriminant analysis from per-class moments: the generalized
 * symmetric eigenproblem S_B w = λ S_W w, solved through a rank-revealing whitening of S_W and
 * the thin SVD of the whitened class-mean deviations (ldaDirections.ts), never through S_W⁻¹S_B.
 *
 * Columns (ldaColumns.ts): constant columns, columns constant within every class, duplicated and
 * linearly dependent columns are found before solving, named, and left out, so an exactly
 * dependent column changes no eigenvalue.
 *
 * Solvers:
 *  - exact: S_W as it is, on the columns the pivoted Cholesky keeps.
 *  - shrinkage: the Ledoit–Wolf shrunk pooled within-class covariance (shrinkage.ts), times n so
 *    it is on the scatter scale. Duplicated and dependent columns are kept (the shrunk matrix is
 *    nonsingular) because Σ‖z‖⁴, which the intensity needs, is known only over all columns;
 *    they are reported in a warning. Columns constant overall or within classes are left out
 *    (their within-class-centred values are zero, so Σ‖z‖⁴ is unchanged).
 *  - auto: exact when, on the columns exact would keep (r of them), the within-class correlation
 *    matrix has condition number below 1/√eps ≈ 6.7e7 and there are at least 3 within-class
 *    degrees of freedom per column (n − K ≥ 3r; common practice, no source); else shrinkage, with
 *    a warning saying why.
 * An explicitly chosen solver is always honoured; exact on a singular problem answers on the
 * columns the rank-revealing factorisation keeps, with a warning.
 *
 * Priors (empirical N_i/N or uniform 1/K) affect classification only (classify.ts).
 */
import { DataError } from './errors';
import { sortLabels } from './labelOrder';
import { describeDependent, formatCombination, revealRank, screenConstants, type ColumnFacts, type RankRevealed } from './ldaColumns';
import { solveDirections, type Directions } from './ldaDirections';
import { conditionNumber } from './conditionNumber';
import { EPSILON, principalSubmatrix } from './linalg';
import type { Moments } from './moments';
import { pooledFromMoments, type PooledMoments } from './pooledMoments';
import { ledoitWolf } from './shrinkage';
import { PRIORS, SOLVERS } from './types';

export { sortLabels } from './labelOrder';
export { pooledFromMoments, type PooledMoments } from './pooledMoments';

export interface RemovedFeature {
  index: number;
  feature: string;
  reason: 'constant' | 'constant-within-classes' | 'duplicate' | 'dependent';
  /** For duplicate/dependent: the kept features and coefficients it equals (x_j ≈ Σ c_i x_i + const within classes). */
  combination?: { feature: string; coefficient: number }[];
}

export interface LdaWarning {
  code: string;
  severity: 'info' | 'warning' | 'error';
  message: string;
  columns?: string[];
}

/** The discriminant axes (Directions) have their r × k rows in the order of `features`. */
export interface LdaSolution extends Directions {
  /** Names of the kept features (r), input order. */
  features: string[];
  /** Indices of the kept features into the moments' features, ascending. */
  kept: number[];
  removed: RemovedFeature[];
  solver: 'exact' | 'shrinkage';
  /** Ledoit–Wolf intensity α; 0 with the exact solver. */
  shrinkage: number;
  /** 2-norm condition number of the kept within-class correlation matrix as solved. */
  conditionNumber: number;
  n: number;
  /** Solution order (see sortLabels). */
  classCounts: number[];
  labels: string[];
  priors: Float64Array;
  /** How the priors were set (leave-one-out re-estimates empirical priors). */
  priorsRule: 'empirical' | 'uniform';
  /** r */
  overallMean: Float64Array;
  /** K × r */
  classMeans: Float64Array;
  /** r × r, as solved (the shrunk scatter n·Σ_s with the shrinkage solver). */
  withinScatter: Float64Array;
  /** r × r */
  betweenScatter: Float64Array;
  warnings: LdaWarning[];
  /** All input feature names (the moments' features), d. */
  inputFeatures: string[];
  /**
   * The whitening used: withinScatter = (√D L)(√D L)ᵀ with rows and columns taken in `order`
   * (indices into `kept`), L (r × r lower) the Cholesky factor of the correlation matrix and
   * `scale` = √D. Leave-one-out downdating (classify.ts) works in these coordinates.
   */
  whitening: { order: Int32Array; factor: Float64Array; scale: Float64Array };
}

export interface LdaOptions {
  solver: 'auto' | 'exact' | 'shrinkage';
  priors: 'empirical' | 'uniform';
  /**
   * With solver 'shrinkage' only: use this Ledoit–Wolf intensity instead of estimating it (the
   * cross-validation refits keep the full fit's intensity, see classify.ts).
   */
  shrinkageIntensity?: number;
  /**
   * false: leave out the condition number (NaN in the solution) and the warning resting on it, for
   * fits that only classify (the cross-validation refits); needs a solver other than 'auto', which
   * decides by it. At d = 1 000 it is about a third of such a fit's time.
   */
  conditionNumber?: boolean;
}

/** Below this condition number of the within-class correlation matrix, `auto` may choose exact. */
export const CONDITION_LIMIT = 1 / Math.sqrt(EPSILON);
/** Within-class degrees of freedom per feature that `auto` wants before choosing exact. */
export const ROWS_PER_FEATURE = 3;

/** Solves the discriminant problem for per-class moments (classes in any order). */
export function solveLda(m: Moments, options: LdaOptions): LdaSolution {
  return solvePooled(pooledFromMoments(m), options);
}

function checkOptions(options: LdaOptions): void {
  if (!SOLVERS.includes(options.solver)) throw new DataError('bad-option', `Unknown solver "${options.solver}".`, {}, `Use one of ${SOLVERS.join(', ')}.`);
  if (!PRIORS.includes(options.priors)) throw new DataError('bad-option', `Unknown priors "${options.priors}".`, {}, `Use one of ${PRIORS.join(', ')}.`);
  const a = options.shrinkageIntensity;
  if (a !== undefined) {
    if (options.solver !== 'shrinkage') throw new DataError('bad-option', 'A fixed shrinkage intensity needs the shrinkage solver.', {}, 'Set the solver to shrinkage, or leave the intensity out.');
    if (!(a >= 0 && a <= 1)) throw new DataError('bad-option', `The shrinkage intensity must lie in [0, 1], not ${a}.`);
  }
  if (options.conditionNumber === false && options.solver === 'auto') throw new Error('internal: the auto solver decides by the condition number');
}

/** 2-norm condition number of the kept correlation matrix, capped at 1/eps (never Infinity or NaN). */
function conditionNumberOf(revealed: RankRevealed): number {
  return conditionNumber(revealed.factor, revealed.order.length);
}

function names(indices: number[], features: string[]): string {
  return indices.map((j) => `"${features[j]}"`).join(', ');
}

export function solvePooled(p: PooledMoments, options: LdaOptions): LdaSolution {
  checkOptions(options);
  const present = p.labels.map((label, i) => ({ label, i })).filter(({ i }) => p.counts[i] > 0);
  const labels = sortLabels(present.map((c) => c.label));
  if (labels.length < 2) {
    throw new DataError(
      'one-class',
      labels.length === 0 ? 'There are no rows to analyse.' : `Discriminant analysis needs at least two classes; every row is labelled "${labels[0]}".`,
      {},
      'Check the label column.',
    );
  }
  const sourceOf = new Map(present.map(({ label, i }) => [label, i]));
  const order = labels.map((label) => sourceOf.get(label)!);
  const counts = order.map((i) => p.counts[i]);
  const means = order.map((i) => p.means[i]);
  const K = labels.length;
  const n = counts.reduce((a, b) => a + b, 0);
  const d = p.features.length;
  const features = p.features;

  // Class mean minus overall mean, from differences to the first class's mean (a common offset cancels first).
  const overall = new Float64Array(d);
  for (let i = 0; i < K; i++) for (let j = 0; j < d; j++) overall[j] += (counts[i] / n) * (means[i][j] - means[0][j]);
  const deviations = means.map((mean) => Float64Array.from(mean, (v, j) => v - means[0][j] - overall[j]));
  for (let j = 0; j < d; j++) overall[j] = means[0][j] + overall[j];
  const withinDiagonal = Float64Array.from({ length: d }, (_, j) => p.withinScatter[j * d + j]);
  const totalDiagonal = Float64Array.from(withinDiagonal, (w, j) => w + deviations.reduce((s, dev, i) => s + counts[i] * dev[j] * dev[j], 0));
  const facts: ColumnFacts = {
    features,
    n,
    deviations,
    counts,
    overallMean: overall,
    withinDiagonal,
    totalDiagonal,
    magnitude: p.magnitude,
    singleValue: p.singleValue,
    singleValueWithinClasses: p.singleValueWithinClasses,
  };
  const priors = Float64Array.from(counts, (c) => (options.priors === 'uniform' ? 1 / K : c / n));
  const removed: RemovedFeature[] = [];
  const warnings: LdaWarning[] = [];

  const screen = screenConstants(facts);
  for (const j of screen.constant) removed.push({ index: j, feature: features[j], reason: 'constant' });
  for (const j of screen.constantWithinClasses) removed.push({ index: j, feature: features[j], reason: 'constant-within-classes' });
  if (screen.constantWithinClasses.length > 0) {
    warnings.push({
      code: 'perfect-separation',
      severity: 'warning',
      message: `${names(screen.constantWithinClasses, features)} ${screen.constantWithinClasses.length === 1 ? 'is' : 'are'} constant within every class but not overall: each separates the classes perfectly on its own (zero within-class variance), so it was left out of the discriminant problem. Check for leakage of the label.`,
      columns: screen.constantWithinClasses.map((j) => features[j]),
    });
  }
  const active = screen.active;
  const r = active.length;
  if (r === 0) {
    warnings.push({ code: 'no-features-left', severity: 'error', message: 'No feature varies within the classes, so there is no discriminant problem to solve.' });
    return emptySolution(p, labels, counts, priors, n, removed, warnings, options);
  }

  // Read only below, so the pooled scatter itself serves when every feature is active.
  const rawActive = r === d ? p.withinScatter : principalSubmatrix(p.withinScatter, d, active);
  const tolerance = EPSILON * Math.max(n, r);
  const exact = revealRank(rawActive, r, active, tolerance);
  const exactRank = exact.order.length;
  const exactCondition = options.conditionNumber === false ? NaN : conditionNumberOf(exact);
  const freedom = n - K;
  if (freedom < r) {
    warnings.push({
      code: 'more-features-than-rows',
      severity: 'warning',
      message: `There are ${r} features but only ${freedom} within-class degrees of freedom (n − K = ${n} − ${K}): the within-class scatter is singular for want of rows.`,
    });
  }
  let solver: 'exact' | 'shrinkage';
  const reasons: string[] = [];
  if (options.solver === 'auto') {
    if (freedom < ROWS_PER_FEATURE * exactRank) {
      reasons.push(`d approaches or exceeds n: ${freedom} within-class degrees of freedom (n − K) for ${exactRank} features, fewer than ${ROWS_PER_FEATURE} per feature`);
    }
    if (exactCondition >= CONDITION_LIMIT) {
      reasons.push(`the within-class correlation matrix is ill-conditioned (condition number ${exactCondition.toPrecision(3)} ≥ 1/√eps ≈ ${CONDITION_LIMIT.toPrecision(2)})`);
    }
    solver = reasons.length === 0 ? 'exact' : 'shrinkage';
  } else {
    solver = options.solver;
  }

  let revealed: RankRevealed;
  let solved: Float64Array; // r × r over `active`, as solved
  let intensity = 0;
  if (solver === 'exact') {
    revealed = exact;
    solved = rawActive;
    if (options.solver === 'exact' && exactCondition >= CONDITION_LIMIT) {
      warnings.push({
        code: 'ill-conditioned',
        severity: 'warning',
        message: `The within-class correlation matrix is ill-conditioned (condition number ${exactCondition.toPrecision(3)}); the exact solution is sensitive to rounding and to small changes in the data. The shrinkage solver is better suited.`,
      });
    }
  } else {
    if (options.shrinkageIntensity !== undefined) intensity = options.shrinkageIntensity;
    else if (p.quartic !== null) intensity = ledoitWolf(rawActive, r, n, p.quartic).intensity;
    else throw new Error('internal: the shrinkage solver needs Σ‖z‖⁴ or a fixed intensity');
    // n·Σ_s = (1 − α) S_W + α (tr S_W / r) I: the shrunk covariance on the scatter scale.
    let trace = 0;
    for (let i = 0; i < r; i++) trace += rawActive[i * r + i];
    solved = rawActive.map((v) => (1 - intensity) * v);
    for (let i = 0; i < r; i++) solved[i * r + i] += (intensity * trace) / r;
    revealed = revealRank(solved, r, active, tolerance);
    if (reasons.length > 0) {
      warnings.push({
        code: 'shrinkage-used',
        severity: 'warning',
        message: `The solver chose Ledoit–Wolf shrinkage (intensity ${intensity.toPrecision(3)}) because ${reasons.join(', and ')}.`,
      });
    }
    if (exact.dependents.length > 0 && revealed.dependents.length === 0 && exactRank < freedom) {
      const described = exact.dependents.map((dep) => describeDependent(facts, exact, dep));
      warnings.push({
        code: 'collinear-columns-kept',
        severity: 'warning',
        message: `Within classes, ${described.map((c) => formatCombination(features[c.feature], c.combination)).join('; ')}. These columns were kept: the shrinkage solver regularises them, but they add nothing.`,
        columns: described.map((c) => features[c.feature]),
      });
    }
  }
  const dependents = revealed.dependents.map((dep) => describeDependent(facts, revealed, dep));
  for (const dep of dependents) removed.push({ index: dep.feature, feature: features[dep.feature], reason: dep.reason, combination: dep.combination });
  if (dependents.length > 0 && freedom < r) {
    warnings.push({
      code: 'singular-within-scatter',
      severity: 'warning',
      message: `The within-class scatter is singular (${freedom} within-class degrees of freedom for ${r} features), so the ${solver} solver answered on the ${revealed.order.length} features a rank-revealing factorisation kept; ${dependents.length} more were set aside as combinations of those in this sample. The shrinkage solver is better suited.`,
      columns: dependents.map((c) => features[c.feature]),
    });
  }
  const separating = dependents.filter((c) => c.separating);
  if (separating.length > 0) {
    warnings.push({
      code: 'perfect-separation',
      severity: 'warning',
      message: `${separating.map((c) => formatCombination(features[c.feature], c.combination)).join('; ')} holds within every class up to a constant that differs between classes: that combination separates the classes perfectly. Check for leakage of the label.`,
      columns: separating.map((c) => features[c.feature]),
    });
  }
  removed.sort((a, b) => a.index - b.index);
  const conditionNumber = solver === 'exact' || options.conditionNumber === false ? exactCondition : conditionNumberOf(revealed);
  const directions = solveDirections(revealed, deviations, counts, n);
  const k = directions.eigenvalues.length;
  if (k === 0) {
    warnings.push({ code: 'no-discriminant', severity: 'warning', message: 'The class means do not differ (to rounding) on the kept features: there is no discriminant direction.' });
  }

  // Outputs in ascending feature order.
  const kept = [...revealed.order].sort((a, b) => a - b);
  const rk = kept.length;
  const positionInKept = new Map(kept.map((f, i) => [f, i]));
  const positionInActive = new Map(active.map((f, i) => [f, i]));
  const pivotOf = new Map(revealed.order.map((f, q) => [f, q]));
  const activeIndex = Int32Array.from(kept, (f) => positionInActive.get(f)!);
  // S_W and S_B over the kept features are for callers that want them (tests, diagnostics), not
  // for anything the fit reports: formed on first read, so a wide fit does not pay 2·r² memory and
  // K·r² multiply-adds for them.
  let withinCache: Float64Array | undefined;
  let betweenCache: Float64Array | undefined;
  const formWithin = (): Float64Array => {
    const out = new Float64Array(rk * rk);
    for (let a = 0; a < rk; a++) {
      const row = activeIndex[a] * r;
      for (let b = 0; b < rk; b++) out[a * rk + b] = solved[row + activeIndex[b]];
    }
    return out;
  };
  const formBetween = (): Float64Array => {
    const out = new Float64Array(rk * rk);
    for (let i = 0; i < K; i++) {
      const dev = Float64Array.from(kept, (f) => deviations[i][f]);
      for (let a = 0; a < rk; a++) {
        const w = counts[i] * dev[a];
        const row = a * rk;
        for (let b = 0; b < rk; b++) out[row + b] += w * dev[b];
      }
    }
    return out;
  };
  const permuteRows = (source: Float64Array): Float64Array => {
    const out = new Float64Array(rk * k);
    kept.forEach((f, a) => out.set(source.subarray(pivotOf.get(f)! * k, (pivotOf.get(f)! + 1) * k), a * k));
    return out;
  };
  const classMeans = new Float64Array(K * rk);
  for (let i = 0; i < K; i++) for (let a = 0; a < rk; a++) classMeans[i * rk + a] = means[i][kept[a]];
  return {
    features: kept.map((j) => features[j]),
    kept,
    removed,
    solver,
    shrinkage: intensity,
    conditionNumber,
    n,
    classCounts: counts,
    labels,
    priors,
    priorsRule: options.priors,
    overallMean: Float64Array.from(kept, (j) => overall[j]),
    classMeans,
    get withinScatter(): Float64Array {
      return (withinCache ??= formWithin());
    },
    get betweenScatter(): Float64Array {
      return (betweenCache ??= formBetween());
    },
    eigenvalues: directions.eigenvalues,
    explainedRatio: directions.explainedRatio,
    canonicalCorrelations: directions.canonicalCorrelations,
    directions: permuteRows(directions.directions),
    standardizedCoefficients: permuteRows(directions.standardizedCoefficients),
    structure: permuteRows(directions.structure),
    centroids: directions.centroids,
    warnings,
    inputFeatures: [...features],
    whitening: {
      order: Int32Array.from(revealed.order, (f) => positionInKept.get(f)!),
      factor: revealed.factor,
      scale: revealed.scale,
    },
  };
}

function emptySolution(
  p: PooledMoments,
  labels: string[],
  counts: number[],
  priors: Float64Array,
  n: number,
  removed: RemovedFeature[],
  warnings: LdaWarning[],
  options: LdaOptions,
): LdaSolution {
  const K = labels.length;
  return {
    features: [],
    kept: [],
    removed: removed.sort((a, b) => a.index - b.index),
    solver: options.solver === 'shrinkage' ? 'shrinkage' : 'exact',
    shrinkage: 0,
    conditionNumber: 1,
    n,
    classCounts: counts,
    labels,
    priors,
    priorsRule: options.priors,
    overallMean: new Float64Array(0),
    classMeans: new Float64Array(0),
    withinScatter: new Float64Array(0),
    betweenScatter: new Float64Array(0),
    eigenvalues: new Float64Array(0),
    explainedRatio: new Float64Array(0),
    canonicalCorrelations: new Float64Array(0),
    directions: new Float64Array(0),
    standardizedCoefficients: new Float64Array(0),
    structure: new Float64Array(0),
    centroids: new Float64Array(K * 0),
    warnings,
    inputFeatures: [...p.features],
    whitening: { order: new Int32Array(0), factor: new Float64Array(0), scale: new Float64Array(0) },
  };
}

/** What scoring a row and classifying it take from a solution (no r × r matrices: small enough to post to another thread). */
export type ScoringModel = Pick<LdaSolution, 'labels' | 'priors' | 'eigenvalues' | 'centroids' | 'kept' | 'overallMean' | 'directions'>;

/** The scoring part of a solution, its own copy. */
export function scoringModelOf(s: ScoringModel): ScoringModel {
  return {
    labels: [...s.labels],
    priors: s.priors.slice(),
    eigenvalues: s.eigenvalues.slice(),
    centroids: s.centroids.slice(),
    kept: [...s.kept],
    overallMean: s.overallMean.slice(),
    directions: s.directions.slice(),
  };
}

/** Discriminant scores of one row: out_j = (x − m)ᵀ w_j over the kept features (x: all d, input order). */
export function scoreRow(s: ScoringModel, x: Float64Array, out: Float64Array): void {
  const k = s.eigenvalues.length;
  const { kept, overallMean, directions } = s;
  for (let j = 0; j < k; j++) out[j] = 0;
  for (let q = 0; q < kept.length; q++) {
    const c = x[kept[q]] - overallMean[q];
    const row = q * k;
    for (let j = 0; j < k; j++) out[j] += c * directions[row + j];
  }
}
