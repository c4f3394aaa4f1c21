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
 * Shifting the centre from the mean m to a point c (e = m − c, so x − c = z + e):
 *   Σ (z+e)(z+e)ᵀ = S + n e eᵀ
 *   Σ ‖z+e‖² (z+e) = C + tr(S) e + 2 S e + n ‖e‖² e
 *   Σ ‖z+e‖⁴       = Q + 4 eᵀS e + n ‖e‖⁴ + 4 Cᵀe + 2 ‖e‖² tr(S)
 * (expand and use Σ z = 0). Merging two sets = shifting both to the pooled mean and adding, which
 * for S is Chan, Golub & LeVeque's pairwise update (Chan et al., "Updating formulae and a pairwise
 * algorithm for computing sample variances", 1979): S = S_A + S_B + (n_A n_B / n) δ δᵀ, δ = m_B − m_A.
 *
 * The accumulator never sums raw x xᵀ: each class's rows are shifted by the class's first row,
 * buffered 64 at a time, centred on the block mean, multiplied out as one blocked cross-product
 * (linalg.crossProductUpdate) and merged into the running centred moments with the formulas above.
 */
import { DataError } from './errors';
import { crossProductUpdate, mirrorUpper, symmetricMultiplyUpper } from './linalg';

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

/** Rows buffered per class before one blocked update (MEASURED.md: ~64 is the sweet spot). */
const BLOCK_ROWS = 64;

/** out = C + tr(S)·e + 2·(S e) + n‖e‖²·e : the cubic moment after moving the centre by −e. */
function shiftCubic(out: Float64Array, cubic: Float64Array, scatterTimesE: Float64Array, trace: number, count: number, e: Float64Array): void {
  let ee = 0;
  for (let i = 0; i < e.length; i++) ee += e[i] * e[i];
  const factor = trace + count * ee;
  for (let i = 0; i < e.length; i++) out[i] = cubic[i] + factor * e[i] + 2 * scatterTimesE[i];
}

/** Q + 4 eᵀSe + n‖e‖⁴ + 4 Cᵀe + 2‖e‖² tr(S): the quartic moment after moving the centre by −e. */
function shiftQuartic(quartic: number, eSe: number, cubicDotE: number, trace: number, count: number, ee: number): number {
  return quartic + 4 * eSe + count * ee * ee + 4 * cubicDotE + 2 * ee * trace;
}

function dotProduct(x: Float64Array, y: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] * y[i];
  return s;
}

function fullMultiply(s: Float64Array, d: number, x: Float64Array): Float64Array {
  const out = new Float64Array(d);
  for (let i = 0; i < d; i++) {
    let sum = 0;
    const row = i * d;
    for (let j = 0; j < d; j++) sum += s[row + j] * x[j];
    out[i] = sum;
  }
  return out;
}

function trace(s: Float64Array, d: number): number {
  let t = 0;
  for (let i = 0; i < d; i++) t += s[i * d + i];
  return t;
}

/**
 * Running moments of one class. The mean is kept relative to `shift` (the class's first row);
 * the scatter is accumulated in its upper triangle only. Rows wait in `block` (raw values,
 * transposed: feature i, buffered row t at i·stride + t) until BLOCK_ROWS have arrived.
 */
class ClassAccumulator {
  count = 0;
  quartic = 0;
  scatterTrace = 0;
  buffered = 0;
  readonly mean: Float64Array;
  readonly scatter: Float64Array;
  readonly cubic: Float64Array;
  readonly min: Float64Array;
  readonly max: Float64Array;
  readonly shift: Float64Array;
  readonly block: Float64Array;
  private readonly blockCubic: Float64Array;
  private readonly delta: Float64Array;
  private readonly scatterTimesDelta: Float64Array;
  private readonly blockTimesDelta: Float64Array;
  private readonly rowNorms = new Float64Array(BLOCK_ROWS);
  private readonly projections = new Float64Array(BLOCK_ROWS);

  constructor(
    readonly label: string,
    readonly d: number,
    readonly features: readonly string[],
  ) {
    this.mean = new Float64Array(d);
    this.scatter = new Float64Array(d * d);
    this.cubic = new Float64Array(d);
    this.min = new Float64Array(d).fill(Infinity);
    this.max = new Float64Array(d).fill(-Infinity);
    this.shift = new Float64Array(d);
    this.block = new Float64Array(d * (BLOCK_ROWS + 1));
    this.blockCubic = new Float64Array(d);
    this.delta = new Float64Array(d);
    this.scatterTimesDelta = new Float64Array(d);
    this.blockTimesDelta = new Float64Array(d);
  }

  flush(): void {
    const nb = this.buffered;
    if (nb === 0) return;
    const d = this.d;
    const stride = BLOCK_ROWS + 1;
    const y = this.block;
    const { rowNorms, projections, delta, blockCubic, blockTimesDelta } = this;
    const first = this.count === 0;
    if (first) {
      for (let i = 0; i < d; i++) this.shift[i] = y[i * stride];
    }
    // Pass 1 per feature: extremes, shift, block mean; then centre on the block mean, with the
    // row norms ‖z_t‖² and the projections z_tᵀδ (δ = block mean − running mean) on the way.
    rowNorms.fill(0, 0, nb);
    projections.fill(0, 0, nb);
    for (let i = 0; i < d; i++) {
      const c = i * stride;
      const shift = this.shift[i];
      let lo = this.min[i];
      let hi = this.max[i];
      let sum = 0;
      for (let t = 0; t < nb; t++) {
        const x = y[c + t];
        if (x < lo) lo = x;
        if (x > hi) hi = x;
        const v = x - shift;
        y[c + t] = v;
        sum += v;
      }
      if (!Number.isFinite(sum)) {
        throw new DataError('non-finite-value', `Class "${this.label}" has a value that is not a finite number in column "${this.features[i]}".`, { column: this.features[i] });
      }
      this.min[i] = lo;
      this.max[i] = hi;
      const blockMean = sum / nb;
      const di = blockMean - this.mean[i];
      delta[i] = di;
      for (let t = 0; t < nb; t++) {
        const z = y[c + t] - blockMean;
        y[c + t] = z;
        rowNorms[t] += z * z;
        projections[t] += z * di;
      }
    }
    // Pass 2 per feature: block cubic Σ‖z‖² z and S_B δ = Σ z (zᵀδ).
    let blockQuartic = 0;
    let blockTrace = 0;
    let blockDelta = 0; // δᵀ S_B δ
    for (let t = 0; t < nb; t++) {
      blockQuartic += rowNorms[t] * rowNorms[t];
      blockTrace += rowNorms[t];
      blockDelta += projections[t] * projections[t];
    }
    for (let i = 0; i < d; i++) {
      const c = i * stride;
      let cubic = 0;
      let product = 0;
      for (let t = 0; t < nb; t++) {
        const z = y[c + t];
        cubic += rowNorms[t] * z;
        product += projections[t] * z;
      }
      blockCubic[i] = cubic;
      blockTimesDelta[i] = product;
    }
    if (first) {
      // The running mean was 0 (relative to the shift), so δ is the block mean.
      this.mean.set(delta);
      crossProductUpdate(this.scatter, d, y, stride, nb);
      this.cubic.set(blockCubic);
      this.quartic = blockQuartic;
      this.scatterTrace = blockTrace;
      this.count = nb;
      this.buffered = 0;
      return;
    }
    // Merge (Chan et al.): the running side moves by e_A = −(nb/n)δ, the block by e_B = (nA/n)δ.
    const nA = this.count;
    const n = nA + nb;
    const fA = -nb / n;
    const fB = nA / n;
    let deltaSq = 0;
    for (let i = 0; i < d; i++) deltaSq += delta[i] * delta[i];
    const product = this.scatterTimesDelta;
    symmetricMultiplyUpper(this.scatter, d, delta, product); // S_A δ
    let runningDelta = 0; // δᵀ S_A δ
    let runningCubicDelta = 0;
    let blockCubicDelta = 0;
    for (let i = 0; i < d; i++) {
      runningDelta += delta[i] * product[i];
      runningCubicDelta += this.cubic[i] * delta[i];
      blockCubicDelta += blockCubic[i] * delta[i];
    }
    const eeA = fA * fA * deltaSq;
    const eeB = fB * fB * deltaSq;
    const quarticA = shiftQuartic(this.quartic, fA * fA * runningDelta, fA * runningCubicDelta, this.scatterTrace, nA, eeA);
    const quarticB = shiftQuartic(blockQuartic, fB * fB * blockDelta, fB * blockCubicDelta, blockTrace, nb, eeB);
    const factorA = (this.scatterTrace + nA * eeA) * fA;
    const factorB = (blockTrace + nb * eeB) * fB;
    for (let i = 0; i < d; i++) {
      this.cubic[i] += factorA * delta[i] + 2 * fA * product[i] + blockCubic[i] + factorB * delta[i] + 2 * fB * blockTimesDelta[i];
      this.mean[i] += (nb / n) * delta[i];
    }
    this.quartic = quarticA + quarticB;
    // S = S_A + S_B + (nA nb / n) δδᵀ: the rank-1 term rides along as one more block row.
    const weight = Math.sqrt((nA * nb) / n);
    for (let i = 0; i < d; i++) y[i * stride + nb] = weight * delta[i];
    crossProductUpdate(this.scatter, d, y, stride, nb + 1);
    this.scatterTrace += blockTrace + ((nA * nb) / n) * deltaSq;
    this.count = n;
    this.buffered = 0;
  }

  snapshot(): ClassMoments {
    const d = this.d;
    const scatter = Float64Array.from(this.scatter);
    mirrorUpper(scatter, d);
    const mean = new Float64Array(d);
    for (let i = 0; i < d; i++) mean[i] = this.shift[i] + this.mean[i];
    return {
      label: this.label,
      count: this.count,
      mean,
      scatter,
      min: Float64Array.from(this.min),
      max: Float64Array.from(this.max),
      cubic: Float64Array.from(this.cubic),
      quartic: this.quartic,
    };
  }
}

/** One streaming pass of clean rows into per-class moments. */
export class MomentsAccumulator {
  private readonly d: number;
  private readonly classes: ClassAccumulator[] = [];
  private readonly byLabel = new Map<string, ClassAccumulator>();

  constructor(readonly features: string[]) {
    this.d = features.length;
  }

  /**
   * Adds `rows` rows: `values` is rows × d row-major, with no NaN or ±Infinity (one is reported as
   * a DataError naming the class and column); `classIds[r]` indexes the caller's label dictionary
   * `labels`, which may grow between calls.
   */
  add(values: Float64Array, classIds: Int32Array, rows: number, labels: readonly string[]): void {
    const d = this.d;
    const stride = BLOCK_ROWS + 1;
    const local: (ClassAccumulator | undefined)[] = new Array(labels.length);
    for (let r = 0; r < rows; r++) {
      const id = classIds[r];
      let target = local[id];
      if (target === undefined) {
        if (!(id >= 0 && id < labels.length)) throw new RangeError(`class id ${id} is outside the label dictionary (${labels.length} labels)`);
        const label = labels[id];
        target = this.byLabel.get(label);
        if (target === undefined) {
          target = new ClassAccumulator(label, d, this.features);
          this.byLabel.set(label, target);
          this.classes.push(target);
        }
        local[id] = target;
      }
      const base = r * d;
      const column = target.buffered;
      const block = target.block;
      for (let i = 0; i < d; i++) block[i * stride + column] = values[base + i];
      target.buffered = column + 1;
      if (column + 1 === BLOCK_ROWS) target.flush();
    }
  }

  /** The moments so far (buffers are flushed; adding may continue afterwards). */
  result(): Moments {
    for (const c of this.classes) c.flush();
    return { features: [...this.features], classes: this.classes.map((c) => c.snapshot()) };
  }
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

function copyClass(c: ClassMoments): ClassMoments {
  return {
    label: c.label,
    count: c.count,
    mean: Float64Array.from(c.mean),
    scatter: Float64Array.from(c.scatter),
    min: Float64Array.from(c.min),
    max: Float64Array.from(c.max),
    cubic: Float64Array.from(c.cubic),
    quartic: c.quartic,
  };
}

/** Moments of the union of two disjoint row sets; classes matched by label. */
export function mergeMoments(a: Moments, b: Moments): Moments {
  requireSameFeatures(a, b, 'merge');
  const d = a.features.length;
  const classes = a.classes.map(copyClass);
  const index = new Map(classes.map((c, i) => [c.label, i]));
  for (const cb of b.classes) {
    const at = index.get(cb.label);
    if (at === undefined) {
      index.set(cb.label, classes.length);
      classes.push(copyClass(cb));
      continue;
    }
    classes[at] = mergeClass(classes[at], cb, d);
  }
  return { features: [...a.features], classes };
}

function mergeClass(a: ClassMoments, b: ClassMoments, d: number): ClassMoments {
  if (a.count === 0) return copyClass(b);
  if (b.count === 0) return copyClass(a);
  const n = a.count + b.count;
  const delta = new Float64Array(d);
  for (let i = 0; i < d; i++) delta[i] = b.mean[i] - a.mean[i];
  const eA = delta.map((v) => (-b.count / n) * v);
  const eB = delta.map((v) => (a.count / n) * v);
  const sAe = fullMultiply(a.scatter, d, eA);
  const sBe = fullMultiply(b.scatter, d, eB);
  const trA = trace(a.scatter, d);
  const trB = trace(b.scatter, d);
  const cubicA = new Float64Array(d);
  const cubicB = new Float64Array(d);
  shiftCubic(cubicA, a.cubic, sAe, trA, a.count, eA);
  shiftCubic(cubicB, b.cubic, sBe, trB, b.count, eB);
  const quartic =
    shiftQuartic(a.quartic, dotProduct(eA, sAe), dotProduct(a.cubic, eA), trA, a.count, dotProduct(eA, eA)) +
    shiftQuartic(b.quartic, dotProduct(eB, sBe), dotProduct(b.cubic, eB), trB, b.count, dotProduct(eB, eB));
  const weight = (a.count * b.count) / n;
  const scatter = new Float64Array(d * d);
  for (let i = 0; i < d; i++) {
    for (let j = 0; j < d; j++) {
      const k = i * d + j;
      scatter[k] = a.scatter[k] + b.scatter[k] + weight * delta[i] * delta[j];
    }
  }
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
