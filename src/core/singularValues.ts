/**
 * Thin singular value decomposition of a tall, narrow m × k matrix (k small: the whitened
 * class-mean deviations in LDA have k = K − 1 columns) by one-sided Jacobi rotations
 * (Hestenes 1958; Demmel & Veselić, "Jacobi's method is more accurate than QR", SIAM J. Matrix
 * Anal. Appl. 13 (1992)): columns are rotated pairwise until orthogonal; the singular values are
 * their norms, computed to high relative accuracy, which forming AᵀA would lose.
 */
const EPSILON = Number.EPSILON;

export interface ThinSvd {
  /** k singular values, descending (zeros last). */
  values: Float64Array;
  /** m × k row-major: column j is the left singular vector of values[j] (zero when values[j] = 0). */
  u: Float64Array;
  /** k × k row-major: column j is the right singular vector of values[j]. */
  v: Float64Array;
}

/** A = U diag(values) Vᵀ for A m × k row-major. O(m·k²) per sweep; converges in a few sweeps. */
export function thinSvd(a: Float64Array, m: number, k: number): ThinSvd {
  // Column-major working copy: column j is contiguous.
  const w = new Float64Array(m * k);
  for (let i = 0; i < m; i++) for (let j = 0; j < k; j++) w[j * m + i] = a[i * k + j];
  const vCols = new Float64Array(k * k); // column-major too
  for (let j = 0; j < k; j++) vCols[j * k + j] = 1;
  for (let sweep = 0; sweep < 60; sweep++) {
    let rotated = false;
    for (let p = 0; p < k - 1; p++) {
      for (let q = p + 1; q < k; q++) {
        const cp = p * m;
        const cq = q * m;
        let alpha = 0;
        let beta = 0;
        let gamma = 0;
        for (let i = 0; i < m; i++) {
          const x = w[cp + i];
          const y = w[cq + i];
          alpha += x * x;
          beta += y * y;
          gamma += x * y;
        }
        if (gamma === 0 || Math.abs(gamma) <= EPSILON * Math.sqrt(alpha * beta)) continue;
        rotated = true;
        const zeta = (beta - alpha) / (2 * gamma);
        const t = (zeta >= 0 ? 1 : -1) / (Math.abs(zeta) + Math.sqrt(1 + zeta * zeta));
        const c = 1 / Math.sqrt(1 + t * t);
        const s = c * t;
        for (let i = 0; i < m; i++) {
          const x = w[cp + i];
          const y = w[cq + i];
          w[cp + i] = c * x - s * y;
          w[cq + i] = s * x + c * y;
        }
        const vp = p * k;
        const vq = q * k;
        for (let i = 0; i < k; i++) {
          const x = vCols[vp + i];
          const y = vCols[vq + i];
          vCols[vp + i] = c * x - s * y;
          vCols[vq + i] = s * x + c * y;
        }
      }
    }
    if (!rotated) break;
  }
  const norms = new Float64Array(k);
  for (let j = 0; j < k; j++) {
    let sum = 0;
    for (let i = 0; i < m; i++) sum += w[j * m + i] * w[j * m + i];
    norms[j] = Math.sqrt(sum);
  }
  const order = Array.from(norms.keys()).sort((x, y) => norms[y] - norms[x] || x - y);
  const values = new Float64Array(k);
  const u = new Float64Array(m * k);
  const v = new Float64Array(k * k);
  order.forEach((source, j) => {
    const sigma = norms[source];
    values[j] = sigma;
    if (sigma > 0) for (let i = 0; i < m; i++) u[i * k + j] = w[source * m + i] / sigma;
    for (let i = 0; i < k; i++) v[i * k + j] = vCols[source * k + i];
  });
  return { values, u, v };
}
