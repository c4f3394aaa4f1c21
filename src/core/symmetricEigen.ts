/**
 * Eigenvalues and eigenvectors of a real symmetric n × n matrix (row-major Float64Array):
 * Householder reduction to tridiagonal form, then the implicit QL iteration with Wilkinson-type
 * shifts — the classic tred2/tql2 pair (Martin, Reinsch & Wilkinson, Handbook for Automatic
 * Computation II, contributions II/2 and II/3; EISPACK). Written for contiguous memory: the
 * reduction works on the lower triangle row by row, and the QL rotations act on rows of Vᵀ.
 *
 * When only a few eigenvectors are wanted (PCA loadings of the first components), the QL pass
 * runs without vectors and each wanted eigenvector of the tridiagonal matrix comes from inverse
 * iteration (LAPACK dstein: shifted LU with partial pivoting, re-orthogonalisation inside
 * clusters), mapped back through the stored reflectors: O(n²) per vector instead of O(n³).
 */
import { tridiagonalInverseIteration } from './tridiagonalInverseIteration';

const EPSILON = Number.EPSILON;

export interface SymmetricEigen {
  /** All n eigenvalues, descending. */
  values: Float64Array;
  /** n × count row-major: column j is the unit eigenvector of values[j]. */
  vectors: Float64Array;
  /** Number of eigenvectors returned. */
  count: number;
}

interface Tridiagonal {
  /** Diagonal, n. */
  diagonal: Float64Array;
  /** off[i] couples i−1 and i (off[0] = 0). */
  off: Float64Array;
  /** Packed lower triangle (row i starts at i(i+1)/2) whose row i holds the reflector u_i in columns 0..i−1. */
  reflectors: Float64Array;
  /** Reflector i is I − u_i u_iᵀ / h[i]; h[i] = 0 means no reflection at that step. */
  h: Float64Array;
}

/**
 * Householder tridiagonalisation A = Q T Qᵀ, Q = P_{n−1} ⋯ P_1, each P_i = I − u uᵀ/h acting on
 * the leading i × i block (Golub & Van Loan 4th ed. §8.3.1; the scaling and sign choice of tred2).
 * Only the lower triangle of `a` is read.
 */
/** Start of row i in packed lower-triangular storage. */
function packedRow(i: number): number {
  return (i * (i + 1)) / 2;
}

function tridiagonalize(a: Float64Array, n: number): Tridiagonal {
  // The lower triangle, packed: half the memory of n × n, so each sweep streams contiguous data.
  const w = new Float64Array((n * (n + 1)) / 2);
  for (let i = 0; i < n; i++) w.set(a.subarray(i * n, i * n + i + 1), packedRow(i));
  const diagonal = new Float64Array(n);
  const off = new Float64Array(n);
  const h = new Float64Array(n);
  const p = new Float64Array(n);
  // The rank-2 update A' ← A' − u qᵀ − q uᵀ of one step is applied while the next step's
  // product A'u is formed, in the same sweep over the lower triangle (the reduction is bound by
  // memory traffic, so one sweep per step instead of two).
  const q = new Float64Array(n);
  let pendingRow = -1; // row of w holding the pending u; -1 when no update is pending
  for (let i = n - 1; i >= 1; i--) {
    const rowI = packedRow(i);
    if (pendingRow >= 0) {
      for (let k = 0; k <= i; k++) w[rowI + k] -= w[pendingRow + i] * q[k] + q[i] * w[pendingRow + k];
    }
    diagonal[i] = w[rowI + i];
    let scale = 0;
    for (let k = 0; k < i; k++) scale += Math.abs(w[rowI + k]);
    if (i === 1 || scale === 0) {
      if (pendingRow >= 0) applyPendingUpdate(w, i, pendingRow, q);
      off[i] = w[rowI + i - 1];
      h[i] = 0;
      pendingRow = -1;
      continue;
    }
    let sigma = 0;
    for (let k = 0; k < i; k++) {
      const v = w[rowI + k] / scale;
      w[rowI + k] = v;
      sigma += v * v;
    }
    const f = w[rowI + i - 1];
    const g = f >= 0 ? -Math.sqrt(sigma) : Math.sqrt(sigma);
    off[i] = scale * g;
    const hh = sigma - f * g;
    h[i] = hh;
    w[rowI + i - 1] = f - g;
    // p = A' u over the leading i × i block (lower triangle), applying the pending update first.
    p.fill(0, 0, i);
    if (pendingRow >= 0) {
      for (let j = 0; j < i; j++) {
        const rowJ = packedRow(j);
        const uj = w[rowI + j];
        const oldU = w[pendingRow + j];
        const oldQ = q[j];
        // Two columns per turn with two partial sums, so the additions to `sum` overlap.
        let sum = 0;
        let sum2 = 0;
        let k = 0;
        for (; k + 1 < j; k += 2) {
          const v = w[rowJ + k] - (oldU * q[k] + oldQ * w[pendingRow + k]);
          const v2 = w[rowJ + k + 1] - (oldU * q[k + 1] + oldQ * w[pendingRow + k + 1]);
          w[rowJ + k] = v;
          w[rowJ + k + 1] = v2;
          sum += v * w[rowI + k];
          sum2 += v2 * w[rowI + k + 1];
          p[k] += v * uj;
          p[k + 1] += v2 * uj;
        }
        for (; k < j; k++) {
          const v = w[rowJ + k] - (oldU * q[k] + oldQ * w[pendingRow + k]);
          w[rowJ + k] = v;
          sum += v * w[rowI + k];
          p[k] += v * uj;
        }
        sum += sum2;
        const diagonalValue = w[rowJ + j] - 2 * oldU * oldQ;
        w[rowJ + j] = diagonalValue;
        p[j] += sum + diagonalValue * uj;
      }
    } else {
      for (let j = 0; j < i; j++) {
        const rowJ = packedRow(j);
        const uj = w[rowI + j];
        let sum = 0;
        for (let k = 0; k < j; k++) {
          const v = w[rowJ + k];
          sum += v * w[rowI + k];
          p[k] += v * uj;
        }
        p[j] += sum + w[rowJ + j] * uj;
      }
    }
    let uTp = 0;
    for (let j = 0; j < i; j++) {
      p[j] /= hh;
      uTp += w[rowI + j] * p[j];
    }
    const kk = uTp / (2 * hh);
    for (let j = 0; j < i; j++) q[j] = p[j] - kk * w[rowI + j];
    pendingRow = rowI;
  }
  if (pendingRow >= 0) w[0] -= 2 * w[pendingRow] * q[0];
  if (n > 0) diagonal[0] = w[0];
  return { diagonal, off, reflectors: w, h };
}

/** Applies A' ← A' − u qᵀ − q uᵀ to rows 0..size−1 of the lower triangle (u in row `uRow` of w). */
function applyPendingUpdate(w: Float64Array, size: number, uRow: number, q: Float64Array): void {
  for (let j = 0; j < size; j++) {
    const rowJ = packedRow(j);
    const uj = w[uRow + j];
    const qj = q[j];
    for (let k = 0; k <= j; k++) w[rowJ + k] -= uj * q[k] + qj * w[uRow + k];
  }
}

/**
 * Implicit QL on the tridiagonal (diagonal d, off-diagonal e with e[i] coupling i and i+1 after
 * the shift below), optionally applying each rotation to rows i, i+1 of `rowsOfV` (n × n).
 * Port of tql2 (EISPACK; JAMA) with a cap on iterations so bad input cannot loop forever.
 */
function implicitQl(d: Float64Array, offIn: Float64Array, n: number, rowsOfV: Float64Array | null): void {
  const e = new Float64Array(n);
  for (let i = 1; i < n; i++) e[i - 1] = offIn[i];
  let f = 0;
  let tst1 = 0;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]) + Math.abs(e[l]));
    let m = l;
    while (m < n - 1 && Math.abs(e[m]) > EPSILON * tst1) m++;
    if (m > l) {
      let iterations = 0;
      do {
        iterations++;
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = Math.hypot(p, 1);
        if (p < 0) r = -r;
        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        const dl1 = d[l + 1];
        let h = g - d[l];
        for (let i = l + 2; i < n; i++) d[i] -= h;
        f += h;
        p = d[m];
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1];
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i];
          h = c * p;
          r = Math.hypot(p, e[i]);
          e[i + 1] = s * r;
          s = e[i] / r;
          c = p / r;
          p = c * d[i] - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]);
          if (rowsOfV) {
            const rowI = i * n;
            const rowNext = rowI + n;
            for (let k = 0; k < n; k++) {
              const t = rowsOfV[rowNext + k];
              const v = rowsOfV[rowI + k];
              rowsOfV[rowNext + k] = s * v + c * t;
              rowsOfV[rowI + k] = c * v - s * t;
            }
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > EPSILON * tst1 && iterations < 100);
    }
    d[l] = d[l] + f;
    e[l] = 0;
  }
}

/** Indices that sort `values` descending (stable). */
function descendingOrder(values: Float64Array): number[] {
  const order = Array.from(values.keys());
  order.sort((x, y) => values[y] - values[x] || x - y);
  return order;
}

/** All eigenvalues of a symmetric tridiagonal matrix (off[i] couples i−1 and i; off[0] unused), descending. */
export function tridiagonalEigenvalues(diagonal: ArrayLike<number>, off: ArrayLike<number>): Float64Array {
  const n = diagonal.length;
  const d = Float64Array.from(diagonal);
  implicitQl(d, Float64Array.from(off), n, null);
  return Float64Array.from(descendingOrder(d), (i) => d[i]);
}

/** All eigenvalues of a symmetric n × n matrix, descending (reads the lower triangle). O(4n³/3). */
export function symmetricEigenvalues(a: Float64Array, n: number): Float64Array {
  const t = tridiagonalize(a, n);
  implicitQl(t.diagonal, t.off, n, null);
  return Float64Array.from(descendingOrder(t.diagonal), (i) => t.diagonal[i]);
}

/**
 * Eigen-decomposition of a symmetric n × n matrix (reads the lower triangle): all eigenvalues,
 * descending, and the eigenvectors of the first `count` of them (default all), as the columns of
 * an n × count matrix. Satisfies A·V = V·D and VᵀV = I to rounding.
 */
export function symmetricEigen(a: Float64Array, n: number, count: number = n): SymmetricEigen {
  const wanted = Math.max(0, Math.min(n, Math.floor(count)));
  const t = tridiagonalize(a, n);
  // Full accumulation costs ~2n³ more flops; inverse iteration wins when few vectors are wanted.
  if (wanted * 4 >= n) return fullDecomposition(t, n, wanted);
  const tridiagonalDiagonal = Float64Array.from(t.diagonal);
  implicitQl(t.diagonal, t.off, n, null);
  const order = descendingOrder(t.diagonal);
  const values = Float64Array.from(order, (i) => t.diagonal[i]);
  const tridiagonalVectors = tridiagonalInverseIteration(tridiagonalDiagonal, t.off, n, values, wanted);
  const vectors = new Float64Array(n * wanted);
  for (let j = 0; j < wanted; j++) {
    const v = tridiagonalVectors.subarray(j * n, (j + 1) * n);
    applyReflectors(t, n, v);
    for (let i = 0; i < n; i++) vectors[i * wanted + j] = v[i];
  }
  return { values, vectors, count: wanted };
}

function fullDecomposition(t: Tridiagonal, n: number, wanted: number): SymmetricEigen {
  // Q = P_{n−1} ⋯ P_1 applied to I; while P_1..P_{i−1} are applied only the leading block is
  // not the identity, so P_i needs columns 0..i−1 only.
  const q = new Float64Array(n * n);
  for (let i = 0; i < n; i++) q[i * n + i] = 1;
  const w = t.reflectors;
  const y = new Float64Array(n);
  for (let i = 1; i < n; i++) {
    const hh = t.h[i];
    if (hh === 0) continue;
    const rowU = packedRow(i);
    y.fill(0, 0, i);
    for (let k = 0; k < i; k++) {
      const uk = w[rowU + k];
      if (uk === 0) continue;
      const rowK = k * n;
      for (let c = 0; c < i; c++) y[c] += uk * q[rowK + c];
    }
    for (let k = 0; k < i; k++) {
      const factor = w[rowU + k] / hh;
      if (factor === 0) continue;
      const rowK = k * n;
      for (let c = 0; c < i; c++) q[rowK + c] -= factor * y[c];
    }
  }
  // Rows of Vᵀ = columns of Q.
  const vt = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) vt[j * n + i] = q[i * n + j];
  const d = t.diagonal;
  implicitQl(d, t.off, n, vt);
  const order = descendingOrder(d);
  const values = Float64Array.from(order, (i) => d[i]);
  const vectors = new Float64Array(n * wanted);
  for (let j = 0; j < wanted; j++) {
    const row = order[j] * n;
    for (let i = 0; i < n; i++) vectors[i * wanted + j] = vt[row + i];
  }
  return { values, vectors, count: wanted };
}

/** v ← Q v = P_{n−1} ⋯ P_1 v. */
function applyReflectors(t: Tridiagonal, n: number, v: Float64Array): void {
  const w = t.reflectors;
  for (let i = 1; i < n; i++) {
    const hh = t.h[i];
    if (hh === 0) continue;
    const rowU = packedRow(i);
    let s = 0;
    for (let k = 0; k < i; k++) s += w[rowU + k] * v[k];
    s /= hh;
    for (let k = 0; k < i; k++) v[k] -= s * w[rowU + k];
  }
}
