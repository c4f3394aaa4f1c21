/**
 * Ledoit–Wolf shrinkage of the pooled within-class covariance towards a multiple of the identity:
 * Ledoit & Wolf, "A well-conditioned estimator for large-dimensional covariance matrices",
 * J. Multivariate Analysis 88 (2004) 365–411, Lemma 3.2 and §3.3, in the form scikit-learn
 * implements as `sklearn.covariance.ledoit_wolf(Z, assume_centered=True)` where Z (n × p) are the
 * within-class-centred rows z_t = x_t − m_class(t):
 *
 *   S = ZᵀZ / n,  μ = tr(S)/p,  δ² = ‖S − μI‖²_F / p,
 *   β̄² = (Σ_t ‖z_t‖⁴ / n − ‖S‖²_F) / (p n),  β² = min(β̄², δ²),
 *   α = β²/δ² (0 when β² = 0),  Σ_s = (1 − α) S + α μ I.
 *
 * Σ_t ‖z_t‖⁴ is the sum of the classes' `quartic` moments, so the estimate needs no second pass.
 *
 * Scale: the target μI treats every feature alike, so the intensity and the shrunk matrix depend
 * on the features' units (rescaling one feature changes both). This is the estimator as published
 * and as scikit-learn computes it; standardise the features first if their units are arbitrary.
 */

export interface LedoitWolf {
  /** α in [0, 1]. */
  intensity: number;
  /** μ = tr(S)/p, covariance scale. */
  target: number;
  /** p × p shrunk covariance Σ_s (divisor n). */
  covariance: Float64Array;
}

/**
 * @param withinScatter p × p pooled within-class scatter Σ_t z_t z_tᵀ (= n S), row-major full.
 * @param quartic Σ_t ‖z_t‖⁴ over the same p columns.
 * @param n number of rows.
 */
export function ledoitWolf(withinScatter: Float64Array, p: number, n: number, quartic: number): LedoitWolf {
  const covariance = new Float64Array(p * p);
  let trace = 0;
  let frobenius = 0;
  for (let k = 0; k < p * p; k++) {
    const v = withinScatter[k] / n;
    covariance[k] = v;
    frobenius += v * v;
  }
  for (let i = 0; i < p; i++) trace += covariance[i * p + i];
  const target = p > 0 ? trace / p : 0;
  // ‖S − μI‖²_F / p = (‖S‖²_F − 2μ tr S + p μ²)/p.
  const delta = p > 0 ? (frobenius - 2 * target * trace + p * target * target) / p : 0;
  const betaBar = p > 0 && n > 0 ? (quartic / n - frobenius) / (p * n) : 0;
  const beta = Math.min(betaBar, delta);
  const intensity = beta > 0 && delta > 0 ? Math.min(1, beta / delta) : 0;
  return { intensity, target, covariance: shrink(covariance, p, intensity, target) };
}

/** (1 − α) S + α μ I for a p × p covariance S (a new array). */
export function shrink(covariance: Float64Array, p: number, intensity: number, target: number): Float64Array {
  const out = new Float64Array(p * p);
  for (let k = 0; k < p * p; k++) out[k] = (1 - intensity) * covariance[k];
  for (let i = 0; i < p; i++) out[i * p + i] += intensity * target;
  return out;
}
