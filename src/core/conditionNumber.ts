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
import { choleskyKernel, type CholeskyKernel } from './choleskyKernel';
import { dotRange, solveLower, solveLowerTranspose, symmetricEigenvalues, tridiagonalEigenvalues } from './linalg';

const DIRECT_LIMIT = 64;
/** Most Lanczos steps of one run. */
const LANCZOS_STEPS = 300;

/**
 * The Lanczos basis and the re-orthogonalisation against it: w −= (v·w) v for every basis vector
 * v in order, twice (Kahan's "twice is enough"), each v·w summed as linalg.dotRange sums it.
 */
interface LanczosBasis {
  push(q: Float64Array): void;
  orthogonalize(w: Float64Array): void;
}

function plainBasis(m: number): LanczosBasis {
  const basis: Float64Array[] = [];
  return {
    push: (q) => basis.push(q),
    orthogonalize: (w) => {
      for (let pass = 0; pass < 2; pass++) {
        for (const v of basis) {
          const s = dotRange(v, 0, w, 0, m);
          for (let i = 0; i < m; i++) w[i] -= s * v[i];
        }
      }
    },
  };
}

/** The basis held in the kernel's memory from `start` (room for `capacity` vectors, then one for w). */
function kernelBasis(kernel: CholeskyKernel, m: number, start: number, capacity: number): LanczosBasis {
  let count = 0;
  const W = start + capacity * m;
  return {
    push: (q) => kernel.values.set(q, start + count++ * m),
    orthogonalize: (w) => {
      kernel.values.set(w, W);
      kernel.orthogonalize(start, count, W, m);
      w.set(kernel.values.subarray(W, W + m));
    },
  };
}

/** Largest eigenvalue of the symmetric operator `apply` on R^m. */
export function largestEigenvalue(apply: (x: Float64Array, out: Float64Array) => void, m: number, maxIterations = 300, basis: LanczosBasis = plainBasis(m)): number {
  const limit = Math.min(m, maxIterations);
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
    // Full re-orthogonalisation against every basis vector.
    basis.orthogonalize(w);
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

/**
 * out = L Lᵀ x for the m × m lower-triangular L (row-major); `scratch` holds Lᵀ x, formed row by
 * row (scratch += x_i·L[i, 0..i]), then each out_i a dot product as linalg.dotRange sums it.
 */
function applyGram(factor: Float64Array, m: number, x: Float64Array, out: Float64Array, scratch: Float64Array): void {
  scratch.fill(0);
  for (let i = 0; i < m; i++) {
    const row = i * m;
    const xi = x[i];
    for (let k = 0; k <= i; k++) scratch[k] += factor[row + k] * xi;
  }
  for (let i = 0; i < m; i++) out[i] = dotRange(factor, i * m, scratch, 0, i + 1);
}

/**
 * The two operators of the Lanczos runs, L Lᵀ and (L Lᵀ)⁻¹ = L⁻ᵀ L⁻¹, on the factor copied into a
 * WebAssembly SIMD kernel (choleskyKernel.ts): the same loops as applyGram, solveLower and
 * solveLowerTranspose with their dot products and row updates in the kernel, bit for bit the
 * same results. At m = 1000 a run can take a hundred and more steps (a spectrum without gaps
 * converges slowly), each reading the factor twice: that, not the factorisation, was most of a
 * wide fit from moments.
 */
function kernelOperators(kernel: CholeskyKernel, factor: Float64Array, m: number): { gram: Operator; inverse: Operator } {
  const values = kernel.values;
  values.set(factor.subarray(0, m * m));
  const X = m * m;
  const SCRATCH = X + m;
  const OUT = SCRATCH + m;
  const gram: Operator = (x, out) => {
    values.set(x, X);
    kernel.gram(0, X, SCRATCH, OUT, m);
    out.set(values.subarray(OUT, OUT + m));
  };
  const inverse: Operator = (x, out) => {
    values.set(x, X);
    kernel.inverse(0, X, m);
    out.set(values.subarray(X, X + m));
  };
  return { gram, inverse };
}

type Operator = (x: Float64Array, out: Float64Array) => void;

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
    // The kernel's memory: the factor, three vectors (kernelOperators), the basis and w.
    const capacity = Math.min(m, LANCZOS_STEPS);
    const kernel = choleskyKernel(m * m + 3 * m + (capacity + 1) * m, m);
    let gram: Operator;
    let inverse: Operator;
    let basis = (): LanczosBasis => plainBasis(m);
    if (kernel !== null) {
      ({ gram, inverse } = kernelOperators(kernel, factor, m));
      basis = () => kernelBasis(kernel, m, m * m + 3 * m, capacity);
    } else {
      const scratch = new Float64Array(m);
      gram = (x, out) => applyGram(factor, m, x, out, scratch);
      inverse = (x, out) => {
        out.set(x);
        solveLower(factor, m, out);
        solveLowerTranspose(factor, m, out);
      };
    }
    largest = largestEigenvalue(gram, m, LANCZOS_STEPS, basis());
    smallest = 1 / largestEigenvalue(inverse, m, LANCZOS_STEPS, basis());
  }
  if (!(largest > 0)) return 1;
  return largest / Math.max(smallest, Number.EPSILON * largest);
}
