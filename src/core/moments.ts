/**
 * Per-class moments of a labelled table, accumulated in one streaming pass with memory
 * independent of the row count, and exactly mergeable across shards and subtractable (for
 * cross-validation training sets).
 *
 * Per class c with rows x_t (t ∈ C), count n, mean m and z_t = x_t − m:
 *   scatter  S = Σ z_t z_tᵀ           (d × d, stored full symmetric, row-major, centred)
 *   cubic    C = Σ ‖z_t‖² z_t          (d)
 *   quartic  Q = Σ ‖z_t‖⁴              (scalar)
 *   min, max per feature.
 * Cubic and quartic exist for the Ledoit–Wolf shrinkage intensity, which needs Σ_t ‖z_t‖⁴ over
 * the within-class-centred rows (lda.ts); keeping C makes Q mergeable.
 *
 * Merging two sets shifts both to the pooled mean and adds (momentShift.ts); for S this is
 * Chan, Golub & LeVeque's pairwise update (Chan et al., "Updating formulae and a pairwise
 * algorithm for computing sample variances", 1979): S = S_A + S_B + (n_A n_B / n) δ δᵀ,
 * δ = m_B − m_A. The streaming pass is momentsAccumulator.ts.
 */
import { DataError } from './errors';
import { dotProduct, fullMultiply, shiftCubic, shiftQuartic, trace } from './momentShift';

export interface ClassMoments {
  label: string;
  count: number;
  /** d */
  mean: Float64Array;
  /** d × d, row-major, full symmetric, centred on `mean`. */
  scatter: Float64Array;
  /** d; after subtractMoments these are the total's (an outer bound), see there. */
  min: Float64Array;
  max: Float64Array;
  /** d: Σ ‖z‖² z about the class mean. */
  cubic: Float64Array;
  /** Σ ‖z‖⁴ about the class mean. */
  quartic: number;
}

export interface Moments {
  features: string[];
  /** In order of first appearance (merge: a's classes, then b's new ones). */
  classes: ClassMoments[];
}

function requireSameFeatures(a: Moments, b: Moments, operation: string): void {
  const same = a.features.length === b.features.length && a.features.every((f, i) => f === b.features[i]);
  if (!same) {
    throw new DataError(
      'moments-mismatch',
      `Cannot ${operation} moments over different features: [${a.features.join(', ')}] and [${b.features.join(', ')}].`,
      {},
      'Compute every part with the same feature columns in the same order.',
    );
  }
}

/** A copy of a class (with `scatter` as its scatter when given). */
function copyClass(c: ClassMoments, scatter: Float64Array = c.scatter.slice()): ClassMoments {
  // slice() copies a typed array in one block; Float64Array.from would go element by element.
  return {
    label: c.label,
    count: c.count,
    mean: c.mean.slice(),
    scatter,
    min: c.min.slice(),
    max: c.max.slice(),
    cubic: c.cubic.slice(),
    quartic: c.quartic,
  };
}

/** Moments of the union of two disjoint row sets; classes matched by label. Neither argument changes. */
export function mergeMoments(a: Moments, b: Moments): Moments {
  requireSameFeatures(a, b, 'merge');
  const d = a.features.length;
  const classes: ClassMoments[] = [];
  const index = new Map<string, number>();
  for (const ca of a.classes) {
    index.set(ca.label, classes.length);
    const cb = b.classes.find((c) => c.label === ca.label);
    classes.push(cb ? mergeClass(ca, cb, d, new Float64Array(d * d)) : copyClass(ca));
  }
  for (const cb of b.classes) if (!index.has(cb.label)) classes.push(copyClass(cb));
  return { features: [...a.features], classes };
}

/**
 * The same union as mergeMoments, written over `into` (returned): its classes' scatters are
 * updated in place and `part`'s new classes are taken over as they are, so a parallel pass merging
 * the moments its workers handed over allocates and copies no d × d matrix. `part` must not be
 * used afterwards.
 */
export function mergeMomentsInPlace(into: Moments, part: Moments): Moments {
  requireSameFeatures(into, part, 'merge');
  const d = into.features.length;
  const index = new Map(into.classes.map((c, i) => [c.label, i]));
  for (const cb of part.classes) {
    const at = index.get(cb.label);
    if (at === undefined) {
      index.set(cb.label, into.classes.length);
      into.classes.push(cb);
    } else into.classes[at] = mergeClass(into.classes[at]!, cb, d, into.classes[at]!.scatter);
  }
  return into;
}

/**
 * The ArrayBuffers behind a Moments' arrays, each once: the transfer list that hands moments to
 * another thread without copying them (postMessage(moments, momentsBuffers(moments))). The arrays
 * on the sending side are unusable afterwards.
 */
export function momentsBuffers(m: Moments): ArrayBuffer[] {
  const buffers = new Set<ArrayBuffer>();
  for (const c of m.classes) for (const array of [c.mean, c.scatter, c.min, c.max, c.cubic]) if (array.buffer instanceof ArrayBuffer) buffers.add(array.buffer);
  return [...buffers];
}

/** The merged class; its scatter is written into `scatter`, which may be a's own (read before written, element by element). */
function mergeClass(a: ClassMoments, b: ClassMoments, d: number, scatter: Float64Array): ClassMoments {
  if (a.count === 0) {
    scatter.set(b.scatter);
    return copyClass(b, scatter);
  }
  if (b.count === 0) {
    if (scatter !== a.scatter) scatter.set(a.scatter);
    return copyClass(a, scatter);
  }
  const n = a.count + b.count;
  const delta = new Float64Array(d);
  for (let i = 0; i < d; i++) delta[i] = b.mean[i] - a.mean[i];
  const eA = delta.map((v) => (-b.count / n) * v);
  const eB = delta.map((v) => (a.count / n) * v);
  const trA = trace(a.scatter, d);
  const trB = trace(b.scatter, d);
  // S = S_A + S_B + (n_A n_B / n) δ δᵀ, written row by row, with S_A e_A and S_B e_B (as
  // fullMultiply sums them) taken from the same rows on the way: one pass over the two d × d
  // matrices instead of three. Row i of S_A is read before it is overwritten, and only row i of
  // S_A enters (S_A e_A)_i, so `scatter` may be a's own.
  const weight = (a.count * b.count) / n;
  const aScatter = a.scatter;
  const bScatter = b.scatter;
  const sAe = new Float64Array(d);
  const sBe = new Float64Array(d);
  for (let i = 0; i < d; i++) {
    const row = i * d;
    const w = weight * delta[i];
    let sumA = 0;
    let sumB = 0;
    for (let j = 0; j < d; j++) {
      const valueA = aScatter[row + j];
      const valueB = bScatter[row + j];
      sumA += valueA * eA[j];
      sumB += valueB * eB[j];
      scatter[row + j] = valueA + valueB + w * delta[j];
    }
    sAe[i] = sumA;
    sBe[i] = sumB;
  }
  const cubicA = new Float64Array(d);
  const cubicB = new Float64Array(d);
  shiftCubic(cubicA, a.cubic, sAe, trA, a.count, eA);
  shiftCubic(cubicB, b.cubic, sBe, trB, b.count, eB);
  const quartic =
    shiftQuartic(a.quartic, dotProduct(eA, sAe), dotProduct(a.cubic, eA), trA, a.count, dotProduct(eA, eA)) +
    shiftQuartic(b.quartic, dotProduct(eB, sBe), dotProduct(b.cubic, eB), trB, b.count, dotProduct(eB, eB));
  const mean = new Float64Array(d);
  for (let i = 0; i < d; i++) mean[i] = a.mean[i] + (b.count / n) * delta[i];
  return {
    label: a.label,
    count: n,
    mean,
    scatter,
    min: a.min.map((v, i) => Math.min(v, b.min[i])),
    max: a.max.map((v, i) => Math.max(v, b.max[i])),
    cubic: cubicA.map((v, i) => v + cubicB[i]),
    quartic,
  };
}

/**
 * Moments of `total` without the rows of `part` (which must be a subset of them): the exact
 * inverse of mergeMoments, used for cross-validation training sets. A class whose rows are all in
 * `part` disappears. The rows left are not known, so min and max stay the total's: an outer bound,
 * not the remainder's own extremes.
 */
export function subtractMoments(total: Moments, part: Moments): Moments {
  requireSameFeatures(total, part, 'subtract');
  const d = total.features.length;
  const parts = new Map(part.classes.map((c) => [c.label, c]));
  for (const p of part.classes) {
    const t = total.classes.find((c) => c.label === p.label);
    if (!t || t.count < p.count) {
      throw new DataError(
        'moments-mismatch',
        `Cannot subtract ${p.count} rows of class "${p.label}" from ${t ? t.count : 0}: the part is not contained in the total.`,
      );
    }
  }
  const classes: ClassMoments[] = [];
  for (const t of total.classes) {
    const p = parts.get(t.label);
    if (!p || p.count === 0) {
      classes.push(copyClass(t));
      continue;
    }
    if (p.count === t.count) continue;
    classes.push(subtractClass(t, p, d));
  }
  return { features: [...total.features], classes };
}

function subtractClass(t: ClassMoments, p: ClassMoments, d: number): ClassMoments {
  const nT = t.count;
  const nP = p.count;
  const nR = nT - nP;
  // e_P = p − t (the part's mean relative to the total's), e_R = r − t = −(nP/nR) e_P.
  const eP = new Float64Array(d);
  for (let i = 0; i < d; i++) eP[i] = p.mean[i] - t.mean[i];
  const eR = eP.map((v) => (-nP / nR) * v);
  const mean = new Float64Array(d);
  for (let i = 0; i < d; i++) mean[i] = t.mean[i] + eR[i];
  // S_R = S_T − S_P − nR e_R e_Rᵀ − nP e_P e_Pᵀ = S_T − S_P − (nP nT / nR) e_P e_Pᵀ.
  const weight = (nP * nT) / nR;
  const scatter = new Float64Array(d * d);
  for (let i = 0; i < d; i++) {
    for (let j = 0; j < d; j++) {
      const k = i * d + j;
      scatter[k] = t.scatter[k] - p.scatter[k] - weight * eP[i] * eP[j];
    }
  }
  const trP = trace(p.scatter, d);
  const trR = trace(scatter, d);
  // C_T = shift(C_R, e_R) + shift(C_P, e_P): solve for C_R.
  const sPe = fullMultiply(p.scatter, d, eP);
  const shiftedP = new Float64Array(d);
  shiftCubic(shiftedP, p.cubic, sPe, trP, nP, eP);
  const sRe = fullMultiply(scatter, d, eR);
  const eeR = dotProduct(eR, eR);
  const cubic = new Float64Array(d);
  for (let i = 0; i < d; i++) cubic[i] = t.cubic[i] - shiftedP[i] - (trR + nR * eeR) * eR[i] - 2 * sRe[i];
  const shiftedQuarticP = shiftQuartic(p.quartic, dotProduct(eP, sPe), dotProduct(p.cubic, eP), trP, nP, dotProduct(eP, eP));
  const quartic = t.quartic - shiftedQuarticP - (4 * dotProduct(eR, sRe) + nR * eeR * eeR + 4 * dotProduct(cubic, eR) + 2 * eeR * trR);
  return {
    label: t.label,
    count: nR,
    mean,
    scatter,
    min: Float64Array.from(t.min),
    max: Float64Array.from(t.max),
    cubic,
    quartic: Math.max(0, quartic),
  };
}

/** Total row count. */
export function totalCount(m: Moments): number {
  return m.classes.reduce((s, c) => s + c.count, 0);
}

/**
 * Each class mean minus the count-weighted overall mean, K × d, formed from differences to the
 * first class's mean so that a large common offset cancels exactly before the weighting.
 */
export function meanDeviations(m: Moments): Float64Array[] {
  const d = m.features.length;
  const n = totalCount(m);
  if (m.classes.length === 0) return [];
  const reference = m.classes[0].mean;
  const average = new Float64Array(d);
  for (const c of m.classes) for (let i = 0; i < d; i++) average[i] += (c.count / n) * (c.mean[i] - reference[i]);
  return m.classes.map((c) => {
    const out = new Float64Array(d);
    for (let i = 0; i < d; i++) out[i] = c.mean[i] - reference[i] - average[i];
    return out;
  });
}

/** Count-weighted overall mean, d. */
export function overallMean(m: Moments): Float64Array {
  const d = m.features.length;
  const out = new Float64Array(d);
  if (m.classes.length === 0) return out;
  const deviations = meanDeviations(m);
  const first = m.classes[0].mean;
  for (let i = 0; i < d; i++) out[i] = first[i] - deviations[0][i];
  return out;
}

/** Within-class scatter S_W = Σ_c S_c, d × d. */
export function withinScatter(m: Moments): Float64Array {
  const d = m.features.length;
  const out = new Float64Array(d * d);
  for (const c of m.classes) for (let k = 0; k < out.length; k++) out[k] += c.scatter[k];
  return out;
}

/** Between-class scatter S_B = Σ_c N_c (m_c − m)(m_c − m)ᵀ, d × d, m the N-weighted overall mean. */
export function betweenScatter(m: Moments): Float64Array {
  const d = m.features.length;
  const out = new Float64Array(d * d);
  const deviations = meanDeviations(m);
  m.classes.forEach((c, index) => {
    const dev = deviations[index];
    for (let i = 0; i < d; i++) {
      const w = c.count * dev[i];
      const row = i * d;
      for (let j = 0; j < d; j++) out[row + j] += w * dev[j];
    }
  });
  return out;
}

/** Total scatter S_T = S_W + S_B (the centred scatter of all rows), d × d. */
export function totalScatter(m: Moments): Float64Array {
  const w = withinScatter(m);
  const b = betweenScatter(m);
  for (let k = 0; k < w.length; k++) w[k] += b[k];
  return w;
}

export { momentsToJSON, momentsFromJSON } from './momentsJson';
export { MomentsAccumulator } from './momentsAccumulator';
