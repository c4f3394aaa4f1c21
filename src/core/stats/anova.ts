/**
 * One-way analysis of variance of each feature separately, from per-class moments (no rows needed).
 * For feature j with class counts n_i, class means m_ij, n = Σ n_i and m̄_j = Σ n_i m_ij / n:
 *   SS_between = Σ_i n_i (m_ij − m̄_j)²,  SS_within = (S_W)_jj,
 *   F = (SS_between/(K − 1)) / (SS_within/(n − K)) on (K − 1, n − K) df,
 *   η² = SS_between / (SS_between + SS_within)   (the share of the feature's variance between classes).
 * (Fisher's one-way ANOVA; e.g. Rencher & Christensen, Methods of Multivariate Analysis, 3rd ed., §6.1.1,
 * section number from memory.)
 *
 * Degenerate features, where F would be 0/0 or x/0 (never NaN):
 *  - no variance within classes and none between (a constant column): F = 0, p = 1, η² = 0;
 *  - no variance within classes but some between (constant inside each class, different across
 *    classes: it separates perfectly): F = ∞, p = 0, η² = 1.
 * "No variance" means at most the rounding level of the data: a sum of squares ≤ n·(8·ε·|m|_max)²,
 * |m|_max the largest absolute class mean of that feature, since sums of squares of values of that
 * size cannot be resolved more finely.
 * With no residual degrees of freedom (n = K: one row per class) the test is undefined: F and p are
 * NaN for every feature and η² is still given, as a description.
 */
import { fUpperTail } from './distributions';

export interface UnivariateTest {
  F: number;
  p: number;
  etaSquared: number;
}

/**
 * @param counts class sizes n_i ≥ 1, length K ≥ 2
 * @param means class means, K × d row-major
 * @param withinDiagonal diagonal of the within-class scatter S_W (sums of squares, not variances), length d
 * @param d number of features
 * @returns one test per feature, in feature order
 */
export function univariateAnova(counts: ArrayLike<number>, means: Float64Array, withinDiagonal: Float64Array, d: number): UnivariateTest[] {
  const K = counts.length;
  let n = 0;
  for (let i = 0; i < K; i++) n += counts[i];
  if (K < 2) throw new RangeError(`univariate ANOVA needs at least two classes, got ${K}`);
  if (!(n >= K)) throw new RangeError(`univariate ANOVA needs at least one row per class (n = ${n}, K = ${K})`);
  if (means.length !== K * d || withinDiagonal.length !== d) {
    throw new RangeError(`means must be K × d = ${K} × ${d} and withinDiagonal of length ${d}`);
  }
  const df1 = K - 1;
  const df2 = n - K;
  const results: UnivariateTest[] = [];
  for (let j = 0; j < d; j++) {
    let overall = 0;
    let largest = 0;
    for (let i = 0; i < K; i++) {
      const m = means[i * d + j];
      overall += counts[i] * m;
      largest = Math.max(largest, Math.abs(m));
    }
    overall /= n;
    let between = 0;
    for (let i = 0; i < K; i++) {
      const deviation = means[i * d + j] - overall;
      between += counts[i] * deviation * deviation;
    }
    const within = withinDiagonal[j];
    if (df2 === 0) {
      results.push({ F: NaN, p: NaN, etaSquared: between + within > 0 ? between / (between + within) : 0 });
      continue;
    }
    const rounding = n * (8 * Number.EPSILON * largest) ** 2;
    if (within <= rounding) {
      results.push(between <= rounding ? { F: 0, p: 1, etaSquared: 0 } : { F: Infinity, p: 0, etaSquared: 1 });
      continue;
    }
    const F = (between / df1) / (within / df2);
    results.push({ F, p: fUpperTail(F, df1, df2), etaSquared: between / (between + within) });
  }
  return results;
}
