/**
 * The shared input of the eigenvalue-based tests: the nonzero eigenvalues λ_1 ≥ … of S_W⁻¹ S_B for
 * p features, K classes and n rows. Throws only on caller errors (bugs, not data problems): K < 2,
 * n < K, more than min(p, K − 1) eigenvalues, a NaN eigenvalue. Data that leave the tests undefined
 * (no features left, n − K < p) are marked `defined: false` instead.
 */
export interface EigenvalueInput {
  /** The eigenvalues, tiny negatives (rounding of a zero) set to 0. */
  lambda: number[];
  /** q = K − 1, the between-class degrees of freedom. */
  q: number;
  /** n − K, the residual degrees of freedom. */
  residual: number;
  /** s = min(p, K − 1), the number of possible nonzero eigenvalues. */
  s: number;
  /** False when p = 0 or n − K < p: S_W is then singular and no F or χ² approximation applies. */
  defined: boolean;
}

export function checkEigenvalueInput(eigenvalues: ArrayLike<number>, p: number, K: number, n: number): EigenvalueInput {
  if (!Number.isInteger(p) || p < 0) throw new RangeError(`p must be a non-negative integer, got ${p}`);
  if (!Number.isInteger(K) || K < 2) throw new RangeError(`K must be an integer ≥ 2, got ${K}`);
  if (!Number.isInteger(n) || n < K) throw new RangeError(`n must be an integer ≥ K = ${K}, got ${n}`);
  const s = Math.min(p, K - 1);
  if (eigenvalues.length > s) throw new RangeError(`at most min(p, K − 1) = ${s} eigenvalues, got ${eigenvalues.length}`);
  const lambda: number[] = [];
  for (let i = 0; i < eigenvalues.length; i++) {
    const value = eigenvalues[i];
    if (Number.isNaN(value)) throw new RangeError(`eigenvalue ${i} is NaN`);
    lambda.push(Math.max(0, value));
  }
  return { lambda, q: K - 1, residual: n - K, s, defined: p >= 1 && n - K >= p };
}
