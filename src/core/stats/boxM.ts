/**
 * Box's M test of equal class covariance matrices (Box 1949, "A general distribution theory for a
 * class of likelihood criteria", Biometrika 36, 317–346), with its χ² and F approximations as
 * presented in Rencher & Christensen, Methods of Multivariate Analysis, 3rd ed., §7.3.2.
 *
 * For K classes with n_i rows, ν_i = n_i − 1, ν = Σ ν_i, class covariances S_i = scatter_i/ν_i and the
 * pooled covariance S_pl = Σ scatter_i / ν:
 *   M  = ν ln|S_pl| − Σ ν_i ln|S_i|        (Box's M; the textbook's likelihood ratio is e^(−M/2))
 *   c1 = [Σ 1/ν_i − 1/ν] (2p² + 3p − 1) / (6(p + 1)(K − 1))
 *   c2 = [Σ 1/ν_i² − 1/ν²] (p − 1)(p + 2) / (6(K − 1))
 *   χ² = (1 − c1) M  on  a1 = (K − 1) p (p + 1)/2 degrees of freedom
 *   a2 = (a1 + 2)/|c2 − c1²|;
 *   if c2 > c1²: F = b1 M,  b1 = (1 − c1 − a1/a2)/a1;
 *   else:        F = a2 b2 M / (a1 (1 − b2 M)),  b2 = (1 − c1 + 2/a2)/a2   (Box's "b − M" form),
 *   F on (a1, a2) degrees of freedom. In the second case M ≥ 1/b2 lies beyond the approximation's
 *   range (F would be infinite or negative); F = ∞ and pF = 0 are returned, the χ² p still applies.
 *
 * Log-determinants come from Cholesky factors. Each matrix is first scaled by D = diag(S_pl)^(−1/2):
 * the terms 2 ln|D| cancel in M because ν = Σ ν_i, and the scaled matrices are far better
 * conditioned. A class covariance counts as singular when its pivoted Cholesky factor stops before
 * rank p at LAPACK's default tolerance for dpstrf, p · ε · max diagonal; the test is then skipped
 * with the reason (so is a class with fewer than p + 1 rows, whose covariance must be singular).
 */
import { EPSILON, pivotedCholesky } from '../linalg';
import { chiSquareUpperTail, fUpperTail } from './distributions';

export interface BoxMClass {
  /** Rows in the class, n_i. */
  count: number;
  /** Centred scatter Σ (x − m_i)(x − m_i)ᵀ of the class, p × p row-major, full symmetric. */
  scatter: Float64Array;
  /** Used in the reason when the test is skipped; default "class #i" (1-based). */
  label?: string;
}

export interface BoxMResult {
  M: number;
  chi2: number;
  df: number;
  p: number;
  F: number;
  df1: number;
  df2: number;
  pF: number;
}

export interface BoxMSkipped {
  /** One sentence saying why the test could not be computed. */
  skipped: string;
  /** Index (into `classes`) of the class that caused it, when one did. */
  classIndex?: number;
}

/**
 * @param pooledLogDeterminant ln|D S_pl D| (D = diag(S_pl)^(−1/2): the log-determinant of the pooled
 *   within-class correlation matrix) when the caller already holds its Cholesky factor, as the
 *   exact discriminant solver does on the features it kept; computed here when absent.
 */
export function boxM(classes: readonly BoxMClass[], p: number, pooledLogDeterminant?: number): BoxMResult | BoxMSkipped {
  const K = classes.length;
  if (K < 2) return { skipped: `Box's M compares class covariances and needs at least two classes; there ${K === 1 ? 'is one' : 'are none'}.` };
  const name = (i: number) => classes[i].label ?? `class #${i + 1}`;
  for (let i = 0; i < K; i++) {
    if (classes[i].count < p + 1) {
      return {
        skipped: `Box's M needs at least p + 1 = ${p + 1} rows in every class; ${name(i)} has ${classes[i].count}, so its covariance matrix is singular.`,
        classIndex: i,
      };
    }
  }
  const nu = classes.map((c) => c.count - 1);
  const nuTotal = nu.reduce((a, b) => a + b, 0);
  const pooled = new Float64Array(p * p);
  for (const c of classes) for (let k = 0; k < p * p; k++) pooled[k] += c.scatter[k];
  for (let k = 0; k < p * p; k++) pooled[k] /= nuTotal;
  const scale = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const variance = pooled[j * p + j];
    if (!(variance > 0)) {
      return { skipped: `Box's M cannot be computed: feature ${j + 1} has no variance within any class, so every class covariance is singular.` };
    }
    scale[j] = 1 / Math.sqrt(variance);
  }
  const pooledLogDet = pooledLogDeterminant ?? scaledLogDeterminant(pooled, 1, scale, p);
  if (pooledLogDet === null) return { skipped: "Box's M cannot be computed: the pooled within-class covariance matrix is singular." };
  let M = nuTotal * pooledLogDet;
  for (let i = 0; i < K; i++) {
    const logDet = scaledLogDeterminant(classes[i].scatter, 1 / nu[i], scale, p);
    if (logDet === null) {
      return {
        skipped: `Box's M cannot be computed: the covariance matrix of ${name(i)} is singular (a feature is constant or linearly dependent on others within that class).`,
        classIndex: i,
      };
    }
    M -= nu[i] * logDet;
  }
  // M ≥ 0 (log-determinant is concave); a negative value can only be rounding of 0.
  M = Math.max(0, M);

  let sumInverse = 0;
  let sumInverseSquared = 0;
  for (const v of nu) {
    sumInverse += 1 / v;
    sumInverseSquared += 1 / (v * v);
  }
  const c1 = ((sumInverse - 1 / nuTotal) * (2 * p * p + 3 * p - 1)) / (6 * (p + 1) * (K - 1));
  const c2 = ((sumInverseSquared - 1 / (nuTotal * nuTotal)) * (p - 1) * (p + 2)) / (6 * (K - 1));
  const a1 = ((K - 1) * p * (p + 1)) / 2;
  const chi2 = (1 - c1) * M;
  const a2 = (a1 + 2) / Math.abs(c2 - c1 * c1);
  let F: number;
  if (c2 > c1 * c1) {
    F = ((1 - c1 - a1 / a2) / a1) * M;
  } else {
    const b2 = (1 - c1 + 2 / a2) / a2;
    F = b2 * M < 1 ? (a2 * b2 * M) / (a1 * (1 - b2 * M)) : Infinity;
  }
  return { M, chi2, df: a1, p: chiSquareUpperTail(chi2, a1), F, df1: a1, df2: a2, pF: fUpperTail(F, a1, a2) };
}

/**
 * ln|factor · D A D| for a p × p symmetric A, or null when the scaled matrix is singular to the
 * tolerance p·ε·max diagonal (pivoted Cholesky; LAPACK dpstrf's default).
 */
function scaledLogDeterminant(a: Float64Array, factor: number, scale: Float64Array, p: number): number | null {
  const scaled = new Float64Array(p * p);
  let maxDiagonal = 0;
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) scaled[i * p + j] = a[i * p + j] * factor * scale[i] * scale[j];
    maxDiagonal = Math.max(maxDiagonal, scaled[i * p + i]);
  }
  if (!(maxDiagonal > 0)) return null;
  const { rank, factor: l } = pivotedCholesky(scaled, p, p * EPSILON * maxDiagonal);
  if (rank < p) return null;
  let logDet = 0;
  for (let k = 0; k < p; k++) logDet += Math.log(l[k * p + k]);
  return 2 * logDet;
}
