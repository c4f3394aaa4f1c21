/**
 * Principal component analysis of the same rows and columns as the discriminant analysis, from
 * the moments: the total scatter S_T = S_W + S_B divided by n − 1 is the covariance matrix; with
 * `standardized` it is turned into the correlation matrix (each feature divided by its standard
 * deviation). A feature with zero variance cannot be standardized: its standardized values are
 * taken as 0, so it contributes a zero eigenvalue and loads on no other component.
 *
 * All eigenvalues are computed (tridiagonalisation and implicit QL), but eigenvectors only for
 * the first c = min(p, 10) components (inverse iteration), so a 1000-feature table costs well
 * under a second. Explained ratios λ_i/Σλ sum to 1 (all zero when every feature is constant);
 * rounding-level negative eigenvalues are reported as 0.
 *
 * Sign rule: on each component the feature with the largest absolute loading gets a positive
 * loading (ties: the lowest feature index).
 */
import { symmetricEigen } from './linalg';
import { overallMean, totalCount, totalScatter, type Moments } from './moments';

export const PCA_COMPONENTS = 10;

export interface PcaSolution {
  scale: 'covariance' | 'standardized';
  /** All p eigenvalues (covariance scale, divisor n − 1), descending, ≥ 0. */
  eigenvalues: Float64Array;
  /** λ_i / Σλ, p of them. */
  explainedRatio: Float64Array;
  /** p × c row-major: column j is the unit eigenvector of component j. */
  loadings: Float64Array;
  /** c = min(p, 10). */
  components: number;
  /** Overall mean of each selected feature, p. */
  mean: Float64Array;
  /** Divisor of each centred feature before projecting: its standard deviation, or 1. p. */
  scaleBy: Float64Array;
  /** Indices of the selected features into the moments' features, p. */
  features: number[];
}

export function solvePca(m: Moments, scale: 'covariance' | 'standardized', features?: number[]): PcaSolution {
  const d = m.features.length;
  const selected = features ? [...features] : Array.from({ length: d }, (_, i) => i);
  const p = selected.length;
  const n = totalCount(m);
  const total = totalScatter(m);
  const fullMean = overallMean(m);
  const divisor = Math.max(1, n - 1);
  const matrix = new Float64Array(p * p);
  for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) matrix[a * p + b] = total[selected[a] * d + selected[b]] / divisor;
  const scaleBy = new Float64Array(p).fill(1);
  if (scale === 'standardized') {
    for (let a = 0; a < p; a++) {
      const variance = matrix[a * p + a];
      if (variance > 0) scaleBy[a] = Math.sqrt(variance);
    }
    for (let a = 0; a < p; a++) {
      const zero = !(matrix[a * p + a] > 0);
      for (let b = 0; b < p; b++) {
        const zeroB = !(matrix[b * p + b] > 0);
        matrix[a * p + b] = zero || zeroB ? 0 : a === b ? 1 : matrix[a * p + b] / (scaleBy[a] * scaleBy[b]);
      }
    }
  }
  const components = Math.min(p, PCA_COMPONENTS);
  const eigen = symmetricEigen(matrix, p, components);
  const eigenvalues = eigen.values.map((v) => Math.max(0, v));
  const sum = eigenvalues.reduce((a, b) => a + b, 0);
  const explainedRatio = eigenvalues.map((v) => (sum > 0 ? v / sum : 0));
  const loadings = Float64Array.from(eigen.vectors);
  for (let j = 0; j < components; j++) {
    let best = 0;
    for (let a = 1; a < p; a++) if (Math.abs(loadings[a * components + j]) > Math.abs(loadings[best * components + j])) best = a;
    if (loadings[best * components + j] < 0) for (let a = 0; a < p; a++) loadings[a * components + j] = -loadings[a * components + j];
  }
  for (let k = 0; k < loadings.length; k++) if (loadings[k] === 0) loadings[k] = 0; // no −0 in reports
  return {
    scale,
    eigenvalues,
    explainedRatio,
    loadings,
    components,
    mean: Float64Array.from(selected, (j) => fullMean[j]),
    scaleBy,
    features: selected,
  };
}

/** Scores of one row (x: all d features, input order) on PC1 and PC2 (0 where there is no such component). */
export function pcaScoreRow(p: PcaSolution, x: Float64Array, out: Float64Array): void {
  const c = p.components;
  out[0] = 0;
  out[1] = 0;
  const used = Math.min(2, c);
  for (let a = 0; a < p.features.length; a++) {
    const v = (x[p.features[a]] - p.mean[a]) / p.scaleBy[a];
    for (let j = 0; j < used; j++) out[j] += v * p.loadings[a * c + j];
  }
}
