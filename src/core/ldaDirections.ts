/**
 * The discriminant directions from a whitening of the within-class scatter, using that the
 * between-class scatter has rank ≤ K − 1: S_B = M Mᵀ with M = [√N_i (m_i − m)] (r × K). With
 * S_W = B Bᵀ, B = √D L (L the Cholesky factor of the within-class correlation matrix),
 *   S_B w = λ S_W w  ⇔  (B⁻¹M)(B⁻¹M)ᵀ u = λ u,  w = B⁻ᵀ u,
 * so the thin SVD of the r × (K−1) matrix X = B⁻¹ M H gives λ = σ² and u; H (K × (K−1)) is an
 * orthonormal basis of the complement of (√N_1, …, √N_K), which M annihilates exactly
 * (Σ N_i (m_i − m) = 0), so the rank bound K − 1 holds by construction rather than by rounding.
 * No d × d eigenproblem and no S_W⁻¹S_B is formed (Golub & Van Loan 4th ed. §8.7.2 for the
 * reduction of the symmetric-definite problem via Cholesky).
 *
 * Scaling: w = √(n − K) B⁻ᵀ u, so wᵀ S_W w = n − K: the scores' pooled within-class covariance
 * with divisor n − K is the identity. Sign: on each axis, the feature with the largest absolute
 * standardized coefficient gets a positive one (ties: the lowest feature index).
 */
import { EPSILON, solveLowerMatrix, solveLowerTransposeMatrix, thinSvd } from './linalg';
import type { Whitening } from './ldaColumns';

/** The discriminant axes; the r × k arrays are row-major with one row per kept feature. */
export interface Directions {
  /** k = min(K − 1, rank) eigenvalues of S_B w = λ S_W w, descending: the σ² of the σ above eps·max(n, r, K)·σ_max. */
  eigenvalues: Float64Array;
  /** λ_i / Σλ: sums to 1. */
  explainedRatio: Float64Array;
  /** √(λ/(1 + λ)). */
  canonicalCorrelations: Float64Array;
  /** r × k: wᵀ S_W w = n − K, sign rule applied. */
  directions: Float64Array;
  /** r × k: w times the pooled within-class standard deviation √(S_W,ii/(n − K)). */
  standardizedCoefficients: Float64Array;
  /** r × k: pooled within-class correlation of each feature with each score. */
  structure: Float64Array;
  /** K × k class means in score space. */
  centroids: Float64Array;
}

/** Columns 1..K−1 of the Householder reflector that maps s = √N/‖√N‖ to −e₁: K × (K−1), orthonormal, ⊥ s. */
function complementBasis(counts: number[]): Float64Array {
  const K = counts.length;
  const total = counts.reduce((a, b) => a + b, 0);
  const v = counts.map((c) => Math.sqrt(c / total));
  v[0] += 1; // s₁ > 0, so v = s + e₁ avoids cancellation
  const vv = v.reduce((a, b) => a + b * b, 0);
  const h = new Float64Array(K * (K - 1));
  for (let i = 0; i < K; i++) for (let j = 0; j < K - 1; j++) h[i * (K - 1) + j] = (i === j + 1 ? 1 : 0) - (2 * v[i] * v[j + 1]) / vv;
  return h;
}

/**
 * @param whitening the within-class scatter as solved, over the kept features (pivot order)
 * @param deviations K × d class mean minus overall mean (full feature set)
 * @returns the axes with the rows of the r × k arrays in the whitening's (pivot) order
 */
export function solveDirections(whitening: Whitening, deviations: Float64Array[], counts: number[], n: number): Directions {
  const K = counts.length;
  const r = whitening.order.length;
  const km1 = K - 1;
  const h = complementBasis(counts);
  const x = new Float64Array(r * km1);
  for (let q = 0; q < r; q++) {
    const f = whitening.order[q];
    for (let j = 0; j < km1; j++) {
      let sum = 0;
      for (let i = 0; i < K; i++) sum += Math.sqrt(counts[i]) * deviations[i][f] * h[i * km1 + j];
      x[q * km1 + j] = sum / whitening.scale[q];
    }
  }
  solveLowerMatrix(whitening.factor, r, x, km1);
  const svd = thinSvd(x, r, km1);
  const largest = km1 > 0 ? svd.values[0] : 0;
  const tolerance = EPSILON * Math.max(n, r, K) * largest;
  let k = 0;
  while (k < Math.min(km1, r) && svd.values[k] > tolerance) k++;
  const eigenvalues = Float64Array.from(svd.values.subarray(0, k), (s) => s * s);
  const sum = eigenvalues.reduce((a, b) => a + b, 0);
  const explainedRatio = eigenvalues.map((l) => l / sum);
  const canonicalCorrelations = eigenvalues.map((l) => Math.sqrt(l / (1 + l)));
  const u = new Float64Array(r * k);
  for (let q = 0; q < r; q++) for (let j = 0; j < k; j++) u[q * k + j] = svd.u[q * km1 + j];
  const directions = Float64Array.from(u);
  solveLowerTransposeMatrix(whitening.factor, r, directions, k);
  const degrees = Math.sqrt(n - K);
  for (let q = 0; q < r; q++) for (let j = 0; j < k; j++) directions[q * k + j] *= degrees / whitening.scale[q];
  const standardizedCoefficients = new Float64Array(r * k);
  for (let q = 0; q < r; q++) for (let j = 0; j < k; j++) standardizedCoefficients[q * k + j] = (directions[q * k + j] * whitening.scale[q]) / degrees;
  for (let j = 0; j < k; j++) {
    let best = -1;
    for (let q = 0; q < r; q++) {
      if (best < 0) {
        best = q;
        continue;
      }
      const a = Math.abs(standardizedCoefficients[q * k + j]);
      const b = Math.abs(standardizedCoefficients[best * k + j]);
      if (a > b || (a === b && whitening.order[q] < whitening.order[best])) best = q;
    }
    if (best >= 0 && standardizedCoefficients[best * k + j] < 0) {
      for (let q = 0; q < r; q++) {
        directions[q * k + j] = -directions[q * k + j];
        standardizedCoefficients[q * k + j] = -standardizedCoefficients[q * k + j];
        u[q * k + j] = -u[q * k + j];
      }
    }
  }
  // Pooled within-class correlation of feature q with score j: (S_W w_j)_q / √(S_qq (n − K)) = (L u_j)_q.
  const structure = new Float64Array(r * k);
  const l = whitening.factor;
  for (let q = 0; q < r; q++) {
    for (let j = 0; j < k; j++) {
      let s = 0;
      for (let t = 0; t <= q; t++) s += l[q * r + t] * u[t * k + j];
      structure[q * k + j] = s;
    }
  }
  const centroids = new Float64Array(K * k);
  for (let i = 0; i < K; i++) {
    for (let j = 0; j < k; j++) {
      let s = 0;
      for (let q = 0; q < r; q++) s += deviations[i][whitening.order[q]] * directions[q * k + j];
      centroids[i * k + j] = s;
    }
  }
  return { eigenvalues, explainedRatio, canonicalCorrelations, directions, standardizedCoefficients, structure, centroids };
}
