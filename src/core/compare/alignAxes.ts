/**
 * The sign of a discriminant or principal axis is arbitrary: two fits of nearly the same data may
 * point LD1 in opposite directions, which would show the same picture mirrored. To draw base and
 * head side by side, each head axis is flipped when its structure correlations (discriminants) or
 * loadings (components) on the features both fits use point against the base's.
 */
import type { FitReport } from '../types';

/** +1 or −1 per column, so that head column j·sign agrees in direction with base column j. */
function signsByFeatures(baseFeatures: readonly string[], base: readonly (readonly number[])[], headFeatures: readonly string[], head: readonly (readonly number[])[], columns: number): number[] {
  const headRow = new Map(headFeatures.map((f, i) => [f, i]));
  return Array.from({ length: columns }, (_, j) => {
    let dot = 0;
    baseFeatures.forEach((feature, i) => {
      const h = headRow.get(feature);
      const b = base[i]?.[j];
      const v = h === undefined ? undefined : head[h]?.[j];
      if (b !== undefined && v !== undefined && Number.isFinite(b) && Number.isFinite(v)) dot += b * v;
    });
    return dot < 0 ? -1 : 1;
  });
}

/** Sign per head discriminant (structure correlations) and per head principal component (loadings). */
export function alignedAxisSigns(base: FitReport, head: FitReport): { discriminant: number[]; principal: number[] } {
  const k = head.discriminant.eigenvalues.length;
  const p = head.pca.loadings[0]?.length ?? 0;
  return {
    discriminant: signsByFeatures(base.features, base.discriminant.structure, head.features, head.discriminant.structure, k),
    principal: signsByFeatures(base.features, base.pca.loadings, head.features, head.pca.loadings, p),
  };
}

/**
 * A common range for drawing two sets of scores on the same scale: the smallest interval holding
 * the finite values of both, widened by 5% on each side (and to ±0.5 around a single value).
 */
export function sharedRange(...columns: (readonly number[])[]): { low: number; high: number } {
  let low = Infinity;
  let high = -Infinity;
  for (const column of columns) {
    for (const x of column) {
      if (!Number.isFinite(x)) continue;
      if (x < low) low = x;
      if (x > high) high = x;
    }
  }
  if (low === Infinity) return { low: -1, high: 1 };
  if (low === high) return { low: low - 0.5, high: high + 0.5 };
  const pad = (high - low) * 0.05;
  return { low: low - pad, high: high + pad };
}
