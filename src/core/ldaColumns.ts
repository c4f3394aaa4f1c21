/**
 * Which feature columns the discriminant problem can use, decided from the moments before
 * solving, each removal named:
 *  - constant: zero total variance;
 *  - constant within classes: zero within-class variance but not constant (perfect separation);
 *  - duplicate / dependent: the column is, within classes, a linear combination of kept columns
 *    (x_j = Σ c_i x_i + a constant per class), found by a pivoted Cholesky factorisation of the
 *    within-class correlation matrix D^{-1/2} S D^{-1/2} with a tolerance scaled to the data:
 *    the caller (lda.ts) stops pivoting once every remaining Schur-complement diagonal is at most
 *    eps·max(n, r) (the diagonal being 1), the rounding level of a cross-product matrix summed
 *    over n rows of r columns — a column whose within-class variance is explained by the kept
 *    ones to 1 − eps·max(n, r) is treated as their combination.
 * Zero variance is judged against the rounding level of the values themselves: a column whose
 * sum of squared deviations is at most n·(4·eps·max|x|)² cannot be told from a constant one.
 */
import { EPSILON, orderedCholesky, pivotedCholeskyInPlace, solveLower, solveLowerTranspose } from './linalg';

/** What a removal needs to know about the data, all over the full feature set (d). */
export interface ColumnFacts {
  features: string[];
  n: number;
  /** K × d: class mean minus overall mean. */
  deviations: Float64Array[];
  counts: number[];
  overallMean: Float64Array;
  /** Diagonals of S_W and S_T, d. */
  withinDiagonal: Float64Array;
  totalDiagonal: Float64Array;
  /** Largest |value| per feature (a bound), d. */
  magnitude: Float64Array;
  /** Exact knowledge from min/max: 1 where the column has a single value overall / in every class. */
  singleValue: Uint8Array;
  singleValueWithinClasses: Uint8Array;
}

export interface ConstantScreen {
  constant: number[];
  constantWithinClasses: number[];
  /** The remaining feature indices, ascending. */
  active: number[];
}

/** Rounding level of a sum of squared deviations of n values of magnitude up to `magnitude`. */
function zeroVarianceLevel(n: number, magnitude: number): number {
  const unit = 4 * EPSILON * magnitude;
  return n * unit * unit;
}

export function screenConstants(facts: ColumnFacts): ConstantScreen {
  const constant: number[] = [];
  const constantWithinClasses: number[] = [];
  const active: number[] = [];
  facts.features.forEach((_, j) => {
    const level = zeroVarianceLevel(facts.n, facts.magnitude[j]);
    if (facts.singleValue[j] || facts.totalDiagonal[j] <= level) constant.push(j);
    else if (facts.singleValueWithinClasses[j] || facts.withinDiagonal[j] <= level) constantWithinClasses.push(j);
    else active.push(j);
  });
  return { constant, constantWithinClasses, active };
}

/** A whitening of a scatter matrix over some columns: A = (√D L)(√D L)ᵀ on the kept ones. */
export interface Whitening {
  /** Feature indices, in pivot order (the order of `factor`'s rows). */
  order: number[];
  /** ρ × ρ lower-triangular Cholesky factor of the correlation matrix, pivot order. */
  factor: Float64Array;
  /** √diag(A) per kept column, pivot order. */
  scale: Float64Array;
}

export interface RankRevealed extends Whitening {
  /** Columns found dependent on the kept ones: regression on them (correlation scale), √diag. */
  dependents: DependentLoadings[];
}

export interface DependentLoadings {
  feature: number;
  /** β̃ over the kept columns, pivot order. */
  loadings: Float64Array;
  /** √diag(A) of the dependent column. */
  scale: number;
}

/**
 * Rank-revealing whitening of `a` (m × m, a scatter over the feature indices `columns`, all with
 * positive diagonal), in correlation form D^{-1/2} A D^{-1/2}. A pivoted Cholesky with diagonal
 * pivoting fixes the rank ρ: pivots stop once every remaining Schur-complement diagonal is
 * ≤ `tolerance` (the diagonal being 1). Which ρ columns to keep is then taken in input order
 * (orderedCholesky), so that of a dependent group the later columns are the ones named as
 * combinations of the earlier; should that disagree with the pivoted rank (near-dependence at
 * the tolerance), the pivoted choice stands. A dropped column's regression on the kept ones is
 * L⁻ᵀ L⁻¹ A[kept, j] on the correlation scale.
 */
export function revealRank(a: Float64Array, m: number, columns: number[], tolerance: number): RankRevealed {
  const root = new Float64Array(m);
  for (let i = 0; i < m; i++) root[i] = Math.sqrt(a[i * m + i]);
  const correlationOf = (lowerOnly: boolean): Float64Array => {
    const c = new Float64Array(m * m);
    for (let i = 0; i < m; i++) {
      const row = i * m;
      const last = lowerOnly ? i : m - 1;
      const ri = root[i];
      for (let j = 0; j <= last; j++) c[row + j] = i === j ? 1 : a[row + j] / (ri * root[j]);
    }
    return c;
  };
  // The factorization overwrites the correlation's lower triangle in place: with full rank (the
  // common case) that triangle is all that is ever read, and the factor is used as it is.
  const pivoted = pivotedCholeskyInPlace(correlationOf(true), m, tolerance);
  const rank = pivoted.rank;
  if (rank === m) {
    return { order: Array.from(pivoted.pivots, (q) => columns[q]), factor: pivoted.factor, scale: Float64Array.from(pivoted.pivots, (q) => root[q]), dependents: [] };
  }
  const correlation = correlationOf(false);
  let keptPositions: number[];
  let factor: Float64Array;
  const ordered = orderedCholesky(correlation, m, tolerance);
  if (ordered.kept.length === rank) {
    keptPositions = Array.from(ordered.kept);
    factor = ordered.factor;
  } else {
    keptPositions = Array.from(pivoted.pivots.subarray(0, rank));
    factor = new Float64Array(rank * rank);
    for (let i = 0; i < rank; i++) for (let j = 0; j <= i; j++) factor[i * rank + j] = pivoted.factor[i * m + j];
  }
  const isKept = new Uint8Array(m);
  for (const q of keptPositions) isKept[q] = 1;
  const dependents: DependentLoadings[] = [];
  for (let p = 0; p < m; p++) {
    if (isKept[p]) continue;
    const loadings = Float64Array.from(keptPositions, (q) => correlation[q * m + p]);
    solveLower(factor, rank, loadings);
    solveLowerTranspose(factor, rank, loadings);
    dependents.push({ feature: columns[p], loadings, scale: root[p] });
  }
  return {
    order: keptPositions.map((q) => columns[q]),
    factor,
    scale: Float64Array.from(keptPositions, (q) => root[q]),
    dependents,
  };
}

export interface DependentColumn {
  feature: number;
  reason: 'duplicate' | 'dependent';
  combination: { feature: string; coefficient: number }[];
  /** The combination is constant within classes but not between them: perfect separation. */
  separating: boolean;
}

/**
 * Names a dependent column: its coefficients on the original scale (c_i = β̃_i √D_j / √D_i),
 * dropping those below √eps of the largest on the correlation scale (rounding noise), whether
 * the residual x_j − Σ c_i x_i also varies between classes (separating), and whether it is an
 * exact copy of one kept column (coefficient 1, same mean, not separating).
 */
export function describeDependent(facts: ColumnFacts, whitening: Whitening, dependent: DependentLoadings): DependentColumn {
  const j = dependent.feature;
  const { loadings, scale: dependentScale } = dependent;
  let largest = 0;
  for (const v of loadings) largest = Math.max(largest, Math.abs(v));
  const terms: { index: number; coefficient: number }[] = [];
  loadings.forEach((v, q) => {
    if (Math.abs(v) > Math.sqrt(EPSILON) * largest) terms.push({ index: whitening.order[q], coefficient: (v * dependentScale) / whitening.scale[q] });
  });
  terms.sort((x, y) => x.index - y.index);
  // Between-class residual Σ_i N_i (dev_ij − Σ c dev_i·)², against the total variance of x_j.
  let residual = 0;
  facts.deviations.forEach((dev, i) => {
    let r = dev[j];
    for (const t of terms) r -= t.coefficient * dev[t.index];
    residual += facts.counts[i] * r * r;
  });
  const separating = residual > Math.sqrt(EPSILON) * facts.totalDiagonal[j];
  const single = terms.length === 1 ? terms[0] : null;
  const sameMean =
    single !== null &&
    Math.abs(facts.overallMean[j] - facts.overallMean[single.index]) <=
      Math.sqrt(EPSILON) * (Math.max(facts.magnitude[j], facts.magnitude[single.index]) + Math.sqrt(facts.totalDiagonal[j] / facts.n));
  const duplicate = single !== null && !separating && Math.abs(single.coefficient - 1) <= Math.sqrt(EPSILON) && sameMean;
  return {
    feature: j,
    reason: duplicate ? 'duplicate' : 'dependent',
    combination: duplicate ? [{ feature: facts.features[single!.index], coefficient: 1 }] : terms.map((t) => ({ feature: facts.features[t.index], coefficient: t.coefficient })),
    separating,
  };
}

/** "c = 2·a − b" for messages. */
export function formatCombination(feature: string, combination: { feature: string; coefficient: number }[]): string {
  if (combination.length === 0) return `${feature} = a constant within each class`;
  const parts = combination.map((t, i) => {
    const magnitude = Math.abs(t.coefficient);
    const number = Math.abs(magnitude - 1) < 1e-9 ? '' : `${Number(magnitude.toPrecision(6))}·`;
    const sign = t.coefficient < 0 ? (i === 0 ? '−' : ' − ') : i === 0 ? '' : ' + ';
    return `${sign}${number}${t.feature}`;
  });
  return `${feature} = ${parts.join('')}`;
}
