/**
 * Moving the centre of per-class moments. For a set of n rows with mean m, z_t = x_t − m,
 * S = Σ z zᵀ, C = Σ ‖z‖² z, Q = Σ ‖z‖⁴, the moments about the point c = m − e (so x − c = z + e) are
 *   Σ (z+e)(z+e)ᵀ   = S + n e eᵀ
 *   Σ ‖z+e‖² (z+e) = C + tr(S) e + 2 S e + n ‖e‖² e
 *   Σ ‖z+e‖⁴       = Q + 4 eᵀS e + n ‖e‖⁴ + 4 Cᵀe + 2 ‖e‖² tr(S)
 * (expand and use Σ z = 0). Merging two sets shifts both to the pooled mean and adds.
 */

/** out = C + tr(S)·e + 2·(S e) + n‖e‖²·e : the cubic moment after moving the centre by −e. */
export function shiftCubic(out: Float64Array, cubic: Float64Array, scatterTimesE: Float64Array, trace: number, count: number, e: Float64Array): void {
  let ee = 0;
  for (let i = 0; i < e.length; i++) ee += e[i] * e[i];
  const factor = trace + count * ee;
  for (let i = 0; i < e.length; i++) out[i] = cubic[i] + factor * e[i] + 2 * scatterTimesE[i];
}

/** Q + 4 eᵀSe + n‖e‖⁴ + 4 Cᵀe + 2‖e‖² tr(S): the quartic moment after moving the centre by −e. */
export function shiftQuartic(quartic: number, eSe: number, cubicDotE: number, trace: number, count: number, ee: number): number {
  return quartic + 4 * eSe + count * ee * ee + 4 * cubicDotE + 2 * ee * trace;
}

export function dotProduct(x: Float64Array, y: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] * y[i];
  return s;
}

export function fullMultiply(s: Float64Array, d: number, x: Float64Array): Float64Array {
  const out = new Float64Array(d);
  for (let i = 0; i < d; i++) {
    let sum = 0;
    const row = i * d;
    for (let j = 0; j < d; j++) sum += s[row + j] * x[j];
    out[i] = sum;
  }
  return out;
}

export function trace(s: Float64Array, d: number): number {
  let t = 0;
  for (let i = 0; i < d; i++) t += s[i * d + i];
  return t;
}
