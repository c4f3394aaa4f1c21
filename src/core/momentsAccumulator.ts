/**
 * The streaming pass into per-class moments (moments.ts defines them). Memory is independent of
 * the row count: per class a d × d scatter and a block of buffered rows (blockRowsFor(d): 64 for
 * narrow tables, 128 for wide ones). The accumulator never sums raw x xᵀ: each class's rows
 * are shifted by the class's first row, buffered row-major, centred on the block mean, multiplied
 * out as one blocked cross-product (crossProductKernel.ts, ScatterKernel: WebAssembly SIMD, or a
 * JavaScript loop where the engine lacks it) and merged into the running centred moments with
 * Chan et al.'s pairwise formula (momentShift.ts).
 */
import { DataError } from './errors';
import { createScatterKernel, symmetricFromUpper, type ScatterKernel } from './crossProductKernel';
import { mirrorUpper } from './linalg';
import { shiftQuartic } from './momentShift';
import type { ClassMoments, Moments } from './moments';

/**
 * Rows buffered per class before one blocked update. Each update reads and writes the class's
 * whole d × d scatter and the merge multiplies it by a vector once, so wide tables take more rows
 * per block than narrow ones; but not too many: at d = 1 000 (10 classes, 20 000 rows, measured
 * on a two-core AMD EPYC virtual machine with 1 MiB of L2 cache) 128 rows cost 60 µs a row
 * against 69 µs with 256 and 117 µs with 512 (a block of 128 rows is 1 MiB there), and the last,
 * partial block of each class that finish() flushes is smaller.
 */
export function blockRowsFor(d: number): number {
  return d < 128 ? 64 : 128;
}

/**
 * Running moments of one class. The mean is kept relative to `shift` (the class's first row);
 * the scatter is accumulated in its upper triangle only (ScatterKernel: row length `size` ≥ d).
 * Rows wait in `block` (raw values, row-major: buffered row t at t·size) until a block is full.
 */
class ClassAccumulator {
  count = 0;
  quartic = 0;
  scatterTrace = 0;
  buffered = 0;
  readonly mean: Float64Array;
  readonly cubic: Float64Array;
  readonly min: Float64Array;
  readonly max: Float64Array;
  readonly shift: Float64Array;
  readonly kernel: ScatterKernel;
  readonly block: Float64Array;
  readonly size: number;

  constructor(
    readonly label: string,
    readonly d: number,
    readonly features: readonly string[],
    readonly blockRows: number,
  ) {
    this.mean = new Float64Array(d);
    // The scatter and the block live in the kernel's memory (WebAssembly SIMD when available);
    // one block row more for the merge's correction row.
    this.kernel = createScatterKernel(d, blockRows + 1);
    this.block = this.kernel.block;
    this.size = this.kernel.size;
    this.cubic = new Float64Array(d);
    // The flush's vectors live in the kernel's memory too: its shiftRows and centreRows use them.
    this.min = this.kernel.min.fill(Infinity);
    this.max = this.kernel.max.fill(-Infinity);
    this.shift = this.kernel.shift;
  }

  flush(): void {
    const nb = this.buffered;
    if (nb === 0) return;
    const d = this.d;
    const size = this.size;
    const y = this.block;
    const kernel = this.kernel;
    const { rowNorms, projections, delta, sums, mean: blockMean, cubic: blockCubic, timesDelta: blockTimesDelta, shift } = kernel;
    const first = this.count === 0;
    if (first) {
      for (let i = 0; i < d; i++) shift[i] = y[i];
    }
    // Pass 1, row by row: extremes, shift, block sums.
    kernel.shiftRows(nb);
    for (let i = 0; i < d; i++) {
      if (!Number.isFinite(sums[i])) {
        throw new DataError('non-finite-value', `Class "${this.label}" has a value that is not a finite number in column "${this.features[i]}".`, { column: this.features[i] });
      }
      blockMean[i] = sums[i] / nb;
      delta[i] = blockMean[i] - this.mean[i];
    }
    // Pass 2, row by row: centre on the block mean (δ = block mean − running mean), with the row
    // norms ‖z_t‖², the projections z_tᵀδ, the block cubic Σ‖z‖² z and S_B δ = Σ z (zᵀδ).
    kernel.centreRows(nb);
    let blockQuartic = 0;
    let blockTrace = 0;
    let blockDelta = 0; // δᵀ S_B δ
    for (let t = 0; t < nb; t++) {
      const norm = rowNorms[t];
      blockQuartic += norm * norm;
      blockTrace += norm;
      blockDelta += projections[t] * projections[t];
    }
    if (first) {
      // The running mean was 0 (relative to the shift), so δ is the block mean.
      this.mean.set(delta.subarray(0, d));
      this.kernel.update(nb);
      this.cubic.set(blockCubic.subarray(0, d));
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
    // S = S_A + S_B + (nA nb / n) δδᵀ: the rank-1 term rides along as one more block row; the
    // same pass over S gives S_A δ (S before the update).
    const weight = Math.sqrt((nA * nb) / n);
    const correction = nb * size;
    for (let i = 0; i < d; i++) y[correction + i] = weight * delta[i];
    this.kernel.vector.set(delta);
    this.kernel.update(nb + 1, true);
    const product = this.kernel.product; // S_A δ
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
    this.scatterTrace += blockTrace + ((nA * nb) / n) * deltaSq;
    this.count = n;
    this.buffered = 0;
  }

  /** With `final`, the scatter is formed in the kernel's memory where that may be handed on (the accumulator is then done). */
  snapshot(final: boolean): ClassMoments {
    const d = this.d;
    const mean = new Float64Array(d);
    for (let i = 0; i < d; i++) mean[i] = this.shift[i] + this.mean[i];
    const scatter = final && this.kernel.scatterOwnable ? symmetricInPlace(this.kernel.scatter, this.size, d) : symmetricFromUpper(this.kernel.scatter, this.size, d);
    return {
      label: this.label,
      count: this.count,
      mean,
      scatter,
      min: this.min.slice(0, d),
      max: this.max.slice(0, d),
      cubic: this.cubic.slice(),
      quartic: this.quartic,
    };
  }
}

/**
 * The full d × d symmetric matrix written over the size × size one whose upper triangle it is
 * (returned: a view of its first d² entries). Rows move to stride d first (row i's upper part to
 * i·d + i, in increasing i: a row's new place ends at (i + 1)·d, before the next row's old start
 * (i + 1)·size + i + 1, so nothing is overwritten before it is moved), then the lower triangle is
 * written from the upper one; the lower triangle's old contents are never read. On this machine's
 * memory a fresh d × d matrix costs more to touch than to fill: at d = 1000 and 10 classes a copy
 * is 80 MB of first-touched pages.
 */
function symmetricInPlace(upper: Float64Array, size: number, d: number): Float64Array {
  if (size !== d) for (let i = 0; i < d; i++) upper.copyWithin(i * d + i, i * size + i, i * size + d);
  const out = upper.subarray(0, d * d);
  mirrorUpper(out, d);
  return out;
}

/** One streaming pass of clean rows into per-class moments. */
export class MomentsAccumulator {
  private readonly d: number;
  private readonly classes: ClassAccumulator[] = [];
  private readonly byLabel = new Map<string, ClassAccumulator>();

  private readonly blockRows: number;
  private finished = false;

  constructor(readonly features: string[]) {
    this.d = features.length;
    this.blockRows = blockRowsFor(this.d);
  }

  /**
   * Adds `rows` rows: `values` is rows × d row-major, with no NaN or ±Infinity (one is reported as
   * a DataError naming the class and column); `classIds[r]` indexes the caller's label dictionary
   * `labels`, which may grow between calls.
   */
  add(values: Float64Array, classIds: Int32Array, rows: number, labels: readonly string[]): void {
    if (this.finished) throw new Error('the moments accumulator is finished: nothing can be added');
    const d = this.d;
    const local: (ClassAccumulator | undefined)[] = new Array(labels.length);
    for (let r = 0; r < rows; r++) {
      const id = classIds[r];
      let target = local[id];
      if (target === undefined) {
        if (!(id >= 0 && id < labels.length)) throw new RangeError(`class id ${id} is outside the label dictionary (${labels.length} labels)`);
        const label = labels[id];
        target = this.byLabel.get(label);
        if (target === undefined) {
          target = new ClassAccumulator(label, d, this.features, this.blockRows);
          this.byLabel.set(label, target);
          this.classes.push(target);
        }
        local[id] = target;
      }
      const base = r * d;
      const t = target.buffered;
      const block = target.block;
      const at = t * target.size;
      for (let i = 0; i < d; i++) block[at + i] = values[base + i];
      target.buffered = t + 1;
      if (t + 1 === this.blockRows) target.flush();
    }
  }

  /** The moments so far (buffers are flushed; adding may continue afterwards). */
  result(): Moments {
    for (const c of this.classes) c.flush();
    return { features: [...this.features], classes: this.classes.map((c) => c.snapshot(false)) };
  }

  /**
   * The moments at the end of the pass: as result(), but each class's scatter is, where the
   * kernel allows it (ScatterKernel.scatterOwnable), the kernel's own memory made symmetric in
   * place rather than a copy. With WebAssembly it is a SharedArrayBuffer, which postMessage shares
   * with the receiving thread instead of copying; mergeMomentsInPlace may then write into it.
   * Nothing may be added afterwards.
   */
  finish(): Moments {
    for (const c of this.classes) c.flush();
    const classes = this.classes.map((c) => c.snapshot(true));
    this.classes.length = 0;
    this.byLabel.clear();
    this.finished = true;
    return { features: [...this.features], classes };
  }
}
