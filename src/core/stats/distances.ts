/**
 * Mahalanobis distances between class centroids (Mahalanobis 1936, Proc. Natl. Inst. Sci. India 2):
 *   D_ij = sqrt((m_i − m_j)ᵀ Σ⁻¹ (m_i − m_j)),
 * usually under the pooled within-class covariance Σ = S_W/(n − K) (or a shrunk version of it).
 *
 * With Σ = L Lᵀ (Cholesky), D_ij = ‖L⁻¹m_i − L⁻¹m_j‖: K triangular solves, no inverse is formed. The
 * centroids are first centred on their plain average, so that a large common offset of the features
 * cancels before the solve instead of after it.
 */
import { cholesky, solveLower } from '../linalg';

/**
 * The same distances under Σ = S/ν when a whitening of the scatter S is at hand:
 * S = (√D L)(√D L)ᵀ with rows and columns taken in `order` (LdaSolution.whitening), so
 * D_ij = √ν ‖L⁻¹ D^(−1/2) (m_i − m_j)[order]‖ — no second factorisation of the same matrix.
 * @param means class centroids, K × p row-major (p = order.length, the scatter's feature order)
 * @param degrees ν, the divisor of the covariance (n − K for the pooled within-class covariance)
 */
export function centroidMahalanobisWhitened(
  means: Float64Array,
  K: number,
  whitening: { order: Int32Array; factor: Float64Array; scale: Float64Array },
  degrees: number,
): number[][] {
  const { order, factor, scale } = whitening;
  const p = order.length;
  if (means.length !== K * p || factor.length !== p * p) throw new RangeError(`means must be K × p = ${K} × ${p} and the factor p × p`);
  const centre = new Float64Array(p);
  for (let i = 0; i < K; i++) for (let j = 0; j < p; j++) centre[j] += means[i * p + j] / K;
  const root = Math.sqrt(degrees);
  const whitened: Float64Array[] = [];
  for (let i = 0; i < K; i++) {
    const z = new Float64Array(p);
    for (let q = 0; q < p; q++) z[q] = ((means[i * p + order[q]] - centre[order[q]]) / scale[q]) * root;
    solveLower(factor, p, z);
    whitened.push(z);
  }
  return distancesBetween(whitened, K, p);
}


/**
 * @param means class centroids, K × p row-major
 * @param covariance p × p symmetric positive definite (row-major, full)
 * @returns K × K symmetric matrix of distances with a zero diagonal. When `covariance` is not
 *   positive definite (Cholesky meets a non-positive pivot; e.g. no variance within classes at all)
 *   the distances are undefined and every off-diagonal entry is NaN, so that thin data never stop
 *   the analysis; pass the covariance of the features the discriminant analysis kept.
 * @throws RangeError when the array lengths do not match K and p (a caller error)
 */
export function centroidMahalanobis(means: Float64Array, covariance: Float64Array, K: number, p: number): number[][] {
  if (means.length !== K * p || covariance.length !== p * p) {
    throw new RangeError(`means must be K × p = ${K} × ${p} and covariance p × p`);
  }
  const { factor, positiveDefinite } = cholesky(covariance, p);
  if (!positiveDefinite) return Array.from({ length: K }, (_, i) => Array.from({ length: K }, (_, j) => (i === j ? 0 : NaN)));
  const centre = new Float64Array(p);
  for (let i = 0; i < K; i++) for (let j = 0; j < p; j++) centre[j] += means[i * p + j] / K;
  const whitened: Float64Array[] = [];
  for (let i = 0; i < K; i++) {
    const z = new Float64Array(p);
    for (let j = 0; j < p; j++) z[j] = means[i * p + j] - centre[j];
    solveLower(factor, p, z);
    whitened.push(z);
  }
  return distancesBetween(whitened, K, p);
}

/** Euclidean distances between K whitened centroids of length p, K × K. */
function distancesBetween(whitened: Float64Array[], K: number, p: number): number[][] {
  const distances = Array.from({ length: K }, () => new Array<number>(K).fill(0));
  for (let i = 0; i < K; i++) {
    for (let k = i + 1; k < K; k++) {
      let sum = 0;
      for (let j = 0; j < p; j++) {
        const difference = whitened[i][j] - whitened[k][j];
        sum += difference * difference;
      }
      distances[i][k] = distances[k][i] = Math.sqrt(sum);
    }
  }
  return distances;
}
