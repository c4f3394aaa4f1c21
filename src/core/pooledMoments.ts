import type { Moments } from './moments';

/**
 * Pooled moments: what the discriminant problem needs. Built from full per-class moments, or
 * (cross-validation folds) from the total minus a fold's pooled part.
 */
export interface PooledMoments {
  features: string[];
  labels: string[];
  counts: number[];
  /** Per class, d. */
  means: Float64Array[];
  /** d × d pooled within-class scatter Σ_c S_c. */
  withinScatter: Float64Array;
  /** Σ_t ‖z_t‖⁴ over all features, or null when unknown. */
  quartic: number | null;
  /** Largest |value| per feature (a bound), d. */
  magnitude: Float64Array;
  /** 1 where min = max over all rows / within every class. */
  singleValue: Uint8Array;
  singleValueWithinClasses: Uint8Array;
}

/** Values of the pooled scatter summed over every class at a time (16 KB, well inside L1/L2). */
const SUM_BLOCK = 2048;

export function pooledFromMoments(m: Moments): PooledMoments {
  const d = m.features.length;
  const withinScatter = new Float64Array(d * d);
  const magnitude = new Float64Array(d);
  const singleValue = new Uint8Array(d).fill(1);
  const singleValueWithinClasses = new Uint8Array(d).fill(1);
  let quartic = 0;
  const lo = new Float64Array(d).fill(Infinity);
  const hi = new Float64Array(d).fill(-Infinity);
  // Summed a block at a time over all classes: one pass over the output instead of K (at d = 1000
  // each scatter is 8 MB, so class by class re-read and re-wrote the sum from memory K times).
  const scatters = m.classes.map((c) => c.scatter);
  const size = d * d;
  for (let k0 = 0; k0 < size; k0 += SUM_BLOCK) {
    const k1 = Math.min(size, k0 + SUM_BLOCK);
    for (const scatter of scatters) for (let k = k0; k < k1; k++) withinScatter[k] += scatter[k];
  }
  for (const c of m.classes) {
    quartic += c.quartic;
    for (let j = 0; j < d; j++) {
      magnitude[j] = Math.max(magnitude[j], Math.abs(c.min[j]), Math.abs(c.max[j]));
      if (c.min[j] !== c.max[j]) singleValueWithinClasses[j] = 0;
      lo[j] = Math.min(lo[j], c.min[j]);
      hi[j] = Math.max(hi[j], c.max[j]);
    }
  }
  for (let j = 0; j < d; j++) if (lo[j] !== hi[j]) singleValue[j] = 0;
  return {
    features: [...m.features],
    labels: m.classes.map((c) => c.label),
    counts: m.classes.map((c) => c.count),
    means: m.classes.map((c) => c.mean),
    withinScatter,
    quartic,
    magnitude,
    singleValue,
    singleValueWithinClasses,
  };
}
