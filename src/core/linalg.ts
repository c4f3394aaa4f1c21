/**
 * Dense linear-algebra kernels over Float64Array, written for the shapes this tool meets
 * (d up to a few thousand features, K classes). Every matrix is row-major: entry (i, j) of an
 * n × m matrix sits at index i·m + j. Symmetric matrices are stored full unless a function
 * says it reads or writes the upper triangle only.
 *
 * The symmetric eigensolver and the small SVD live in their own files and are re-exported here,
 * so callers import every kernel from `linalg`.
 */
export { symmetricEigen, symmetricEigenvalues, tridiagonalEigenvalues, type SymmetricEigen } from './symmetricEigen';
export { thinSvd, type ThinSvd } from './singularValues';

/** Unit roundoff of IEEE double, 2⁻⁵². */
export const EPSILON = Number.EPSILON;

/**
 * Σ_k x[xo + k]·y[yo + k] for k < length, with four partial sums: a single running sum makes every
 * addition wait for the previous one, four let the processor overlap them (~30% faster here).
 */
export function dotRange(x: Float64Array, xo: number, y: Float64Array, yo: number, length: number): number {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let k = 0;
  for (; k + 3 < length; k += 4) {
    s0 += x[xo + k] * y[yo + k];
    s1 += x[xo + k + 1] * y[yo + k + 1];
    s2 += x[xo + k + 2] * y[yo + k + 2];
    s3 += x[xo + k + 3] * y[yo + k + 3];
  }
  for (; k < length; k++) s0 += x[xo + k] * y[yo + k];
  return s0 + s1 + (s2 + s3);
}

export interface CholeskyResult {
  /** n × n lower-triangular L with A = L Lᵀ (upper part zero). */
  factor: Float64Array;
  /** False when a pivot was not positive; `factor` is then complete only up to `failedAt`. */
  positiveDefinite: boolean;
  /** Index of the first non-positive pivot, or −1. */
  failedAt: number;
}

/**
 * Cholesky factor of a symmetric positive definite n × n matrix (reads the lower triangle),
 * row by row (Cholesky–Banachiewicz), so every inner product runs over contiguous memory.
 * Golub & Van Loan, Matrix Computations, 4th ed., Algorithm 4.2.1.
 */
export function cholesky(a: Float64Array, n: number): CholeskyResult {
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const rowI = i * n;
    for (let j = 0; j <= i; j++) {
      const rowJ = j * n;
      const sum = a[rowI + j] - dotRange(l, rowI, l, rowJ, j);
      if (i === j) {
        if (!(sum > 0)) return { factor: l, positiveDefinite: false, failedAt: i };
        l[rowI + i] = Math.sqrt(sum);
      } else {
        l[rowI + j] = sum / l[rowJ + j];
      }
    }
  }
  return { factor: l, positiveDefinite: true, failedAt: -1 };
}

export interface PivotedCholeskyResult {
  /** Number of pivots taken before every remaining Schur-complement diagonal fell to the tolerance. */
  rank: number;
  /** pivots[p] = original index of the row/column placed at position p; the first `rank` were kept. */
  pivots: Int32Array;
  /**
   * n × n lower-triangular factor by pivot position: P Aₚ Pᵀ ≈ L Lᵀ. Columns 0..rank−1 are filled
   * for every row, so the rows at positions ≥ rank hold how the dropped columns load on the kept
   * ones (their regression on the kept columns is L₁₁⁻ᵀ ℓ for the row ℓ).
   */
  factor: Float64Array;
  /** Schur-complement diagonal left at each position ≥ rank (0 for kept positions). */
  residual: Float64Array;
}

/**
 * Cholesky with complete (diagonal) pivoting of a symmetric positive semidefinite n × n matrix:
 * at each step the largest remaining Schur-complement diagonal becomes the pivot (ties go to the
 * lowest original index); the factorization stops once that largest value is ≤ `tolerance`.
 * Higham, "Analysis of the Cholesky decomposition of a semi-definite matrix" (1990), and LAPACK
 * dpstf2. The rank it reveals is that of A to the tolerance the caller chose from the data.
 */
export function pivotedCholesky(a: Float64Array, n: number, tolerance: number): PivotedCholeskyResult {
  const pivots = new Int32Array(n);
  for (let i = 0; i < n; i++) pivots[i] = i;
  const l = new Float64Array(n * n);
  const sumOfSquares = new Float64Array(n); // Σ_j<k L[p][j]², by position
  const residual = new Float64Array(n);
  let rank = 0;
  for (let k = 0; k < n; k++) {
    // Choose the pivot among positions k..n−1.
    let best = -1;
    let bestValue = -Infinity;
    for (let p = k; p < n; p++) {
      const value = a[pivots[p] * n + pivots[p]] - sumOfSquares[p];
      if (value > bestValue || (value === bestValue && pivots[p] < pivots[best])) {
        bestValue = value;
        best = p;
      }
    }
    if (!(bestValue > tolerance)) {
      for (let p = k; p < n; p++) residual[p] = Math.max(0, a[pivots[p] * n + pivots[p]] - sumOfSquares[p]);
      break;
    }
    if (best !== k) {
      const t = pivots[k];
      pivots[k] = pivots[best];
      pivots[best] = t;
      const s = sumOfSquares[k];
      sumOfSquares[k] = sumOfSquares[best];
      sumOfSquares[best] = s;
      const rowK = k * n;
      const rowB = best * n;
      for (let j = 0; j < k; j++) {
        const u = l[rowK + j];
        l[rowK + j] = l[rowB + j];
        l[rowB + j] = u;
      }
    }
    const pivot = Math.sqrt(bestValue);
    const rowK = k * n;
    l[rowK + k] = pivot;
    const original = pivots[k];
    const originalRow = original * n;
    for (let p = k + 1; p < n; p++) {
      const rowP = p * n;
      // A is symmetric: read row `original`, not its column.
      const value = (a[originalRow + pivots[p]] - dotRange(l, rowP, l, rowK, k)) / pivot;
      l[rowP + k] = value;
      sumOfSquares[p] += value * value;
    }
    rank = k + 1;
  }
  return { rank, pivots, factor: l, residual };
}

export interface OrderedCholeskyResult {
  /** Indices kept, ascending. */
  kept: Int32Array;
  /** kept.length × kept.length lower-triangular factor of A[kept, kept]. */
  factor: Float64Array;
}

/**
 * Cholesky in the given column order that skips every column whose Schur-complement diagonal
 * (its variance left after the columns kept before it) is ≤ `tolerance`: the first maximal set
 * of columns, in order, that the tolerance calls independent. Used after pivotedCholesky has
 * fixed the rank, so that of a dependent group the later columns are the ones set aside.
 */
export function orderedCholesky(a: Float64Array, n: number, tolerance: number): OrderedCholeskyResult {
  const l = new Float64Array(n * n);
  const kept: number[] = [];
  const row = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const k = kept.length;
    let sumOfSquares = 0;
    for (let t = 0; t < k; t++) {
      const rowT = t * n;
      const v = (a[kept[t] * n + j] - dotRange(row, 0, l, rowT, t)) / l[rowT + t];
      row[t] = v;
      sumOfSquares += v * v;
    }
    const schur = a[j * n + j] - sumOfSquares;
    if (schur > tolerance) {
      const rowK = k * n;
      for (let t = 0; t < k; t++) l[rowK + t] = row[t];
      l[rowK + k] = Math.sqrt(schur);
      kept.push(j);
    }
  }
  const rank = kept.length;
  const factor = new Float64Array(rank * rank);
  for (let i = 0; i < rank; i++) for (let j = 0; j <= i; j++) factor[i * rank + j] = l[i * n + j];
  return { kept: Int32Array.from(kept), factor };
}

/**
 * Solves L x = b in place (L n × n lower triangular, row-major with row length `stride` ≥ n, so
 * the leading block of a larger factor can be used; b of length n).
 */
export function solveLower(l: Float64Array, n: number, b: Float64Array, stride: number = n): void {
  for (let i = 0; i < n; i++) {
    const row = i * stride;
    b[i] = (b[i] - dotRange(l, row, b, 0, i)) / l[row + i];
  }
}

/** Solves Lᵀ x = b in place (L as in solveLower), column-oriented so L is read by rows. */
export function solveLowerTranspose(l: Float64Array, n: number, b: Float64Array, stride: number = n): void {
  for (let i = n - 1; i >= 0; i--) {
    const row = i * stride;
    const x = b[i] / l[row + i];
    b[i] = x;
    for (let k = 0; k < i; k++) b[k] -= l[row + k] * x;
  }
}

/**
 * Solves L X = B in place for an n × m right-hand side B (row-major), e.g. the d × K matrix of
 * weighted class-mean deviations in the LDA whitening.
 */
export function solveLowerMatrix(l: Float64Array, n: number, b: Float64Array, m: number): void {
  for (let i = 0; i < n; i++) {
    const row = i * n;
    const rowB = i * m;
    for (let k = 0; k < i; k++) {
      const lik = l[row + k];
      if (lik === 0) continue;
      const rowK = k * m;
      for (let c = 0; c < m; c++) b[rowB + c] -= lik * b[rowK + c];
    }
    const diagonal = l[row + i];
    for (let c = 0; c < m; c++) b[rowB + c] /= diagonal;
  }
}

/** Solves Lᵀ X = B in place for an n × m right-hand side B (row-major). */
export function solveLowerTransposeMatrix(l: Float64Array, n: number, b: Float64Array, m: number): void {
  for (let i = n - 1; i >= 0; i--) {
    const row = i * n;
    const rowB = i * m;
    const diagonal = l[row + i];
    for (let c = 0; c < m; c++) b[rowB + c] /= diagonal;
    for (let k = 0; k < i; k++) {
      const lik = l[row + k];
      if (lik === 0) continue;
      const rowK = k * m;
      for (let c = 0; c < m; c++) b[rowK + c] -= lik * b[rowB + c];
    }
  }
}

/**
 * Symmetric rank-k update of the upper triangle: S[i][j] += Σ_t Y[t][i]·Y[t][j] for j ≥ i, with
 * the k rows of the block given transposed, `columns` (d × stride, row-major: entry (i, t) at
 * i·stride + t), of which the first `rows` columns are used. Each output entry is a dot product
 * over the block held in two contiguous rows, four outputs at a time: this is what makes the
 * blocked moment update 2–3× faster than one rank-1 update per row (MEASURED.md).
 */
export function crossProductUpdate(s: Float64Array, d: number, columns: Float64Array, stride: number, rows: number): void {
  for (let i = 0; i < d; i++) {
    const ci = i * stride;
    const rowS = i * d;
    let j = i;
    for (; j + 3 < d; j += 4) {
      const c0 = j * stride;
      const c1 = c0 + stride;
      const c2 = c1 + stride;
      const c3 = c2 + stride;
      let s0 = 0;
      let s1 = 0;
      let s2 = 0;
      let s3 = 0;
      for (let t = 0; t < rows; t++) {
        const y = columns[ci + t];
        s0 += y * columns[c0 + t];
        s1 += y * columns[c1 + t];
        s2 += y * columns[c2 + t];
        s3 += y * columns[c3 + t];
      }
      s[rowS + j] += s0;
      s[rowS + j + 1] += s1;
      s[rowS + j + 2] += s2;
      s[rowS + j + 3] += s3;
    }
    for (; j < d; j++) {
      const cj = j * stride;
      let sum = 0;
      for (let t = 0; t < rows; t++) sum += columns[ci + t] * columns[cj + t];
      s[rowS + j] += sum;
    }
  }
}

/**
 * Copies the upper triangle of an n × n matrix onto its lower triangle, in place, in 32 × 32
 * tiles: a column written element by element down a large matrix misses the cache at every
 * step (at n = 1000 the plain loop took longer than the whole rest of a moments snapshot).
 */
export function mirrorUpper(s: Float64Array, n: number): void {
  const TILE = 32;
  for (let i0 = 0; i0 < n; i0 += TILE) {
    const iEnd = Math.min(n, i0 + TILE);
    for (let j0 = i0; j0 < n; j0 += TILE) {
      const jEnd = Math.min(n, j0 + TILE);
      for (let i = i0; i < iEnd; i++) {
        const row = i * n;
        for (let j = Math.max(j0, i + 1); j < jEnd; j++) s[j * n + i] = s[row + j];
      }
    }
  }
}

/** out = S x for a symmetric n × n matrix of which only the upper triangle is read. */
export function symmetricMultiplyUpper(s: Float64Array, n: number, x: Float64Array, out: Float64Array): void {
  out.fill(0);
  for (let i = 0; i < n; i++) {
    const row = i * n;
    const xi = x[i];
    let sum = s[row + i] * xi;
    for (let j = i + 1; j < n; j++) {
      const v = s[row + j];
      sum += v * x[j];
      out[j] += v * xi;
    }
    out[i] += sum;
  }
}

/** out = A x for a full n × m matrix A (row-major). */
export function multiply(a: Float64Array, n: number, m: number, x: Float64Array, out: Float64Array): void {
  for (let i = 0; i < n; i++) out[i] = dotRange(a, i * m, x, 0, m);
}

/** Σ x_i y_i. */
export function dot(x: Float64Array, y: Float64Array, n: number = x.length): number {
  let sum = 0;
  for (let i = 0; i < n; i++) sum += x[i] * y[i];
  return sum;
}

/** The principal submatrix A[idx, idx] of an n × n matrix, idx.length × idx.length. */
export function principalSubmatrix(a: Float64Array, n: number, idx: ArrayLike<number>): Float64Array {
  const m = idx.length;
  const out = new Float64Array(m * m);
  for (let i = 0; i < m; i++) {
    const row = idx[i] * n;
    for (let j = 0; j < m; j++) out[i * m + j] = a[row + idx[j]];
  }
  return out;
}

/** Largest absolute entry (the max norm); 0 for an empty array. */
export function maxAbs(a: Float64Array): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) {
    const v = Math.abs(a[i]);
    if (v > m) m = v;
  }
  return m;
}
