/**
 * Eigenvectors of a symmetric tridiagonal matrix for given eigenvalues by inverse iteration, as in
 * LAPACK dstein: LU of T − λI with partial pivoting, eigenvalues closer than 10·eps·‖T‖ separated
 * by that much, vectors whose eigenvalues lie within 10⁻³‖T‖ of each other re-orthogonalised
 * against each other (modified Gram–Schmidt), a deterministic start vector, four iterations.
 */
const EPSILON = Number.EPSILON;

/**
 * Inverse iteration on the symmetric tridiagonal matrix with diagonal `diagonal` and off-diagonal
 * `off` (off[i] couples i−1 and i) for the eigenvalues values[0..wanted−1] (descending).
 * Returns wanted × n row-major, row j the unit eigenvector of values[j].
 */
export function tridiagonalInverseIteration(diagonal: Float64Array, off: Float64Array, n: number, values: Float64Array, wanted: number): Float64Array {
  let norm = 0;
  for (let i = 0; i < n; i++) {
    const row = Math.abs(diagonal[i]) + Math.abs(off[i]) + (i + 1 < n ? Math.abs(off[i + 1]) : 0);
    if (row > norm) norm = row;
  }
  const out = new Float64Array(wanted * n);
  if (n === 0) return out;
  const separation = 10 * EPSILON * Math.max(norm, Number.MIN_VALUE);
  const clusterGap = 1e-3 * norm;
  // LU of T − λI with partial pivoting: L unit lower bidiagonal (multipliers), U with two superdiagonals.
  const u0 = new Float64Array(n);
  const u1 = new Float64Array(n);
  const u2 = new Float64Array(n);
  const multiplier = new Float64Array(n);
  const swapped = new Uint8Array(n);
  const x = new Float64Array(n);
  let seed = 1;
  const nextRandom = (): number => {
    seed = (seed * 48271) % 2147483647;
    return seed / 2147483647 - 0.5;
  };
  let clusterStart = 0;
  let previousShift = Infinity;
  for (let j = 0; j < wanted; j++) {
    let shift = values[j];
    if (j > 0 && values[j - 1] - values[j] > clusterGap) clusterStart = j;
    if (previousShift - shift < separation) shift = previousShift - separation;
    previousShift = shift;
    // Factor T − shift·I.
    for (let i = 0; i < n; i++) {
      u0[i] = diagonal[i] - shift;
      u1[i] = i + 1 < n ? off[i + 1] : 0;
      u2[i] = 0;
    }
    for (let i = 0; i + 1 < n; i++) {
      const below = off[i + 1];
      if (Math.abs(u0[i]) >= Math.abs(below)) {
        swapped[i] = 0;
        const pivot = u0[i] === 0 ? separation : u0[i];
        u0[i] = pivot;
        const m = below / pivot;
        multiplier[i] = m;
        u0[i + 1] -= m * u1[i];
      } else {
        swapped[i] = 1;
        const m = u0[i] / below;
        multiplier[i] = m;
        u0[i] = below;
        const t1 = u1[i];
        u1[i] = u0[i + 1];
        u0[i + 1] = t1 - m * u0[i + 1];
        if (i + 2 < n) {
          u2[i] = u1[i + 1];
          u1[i + 1] = -m * u1[i + 1];
        }
      }
    }
    if (u0[n - 1] === 0) u0[n - 1] = separation;
    for (let i = 0; i < n; i++) x[i] = nextRandom();
    for (let iteration = 0; iteration < 4; iteration++) {
      // Solve L U y = P x.
      for (let i = 0; i + 1 < n; i++) {
        if (swapped[i]) {
          const t1 = x[i];
          x[i] = x[i + 1];
          x[i + 1] = t1 - multiplier[i] * x[i];
        } else {
          x[i + 1] -= multiplier[i] * x[i];
        }
      }
      for (let i = n - 1; i >= 0; i--) {
        let s = x[i];
        if (i + 1 < n) s -= u1[i] * x[i + 1];
        if (i + 2 < n) s -= u2[i] * x[i + 2];
        x[i] = s / u0[i];
      }
      // Re-orthogonalise within the cluster (modified Gram–Schmidt), then normalise.
      for (let k = clusterStart; k < j; k++) {
        const row = k * n;
        let s = 0;
        for (let i = 0; i < n; i++) s += out[row + i] * x[i];
        for (let i = 0; i < n; i++) x[i] -= s * out[row + i];
      }
      let scale = 0;
      for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(x[i]));
      if (!(scale > 0) || !Number.isFinite(scale)) {
        for (let i = 0; i < n; i++) x[i] = nextRandom();
        continue;
      }
      let sumSq = 0;
      for (let i = 0; i < n; i++) {
        x[i] /= scale;
        sumSq += x[i] * x[i];
      }
      const inverseNorm = 1 / Math.sqrt(sumSq);
      for (let i = 0; i < n; i++) x[i] *= inverseNorm;
    }
    out.set(x, j * n);
  }
  return out;
}
