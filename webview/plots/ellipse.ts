/**
 * Per-class 95% ellipses in a 2-D projection. For a bivariate normal with mean μ and covariance Σ,
 * the region (x − μ)ᵀ Σ⁻¹ (x − μ) ≤ c holds probability 1 − exp(−c/2) (the χ² distribution with
 * 2 degrees of freedom has that closed form), so the 95% region has c = −2 ln 0.05 ≈ 5.991.
 * μ and Σ are the sample mean and covariance (divisor n − 1) of the plotted points of the class.
 */
export const CHI_SQUARE_2DF_95 = -2 * Math.log(0.05);

export interface ClassSpread {
  count: number;
  meanX: number;
  meanY: number;
  varianceX: number;
  varianceY: number;
  covariance: number;
}

/** An ellipse: centre, semi-axes and the angle of the first axis from the x axis (radians). */
export interface Ellipse {
  centreX: number;
  centreY: number;
  radiusMajor: number;
  radiusMinor: number;
  angle: number;
}

/** Means and covariances of each class's points, in one pass (Welford's update for stability). */
export function classSpreads(x: Float64Array, y: Float64Array, classIndex: Int32Array, classCount: number): ClassSpread[] {
  const count = new Float64Array(classCount);
  const meanX = new Float64Array(classCount);
  const meanY = new Float64Array(classCount);
  const sxx = new Float64Array(classCount);
  const syy = new Float64Array(classCount);
  const sxy = new Float64Array(classCount);
  for (let i = 0; i < x.length; i++) {
    const c = classIndex[i];
    if (c < 0 || c >= classCount || !Number.isFinite(x[i]) || !Number.isFinite(y[i])) continue;
    count[c] += 1;
    const dx = x[i] - meanX[c];
    const dy = y[i] - meanY[c];
    meanX[c] += dx / count[c];
    meanY[c] += dy / count[c];
    sxx[c] += dx * (x[i] - meanX[c]);
    syy[c] += dy * (y[i] - meanY[c]);
    sxy[c] += dx * (y[i] - meanY[c]);
  }
  const spreads: ClassSpread[] = [];
  for (let c = 0; c < classCount; c++) {
    const divisor = count[c] - 1;
    spreads.push({
      count: count[c],
      meanX: count[c] > 0 ? meanX[c] : NaN,
      meanY: count[c] > 0 ? meanY[c] : NaN,
      varianceX: divisor > 0 ? sxx[c] / divisor : NaN,
      varianceY: divisor > 0 ? syy[c] / divisor : NaN,
      covariance: divisor > 0 ? sxy[c] / divisor : NaN,
    });
  }
  return spreads;
}

/** The 95% ellipse of a class, or null with fewer than three points or a degenerate covariance. */
export function coverageEllipse(spread: ClassSpread, level = CHI_SQUARE_2DF_95): Ellipse | null {
  const { count, varianceX: a, varianceY: d, covariance: b } = spread;
  if (count < 3 || !Number.isFinite(a) || !Number.isFinite(b) || !Number.isFinite(d)) return null;
  // Eigenvalues of the symmetric 2 × 2 matrix [[a, b], [b, d]] in closed form.
  const half = (a + d) / 2;
  const root = Math.hypot((a - d) / 2, b);
  const major = half + root;
  const minor = half - root;
  if (!(major > 0) || minor < -major * 1e-12) return null;
  // The major axis is the eigenvector (b, major − a); with b = 0 the axes are the coordinate axes.
  const angle = b !== 0 ? Math.atan2(major - a, b) : a >= d ? 0 : Math.PI / 2;
  return {
    centreX: spread.meanX,
    centreY: spread.meanY,
    radiusMajor: Math.sqrt(level * major),
    radiusMinor: Math.sqrt(level * Math.max(minor, 0)),
    angle,
  };
}

/** Points along an ellipse, for drawing on a canvas or as an SVG path. */
export function ellipseOutline(ellipse: Ellipse, segments = 72): { x: number; y: number }[] {
  const points: { x: number; y: number }[] = [];
  const cos = Math.cos(ellipse.angle);
  const sin = Math.sin(ellipse.angle);
  for (let i = 0; i <= segments; i++) {
    const t = (2 * Math.PI * i) / segments;
    const u = ellipse.radiusMajor * Math.cos(t);
    const v = ellipse.radiusMinor * Math.sin(t);
    points.push({ x: ellipse.centreX + u * cos - v * sin, y: ellipse.centreY + u * sin + v * cos });
  }
  return points;
}
