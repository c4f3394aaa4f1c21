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
// PANEL: columns of a Cholesky panel; the trailing update is a rank-PANEL product over rows held contiguously.
import { choleskyKernel, PANEL, type CholeskyKernel } from './choleskyKernel';

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
 * Cholesky factor of a symmetric positive definite n × n matrix (reads the lower triangle), by
 * the blocked right-looking factorisation below (factorInPlace) without pivoting.
 * Golub & Van Loan, Matrix Computations, 4th ed., Algorithms 4.2.1 and 4.2.2 (block Cholesky).
 */
export function cholesky(a: Float64Array, n: number): CholeskyResult {
  const l = lowerCopy(a, n);
  const { failedAt } = factorInPlace(l, n, 0, false, null, null);
  const done = failedAt < 0 ? n : failedAt;
  clearBeyond(l, n, done);
  return { factor: l, positiveDefinite: failedAt < 0, failedAt };
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
 * Cholesky with complete (diagonal) pivoting of a symmetric positive semidefinite n × n matrix
 * (reads the lower triangle): at each step the largest remaining Schur-complement diagonal becomes
 * the pivot (ties go to the lowest original index); the factorization stops once that largest
 * value is ≤ `tolerance`. Higham, "Analysis of the Cholesky decomposition of a semi-definite
 * matrix" (1990), and LAPACK dpstf2/dpstrf (the blocked form used here, see factorInPlace). The
 * rank it reveals is that of A to the tolerance the caller chose from the data.
 */
export function pivotedCholesky(a: Float64Array, n: number, tolerance: number): PivotedCholeskyResult {
  const pivots = new Int32Array(n);
  for (let i = 0; i < n; i++) pivots[i] = i;
  const residual = new Float64Array(n);
  const l = lowerCopy(a, n);
  const { rank } = factorInPlace(l, n, tolerance, true, pivots, residual);
  clearBeyond(l, n, rank);
  return { rank, pivots, factor: l, residual };
}

/**
 * pivotedCholesky on `a` itself: its lower triangle is overwritten by the factor (the strict upper
 * triangle must be zero, and is left so), saving the copy where the caller has no further use for A.
 */
export function pivotedCholeskyInPlace(a: Float64Array, n: number, tolerance: number): PivotedCholeskyResult {
  const pivots = new Int32Array(n);
  for (let i = 0; i < n; i++) pivots[i] = i;
  const residual = new Float64Array(n);
  const { rank } = factorInPlace(a, n, tolerance, true, pivots, residual);
  clearBeyond(a, n, rank);
  return { rank, pivots, factor: a, residual };
}


/** The lower triangle of a (diagonal included) in a new n × n array; the upper part is zero. */
function lowerCopy(a: Float64Array, n: number): Float64Array {
  const l = new Float64Array(n * n);
  for (let i = 0; i < n; i++) l.set(a.subarray(i * n, i * n + i + 1), i * n);
  return l;
}

/** Zeroes every column ≥ `done` (the unfactored Schur complement), keeping columns 0..done−1. */
function clearBeyond(l: Float64Array, n: number, done: number): void {
  for (let i = done; i < n; i++) l.fill(0, i * n + done, i * n + i + 1);
}

/**
 * In-place Cholesky of the lower triangle of w (n × n, row-major), blocked as LAPACK dpstrf
 * arranges it: PANEL columns at a time, each column of a panel computed from the Schur complement
 * as it stood at the panel's start minus the panel's earlier columns (so pivot choice sees the
 * current Schur diagonal), then one symmetric rank-PANEL update of the trailing lower triangle
 * (trailingUpdate). The update is where the n³/6 multiply-adds are, and it runs over a copy of
 * the panel with its rows contiguous, two rows by four columns at a time.
 *
 * With `pivoting`, the largest remaining Schur diagonal becomes the pivot (ties: lowest original
 * index, kept in `pivots`), rows and columns are swapped symmetrically, and factoring stops when
 * that value is ≤ `tolerance` (the residual diagonal is written to `residual`); without it, a pivot
 * ≤ 0 (or NaN) stops it and is returned as `failedAt`. Columns 0..rank−1 are complete for every row.
 */
function factorInPlace(
  w: Float64Array,
  n: number,
  tolerance: number,
  pivoting: boolean,
  pivots: Int32Array | null,
  residual: Float64Array | null,
): { rank: number; failedAt: number } {
  // With WebAssembly SIMD the matrix is factored in the kernel's memory (n² values, then the
  // panel) and copied back: two copies of n² values against n³/6 multiply-adds.
  const kernel = choleskyKernel(n * n + n * PANEL, n);
  if (kernel === null) return factorBlocked(w, n, tolerance, pivoting, pivots, residual, new Float64Array(n * PANEL), null);
  const values = kernel.values;
  values.set(w.subarray(0, n * n));
  try {
    return factorBlocked(values, n, tolerance, pivoting, pivots, residual, values.subarray(n * n), kernel);
  } finally {
    w.set(values.subarray(0, n * n));
  }
}

/**
 * factorInPlace's work on w, with `panel` (n × PANEL) for the panel copy; with `kernel`, w is
 * the start of the kernel's memory and the panel directly follows it (at n²).
 */
function factorBlocked(
  w: Float64Array,
  n: number,
  tolerance: number,
  pivoting: boolean,
  pivots: Int32Array | null,
  residual: Float64Array | null,
  panel: Float64Array,
  kernel: CholeskyKernel | null,
): { rank: number; failedAt: number } {
  const diagonal = new Float64Array(n);
  for (let j0 = 0; j0 < n; j0 += PANEL) {
    const j1 = Math.min(n, j0 + PANEL);
    for (let p = j0; p < n; p++) diagonal[p] = w[p * n + p];
    for (let k = j0; k < j1; k++) {
      let best = k;
      let bestValue = diagonal[k];
      if (pivoting) {
        best = -1;
        bestValue = -Infinity;
        for (let p = k; p < n; p++) {
          const value = diagonal[p];
          if (value > bestValue || (value === bestValue && pivots![p] < pivots![best])) {
            bestValue = value;
            best = p;
          }
        }
        if (!(bestValue > tolerance)) {
          for (let p = k; p < n; p++) residual![p] = Math.max(0, diagonal[p]);
          return { rank: k, failedAt: -1 };
        }
        if (best !== k) {
          symmetricSwap(w, n, k, best);
          const t = pivots![k];
          pivots![k] = pivots![best];
          pivots![best] = t;
          const s = diagonal[k];
          diagonal[k] = diagonal[best];
          diagonal[best] = s;
        }
      } else if (!(bestValue > 0)) {
        return { rank: k, failedAt: k };
      }
      const pivot = Math.sqrt(bestValue);
      const rowK = k * n;
      w[rowK + k] = pivot;
      const used = k - j0;
      for (let p = k + 1; p < n; p++) {
        const rowP = p * n;
        const value = (w[rowP + k] - dotRange(w, rowP + j0, w, rowK + j0, used)) / pivot;
        w[rowP + k] = value;
        diagonal[p] -= value * value;
      }
    }
    if (j1 < n) {
      const width = j1 - j0;
      for (let p = j1; p < n; p++) {
        const rowP = p * n + j0;
        const out = p * PANEL;
        for (let t = 0; t < width; t++) panel[out + t] = w[rowP + t];
      }
      trailingUpdate(w, n, j1, panel, width, kernel);
    }
  }
  return { rank: n, failedAt: -1 };
}

/**
 * Swaps positions k < b of a symmetric matrix held in its lower triangle (LAPACK dpstf2's dswap
 * calls): the computed parts of rows k and b, their diagonals, and the entries of columns k and b.
 */
function symmetricSwap(w: Float64Array, n: number, k: number, b: number): void {
  const rowK = k * n;
  const rowB = b * n;
  for (let j = 0; j < k; j++) {
    const t = w[rowK + j];
    w[rowK + j] = w[rowB + j];
    w[rowB + j] = t;
  }
  let t = w[rowK + k];
  w[rowK + k] = w[rowB + b];
  w[rowB + b] = t;
  for (let i = k + 1; i < b; i++) {
    t = w[i * n + k];
    w[i * n + k] = w[rowB + i];
    w[rowB + i] = t;
  }
  for (let i = b + 1; i < n; i++) {
    const row = i * n;
    t = w[row + k];
    w[row + k] = w[row + b];
    w[row + b] = t;
  }
}

/**
 * w[p][q] −= Σ_t panel[p][t]·panel[q][t] for start ≤ q ≤ p < n (the trailing lower triangle),
 * panel rows of `width` values at stride PANEL: two rows by four columns per turn, so six loads
 * feed eight multiply-adds. With `kernel` (w and panel in its memory, the panel at n²), the
 * groups of four columns of each pair of rows run in WebAssembly SIMD (choleskyKernel.rowPair).
 */
function trailingUpdate(w: Float64Array, n: number, start: number, panel: Float64Array, width: number, kernel: CholeskyKernel | null): void {
  const simd = kernel !== null && width % 2 === 0;
  let p = start;
  for (; p + 1 < n; p += 2) {
    const a0 = p * PANEL;
    const a1 = a0 + PANEL;
    const row0 = p * n;
    const row1 = row0 + n;
    let q = start;
    if (simd) {
      const tiles = (p - start + 1) >> 2;
      if (tiles > 0) kernel.rowPair(row0 + start, n, n * n + a0, n * n + start * PANEL, tiles, width);
      q += 4 * tiles;
    }
    for (; q + 3 <= p; q += 4) {
      const b0 = q * PANEL;
      const b1 = b0 + PANEL;
      const b2 = b1 + PANEL;
      const b3 = b2 + PANEL;
      let s00 = 0;
      let s01 = 0;
      let s02 = 0;
      let s03 = 0;
      let s10 = 0;
      let s11 = 0;
      let s12 = 0;
      let s13 = 0;
      for (let t = 0; t < width; t++) {
        const x0 = panel[a0 + t];
        const x1 = panel[a1 + t];
        const y0 = panel[b0 + t];
        const y1 = panel[b1 + t];
        const y2 = panel[b2 + t];
        const y3 = panel[b3 + t];
        s00 += x0 * y0;
        s01 += x0 * y1;
        s02 += x0 * y2;
        s03 += x0 * y3;
        s10 += x1 * y0;
        s11 += x1 * y1;
        s12 += x1 * y2;
        s13 += x1 * y3;
      }
      w[row0 + q] -= s00;
      w[row0 + q + 1] -= s01;
      w[row0 + q + 2] -= s02;
      w[row0 + q + 3] -= s03;
      w[row1 + q] -= s10;
      w[row1 + q + 1] -= s11;
      w[row1 + q + 2] -= s12;
      w[row1 + q + 3] -= s13;
    }
    for (; q <= p + 1; q++) {
      const b = q * PANEL;
      let s0 = 0;
      let s1 = 0;
      for (let t = 0; t < width; t++) {
        const y = panel[b + t];
        s0 += panel[a0 + t] * y;
        s1 += panel[a1 + t] * y;
      }
      if (q <= p) w[row0 + q] -= s0;
      w[row1 + q] -= s1;
    }
  }
  if (p < n) {
    const a0 = p * PANEL;
    const row0 = p * n;
    for (let q = start; q <= p; q++) w[row0 + q] -= dotRange(panel, a0, panel, q * PANEL, width);
  }
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
