/**
 * Bartlett's sequential χ² tests of the discriminant functions (Bartlett 1947, J. R. Statist. Soc.
 * Suppl. 9; the form for discriminant analysis in Rencher & Christensen, Methods of Multivariate
 * Analysis, 3rd ed., §8.6, section number from memory).
 *
 * Entry j (0-based) tests whether the discriminants j+1, j+2, … (1-based) together carry any
 * separation, i.e. whether λ_{j+1} = … = λ_s = 0:
 *   χ²_j = (n − 1 − (p + K)/2) · Σ_{i ≥ j} ln(1 + λ_i),   df_j = (p − j)(K − 1 − j).
 * Entry 0 is Bartlett's χ² version of Wilks' test: χ²_0 = −(n − 1 − (p + K)/2) ln Λ.
 *
 * `eigenvalues` are the nonzero eigenvalues of S_W⁻¹ S_B, descending (at most s = min(p, K − 1));
 * one entry per eigenvalue given. λ = ∞ gives χ² = ∞, p = 0. When n − K < p (S_W singular, see
 * `multivariateTestIssue`) χ² and p are NaN.
 */
import { chiSquareUpperTail } from './distributions';
import { checkEigenvalueInput } from './eigenvalueInput';

export interface SequentialTest {
  chi2: number;
  df: number;
  p: number;
}

export function bartlettSequential(eigenvalues: ArrayLike<number>, p: number, K: number, n: number): SequentialTest[] {
  const { lambda, defined } = checkEigenvalueInput(eigenvalues, p, K, n);
  const factor = n - 1 - (p + K) / 2;
  const tests: SequentialTest[] = [];
  // Sums from the smallest eigenvalue up, so that each tail sum is accumulated once.
  let tail = 0;
  const tails = new Array<number>(lambda.length);
  for (let i = lambda.length - 1; i >= 0; i--) {
    tail += Math.log1p(lambda[i]);
    tails[i] = tail;
  }
  for (let j = 0; j < lambda.length; j++) {
    const df = (p - j) * (K - 1 - j);
    if (!defined || !(factor > 0)) {
      tests.push({ chi2: NaN, df, p: NaN });
      continue;
    }
    const chi2 = factor * tails[j];
    tests.push({ chi2, df, p: chiSquareUpperTail(chi2, df) });
  }
  return tests;
}
