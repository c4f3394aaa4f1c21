/**
 * The four classical multivariate tests of equal class means (one-way MANOVA), from the nonzero
 * eigenvalues λ_1 ≥ … ≥ λ_s of S_W⁻¹ S_B, s = min(p, K − 1), with p features, K classes, n rows.
 *
 * The F approximations and degrees of freedom are those of R's `stats::summary.manova` (its internal
 * `stats:::Wilks`, `Pillai`, `HL`, `Roy`, R 4.2), so that R's output is an outside reference. In R's
 * notation q = K − 1 (hypothesis df) and df.res = n − K (residual df). Sources of the formulas:
 *  - Wilks' Λ = Π 1/(1 + λ_i) with Rao's F (Rao 1951, Bull. Inst. Int. Statist. 33); exact when
 *    p ≤ 2 or K ≤ 3.
 *  - Pillai's V = Σ λ/(1 + λ), Hotelling–Lawley's U = Σ λ, Roy's θ = λ_1, with the usual F
 *    approximations (Roy's F is an upper bound, so its p is a lower bound).
 *  All four are presented in Rencher & Christensen, Methods of Multivariate Analysis, 3rd ed., §6.1
 *  (section number from memory); the code follows R's functions term by term.
 * For K = 2 (s = 1) all four F are exact and equal.
 *
 * Inputs are the caller's: `eigenvalues` may hold fewer than s values (the rest are zero, e.g. when
 * S_B has lower rank) and tiny negative values, which can only be rounding of a zero, count as 0.
 * When n − K < p (the within-class scatter cannot be of full rank; R's summary.manova refuses) or no
 * feature is left (p = 0), the statistic is still returned but F and p are NaN; so are they when an
 * approximation has no positive degrees of freedom (R gives NA). `multivariateTestIssue` gives the
 * reason to show.
 */
import type { MultivariateTest } from '../types';
import { fUpperTail } from './distributions';
import { checkEigenvalueInput as check } from './eigenvalueInput';

export type { MultivariateTest } from '../types';

/** λ/(1 + λ), also for λ = ∞. */
function ratio(lambda: number): number {
  return lambda === Infinity ? 1 : lambda / (1 + lambda);
}

/** The test with its p-value, or NaN F and p when undefined or the degrees of freedom are not positive. */
function finish(defined: boolean, statistic: number, F: number, df1: number, df2: number): MultivariateTest {
  if (!defined || !(df1 > 0 && df2 > 0) || Number.isNaN(F)) return { statistic, F: NaN, df1, df2, p: NaN };
  return { statistic, F, df1, df2, p: fUpperTail(F, df1, df2) };
}

/**
 * Why the tests cannot be computed for p features, K classes and n rows, or null when they can:
 * with n − K < p the within-class scatter is singular and the F approximations lose their degrees of
 * freedom; with p = 0 there is nothing to test. (K < 2 and n < K are caller errors, rejected by the
 * test functions themselves.)
 */
export function multivariateTestIssue(p: number, K: number, n: number): string | null {
  if (p === 0) return 'No feature is left to test, so the multivariate tests are undefined.';
  if (n - K < p) {
    return `${n} rows in ${K} classes leave ${n - K} residual degrees of freedom, fewer than the ${p} features: the within-class scatter is singular and the multivariate tests are undefined.`;
  }
  return null;
}

/** Wilks' Λ = Π 1/(1 + λ_i) with Rao's F; R's `stats:::Wilks`. */
export function wilks(eigenvalues: ArrayLike<number>, p: number, K: number, n: number): MultivariateTest {
  const { lambda, q, residual, defined } = check(eigenvalues, p, K, n);
  // In logarithms, so that many large λ neither underflow Λ nor lose Λ^(−1/t) − 1 to cancellation.
  let logInverse = 0; // −ln Λ
  for (const l of lambda) logInverse += Math.log1p(l);
  const statistic = Math.exp(-logInverse);
  const tmp1 = residual - 0.5 * (p - q + 1);
  const tmp2 = (p * q - 2) / 4;
  const tmp3Squared = p * p + q * q - 5;
  const t = tmp3Squared > 0 ? Math.sqrt((p * q * p * q - 4) / tmp3Squared) : 1;
  const df1 = p * q;
  const df2 = tmp1 * t - 2 * tmp2;
  const F = (Math.expm1(logInverse / t) * df2) / df1;
  return finish(defined, statistic, F, df1, df2);
}

/** Pillai's trace V = Σ λ/(1 + λ); R's `stats:::Pillai`. */
export function pillai(eigenvalues: ArrayLike<number>, p: number, K: number, n: number): MultivariateTest {
  const { lambda, q, residual, s, defined } = check(eigenvalues, p, K, n);
  let statistic = 0;
  // s − V = Σ 1/(1 + λ) over the s eigenvalues (missing ones are 0): no cancellation when V ≈ s.
  let complement = s - lambda.length;
  for (const l of lambda) {
    statistic += ratio(l);
    complement += l === Infinity ? 0 : 1 / (1 + l);
  }
  const m = 0.5 * (Math.abs(p - q) - 1);
  const nHalf = 0.5 * (residual - p - 1);
  const tmp1 = 2 * m + s + 1;
  const tmp2 = 2 * nHalf + s + 1;
  const F = complement === 0 ? Infinity : ((tmp2 / tmp1) * statistic) / complement;
  return finish(defined, statistic, F, s * tmp1, s * tmp2);
}

/** Hotelling–Lawley trace U = Σ λ; R's `stats:::HL`. */
export function hotellingLawley(eigenvalues: ArrayLike<number>, p: number, K: number, n: number): MultivariateTest {
  const { lambda, q, residual, s, defined } = check(eigenvalues, p, K, n);
  let statistic = 0;
  for (const l of lambda) statistic += l;
  const m = 0.5 * (Math.abs(p - q) - 1);
  const nHalf = 0.5 * (residual - p - 1);
  const tmp1 = 2 * m + s + 1;
  const tmp2 = 2 * (s * nHalf + 1);
  const F = (tmp2 * statistic) / s / s / tmp1;
  return finish(defined, statistic, F, s * tmp1, tmp2);
}

/** Roy's largest root θ = λ_1 with the F upper bound (its p is a lower bound); R's `stats:::Roy`. */
export function roy(eigenvalues: ArrayLike<number>, p: number, K: number, n: number): MultivariateTest {
  const { lambda, q, residual, defined } = check(eigenvalues, p, K, n);
  const statistic = lambda.length === 0 ? 0 : Math.max(...lambda);
  const tmp1 = Math.max(p, q);
  const tmp2 = residual - tmp1 + q;
  return finish(defined, statistic, (tmp2 * statistic) / tmp1, tmp1, tmp2);
}
