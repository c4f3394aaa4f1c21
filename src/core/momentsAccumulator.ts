/**
 * The streaming pass into per-class moments (moments.ts defines them). Memory is independent of
 * the row count: per class a d × d scatter and a buffer of 64 rows. The accumulator never sums
 * raw x xᵀ: each class's rows are shifted by the class's first row, buffered 64 at a time,
 * centred on the block mean, multiplied out as one blocked cross-product
 * (crossProductKernel.ts: WebAssembly SIMD, or linalg.crossProductUpdate, 2–3× faster than a rank-1
 * update per row, MEASURED.md) and merged
 * into the running centred moments with Chan et al.'s pairwise formula (momentShift.ts).
 */
import { DataError } from './errors';
import { createCrossProductKernel, type CrossProductKernel } from './crossProductKernel';
import { mirrorUpper, symmetricMultiplyUpper } from './linalg';
import { shiftQuartic } from './momentShift';
import type { ClassMoments, Moments } from './moments';

/** Rows buffered per class before one blocked update (MEASURED.md: ~64 is the sweet spot). */
const BLOCK_ROWS = 64;
/** Columns of the transposed block: the rows, the merge's correction row, and a spare to keep it even (crossProductKernel.ts). */
const STRIDE = BLOCK_ROWS + 2;

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
  private readonly kernel: CrossProductKernel;
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
    // The scatter and the block live in the cross-product kernel's memory (WebAssembly SIMD when available).
    this.kernel = createCrossProductKernel(d, STRIDE);
    this.scatter = this.kernel.scatter;
    this.cubic = new Float64Array(d);
    this.min = new Float64Array(d).fill(Infinity);
    this.max = new Float64Array(d).fill(-Infinity);
    this.shift = new Float64Array(d);
    this.block = this.kernel.block;
    this.blockCubic = new Float64Array(d);
    this.delta = new Float64Array(d);
    this.scatterTimesDelta = new Float64Array(d);
    this.blockTimesDelta = new Float64Array(d);
  }

  flush(): void {
    const nb = this.buffered;
    if (nb === 0) return;
    const d = this.d;
    const stride = STRIDE;
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
      this.kernel.update(nb);
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
    this.kernel.update(nb + 1);
    this.scatterTrace += blockTrace + ((nA * nb) / n) * deltaSq;
    this.count = n;
    this.buffered = 0;
  }

  snapshot(): ClassMoments {
    const d = this.d;
    const scatter = this.scatter.slice(); // a copy (Float64Array.from would go element by element through an iterator)
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
    const stride = STRIDE;
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
