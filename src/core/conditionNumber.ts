/**
 * 2-norm condition number λ_max/λ_min of a symmetric positive definite matrix A = L Lᵀ, from its
 * Cholesky factor alone (any symmetric permutation of A has the same eigenvalues, so a pivoted
 * factor serves as it is). Small matrices (m ≤ 64) get all eigenvalues of L Lᵀ
 * (symmetricEigenvalues). Larger ones get the two extreme eigenvalues by the Lanczos method with
 * full re-orthogonalisation (Golub & Van Loan, Matrix Computations, 4th ed., §10.1 and §10.3.1):
 * λ_max of L Lᵀ applied as two triangular products, λ_min as 1/λ_max of L⁻ᵀ L⁻¹. Extreme Ritz values converge first and fast, so a
 * few dozen products of cost O(m²) replace the O(m³) reduction; iteration stops when the largest
 * Ritz value changes by less than 1e-12 relative over three steps (or the Krylov space is
 * exhausted, where the value is exact). Deterministic: the start vector comes from a fixed seed.
 */
import { solveLower, solveLowerTranspose, symmetricEigenvalues, tridiagonalEigenvalues } from './linalg';

const DIRECT_LIMIT = 64;

/** Largest eigenvalue of the symmetric operator `apply` on R^m. */
export function largestEigenvalue(apply: (x: Float64Array, out: Float64Array) => void, m: number, maxIterations = 300): number {
  const limit = Math.min(m, maxIterations);
  const basis: Float64Array[] = [];
  const alpha: number[] = [];
  const beta: number[] = [];
  let q = new Float64Array(m);
  let seed = 7;
  for (let i = 0; i < m; i++) {
    seed = (seed * 48271) % 2147483647;
    q[i] = seed / 2147483647 + 0.5;
  }
  normalize(q);
  const w = new Float64Array(m);
  let previous = -Infinity;
  let steady = 0;
  let ritz = 0;
  for (let j = 0; j < limit; j++) {
    basis.push(q);
    apply(q, w);
    let a = 0;
    for (let i = 0; i < m; i++) a += q[i] * w[i];
    alpha.push(a);
    // Full re-orthogonalisation against every basis vector, twice (Kahan's "twice is enough").
    for (let pass = 0; pass < 2; pass++) {
      for (const v of basis) {
        let s = 0;
        for (let i = 0; i < m; i++) s += v[i] * w[i];
        for (let i = 0; i < m; i++) w[i] -= s * v[i];
      }
    }
    ritz = largestTridiagonalEigenvalue(alpha, beta);
    let squares = 0;
    for (let i = 0; i < m; i++) squares += w[i] * w[i];
    const b = Math.sqrt(squares);
    if (!(b > 1e-14 * Math.abs(ritz))) break; // invariant subspace: the Ritz value is exact
    if (Math.abs(ritz - previous) <= 1e-12 * Math.abs(ritz)) {
      if (++steady >= 3) break;
    } else {
      steady = 0;
    }
    previous = ritz;
    beta.push(b);
    q = Float64Array.from(w, (v) => v / b);
  }
  return ritz;
}

function normalize(x: Float64Array): void {
  let s = 0;
  for (const v of x) s += v * v;
  const inverse = 1 / Math.sqrt(s);
  for (let i = 0; i < x.length; i++) x[i] *= inverse;
}

/** Largest eigenvalue of the tridiagonal with diagonal alpha and off-diagonal beta (length alpha−1). */
function largestTridiagonalEigenvalue(alpha: number[], beta: number[]): number {
  return tridiagonalEigenvalues(alpha, [0, ...beta])[0];
}

/** out = L Lᵀ x for the m × m lower-triangular L (row-major); `scratch` holds Lᵀ x. */
function applyGram(factor: Float64Array, m: number, x: Float64Array, out: Float64Array, scratch: Float64Array): void {
  scratch.fill(0);
  for (let i = 0; i < m; i++) {
    const row = i * m;
    const xi = x[i];
    for (let k = 0; k <= i; k++) scratch[k] += factor[row + k] * xi;
  }
  for (let i = 0; i < m; i++) {
    const row = i * m;
    let s = 0;
    for (let k = 0; k <= i; k++) s += factor[row + k] * scratch[k];
    out[i] = s;
  }
}

/**
 * Condition number of the m × m SPD matrix L Lᵀ given its Cholesky factor L, capped at 1/eps so
 * it is never Infinity or NaN; 1 for the empty matrix.
 */
export function conditionNumber(factor: Float64Array, m: number): number {
  if (m === 0) return 1;
  let largest: number;
  let smallest: number;
  if (m <= DIRECT_LIMIT) {
    const a = new Float64Array(m * m);
    for (let i = 0; i < m; i++) {
      for (let j = 0; j <= i; j++) {
        let s = 0;
        for (let k = 0; k <= j; k++) s += factor[i * m + k] * factor[j * m + k];
        a[i * m + j] = s;
        a[j * m + i] = s;
      }
    }
    const values = symmetricEigenvalues(a, m);
    largest = values[0];
    smallest = values[m - 1];
  } else {
    const scratch = new Float64Array(m);
    largest = largestEigenvalue((x, out) => applyGram(factor, m, x, out, scratch), m);
    const inverseLargest = largestEigenvalue((x, out) => {
      out.set(x);
      solveLower(factor, m, out);
      solveLowerTranspose(factor, m, out);
    }, m);
    smallest = 1 / inverseLargest;
  }
  if (!(largest > 0)) return 1;
  return largest / Math.max(smallest, Number.EPSILON * largest);
}
