/**
 * k-fold cross-validation models from one pass over the rows. Per fold only the pooled
 * within-class scatter of the fold's rows (d × d) and per class its count and mean are kept, so
 * memory is kFolds·d² + kFolds·K·d, not kFolds·K·d². A fold's training set is the total minus the
 * fold: per class n_R = n_T − n_P, m_R = m_T + (n_P/n_R)(m_T − m_P), and pooled
 *   S_W,R = S_W,T − S_W,P − Σ_c (n_P n_T / n_R) e_P e_Pᵀ,   e_P = m_P − m_T
 * (Chan's merge formula solved for one side; moments.ts). Each fold is solved with solvePooled and
 * its rows are classified with that fold's model.
 *
 * Solver and shrinkage: every fold uses the full fit's solver as resolved (auto decides once, on
 * all rows), and with shrinkage the full fit's Ledoit–Wolf intensity α (like leave-one-out), its
 * target μ = tr(S_W,R)/(r·n_R) being the training set's own. A per-fold intensity would need
 * Σ‖z‖⁴ of the training set, centred on the training class means; that depends on e_Pᵀ S_P,c e_P
 * for each class's fold part S_P,c, i.e. on the kFolds·K·d² per-class fold scatters this module
 * exists not to keep.
 *
 * Rows are buffered per fold, 64 at a time, each centred on its class's block mean before one
 * blocked cross-product update; the class-mean corrections ride along as extra block rows.
 */
import type { Classifier } from './classify';
import { createClassifier } from './classify';
import { DataError } from './errors';
import { scoringModelOf, solveLda, solvePooled, type LdaOptions, type LdaSolution, type PooledMoments, type ScoringModel } from './lda';
import { createScatterKernel, symmetricFromUpper, type ScatterKernel } from './crossProductKernel';
import type { Moments } from './moments';

const BLOCK_ROWS = 64;

interface FoldState {
  /**
   * Its `scatter` (size × size, upper triangle) is the pooled within-class scatter of the fold's
   * rows; its `block` ((2·BLOCK_ROWS) × size, row-major) the raw rows, then centred rows and
   * correction rows (crossProductKernel.ts).
   */
  kernel: ScatterKernel;
  /** Per class index: count and mean relative to the class's shift. */
  counts: number[];
  means: Float64Array[];
  classes: Int32Array;
  buffered: number;
}

/** One fold's rows: their pooled within-class scatter (d × d full) and per label count and mean. */
export interface FoldPart {
  withinScatter: Float64Array;
  counts: Map<string, number>;
  means: Map<string, Float64Array>;
}

/** What foldClassifiers needs: a FoldMomentsAccumulator, or fold parts merged from a parallel scan. */
export interface FoldParts {
  readonly features: string[];
  readonly kFolds: number;
  parts(): FoldPart[];
}

/** Per fold: the pooled within-class scatter and per-class counts and means (see the module comment). */
export class FoldMomentsAccumulator implements FoldParts {
  private readonly d: number;
  private readonly folds: FoldState[];
  private readonly labels: string[] = [];
  private readonly byLabel = new Map<string, number>();
  private readonly shifts: Float64Array[] = [];
  private slotOf = new Int32Array(8);
  /** The kernels' row length (d rounded up to the kernel's tile; the padding columns stay 0). */
  private readonly size: number;
  private blockSums = new Float64Array(0);
  private readonly columnTotals: Float64Array;

  constructor(
    readonly features: string[],
    readonly kFolds: number,
  ) {
    if (!Number.isInteger(kFolds) || kFolds < 2) throw new DataError('bad-option', `k-fold cross-validation needs at least 2 folds, not ${kFolds}.`);
    this.d = features.length;
    this.columnTotals = new Float64Array(this.d);
    // A block holds its rows and a correction row per class present in it.
    this.folds = Array.from({ length: kFolds }, () => {
      const kernel = createScatterKernel(this.d, 2 * BLOCK_ROWS);
      return { kernel, counts: [], means: [], classes: new Int32Array(BLOCK_ROWS), buffered: 0 };
    });
    this.size = this.folds[0]!.kernel.size;
  }

  /** Rows as for MomentsAccumulator.add, with each row's fold (0..kFolds−1). */
  add(values: Float64Array, classIds: Int32Array, rows: number, labels: readonly string[], folds: Int32Array): void {
    const d = this.d;
    const local = new Int32Array(labels.length).fill(-1);
    for (let r = 0; r < rows; r++) {
      const id = classIds[r];
      let c = local[id];
      if (c < 0) {
        if (!(id >= 0 && id < labels.length)) throw new RangeError(`class id ${id} is outside the label dictionary (${labels.length} labels)`);
        c = this.classIndex(labels[id], values.subarray(r * d, (r + 1) * d));
        local[id] = c;
      }
      const f = folds[r];
      if (!(f >= 0 && f < this.kFolds)) throw new RangeError(`fold ${f} is outside 0..${this.kFolds - 1}`);
      const fold = this.folds[f];
      const t = fold.buffered;
      const base = r * d;
      const at = t * this.size;
      for (let i = 0; i < d; i++) fold.kernel.block[at + i] = values[base + i];
      fold.classes[t] = c;
      fold.buffered = t + 1;
      if (t + 1 === BLOCK_ROWS) this.flush(fold);
    }
  }

  private classIndex(label: string, firstRow: Float64Array): number {
    let c = this.byLabel.get(label);
    if (c === undefined) {
      c = this.labels.length;
      this.byLabel.set(label, c);
      this.labels.push(label);
      this.shifts.push(Float64Array.from(firstRow));
      for (const fold of this.folds) {
        fold.counts.push(0);
        fold.means.push(new Float64Array(this.d));
      }
    }
    return c;
  }

  private flush(fold: FoldState): void {
    const nb = fold.buffered;
    if (nb === 0) return;
    const d = this.d;
    const size = this.size;
    const y = fold.kernel.block;
    const K = this.labels.length;
    // Slot of each class present in the block, and the block sums per slot (slots × d).
    const slots: number[] = [];
    if (this.slotOf.length < K) this.slotOf = new Int32Array(2 * K);
    const slotOf = this.slotOf;
    slotOf.fill(-1);
    const slotCounts: number[] = [];
    for (let t = 0; t < nb; t++) {
      const c = fold.classes[t];
      if (slotOf[c] < 0) {
        slotOf[c] = slots.length;
        slots.push(c);
        slotCounts.push(0);
      }
      slotCounts[slotOf[c]]++;
    }
    if (this.blockSums.length < slots.length * d) this.blockSums = new Float64Array(Math.max(slots.length, 8) * d);
    const sums = this.blockSums;
    sums.fill(0, 0, slots.length * d);
    const totals = this.columnTotals.fill(0);
    for (let t = 0; t < nb; t++) {
      const row = t * size;
      const c = fold.classes[t];
      const shift = this.shifts[c];
      const slot = slotOf[c] * d;
      for (let i = 0; i < d; i++) {
        const v = y[row + i] - shift[i];
        y[row + i] = v;
        sums[slot + i] += v;
        totals[i] += v;
      }
    }
    for (let i = 0; i < d; i++) {
      if (!Number.isFinite(totals[i])) {
        throw new DataError('non-finite-value', `A value in column "${this.features[i]}" is not a finite number.`, { column: this.features[i] });
      }
    }
    for (let s = 0; s < slots.length; s++) for (let i = 0; i < d; i++) sums[s * d + i] /= slotCounts[s];
    // Centre each row on its class's block mean.
    for (let t = 0; t < nb; t++) {
      const row = t * size;
      const slot = slotOf[fold.classes[t]] * d;
      for (let i = 0; i < d; i++) y[row + i] -= sums[slot + i];
    }
    // Merge each class's block part into the fold's running class mean: the scatter gains
    // (n_A n_B / n) δδᵀ, appended as a row √(n_A n_B / n) δ.
    let extra = 0;
    for (let s = 0; s < slots.length; s++) {
      const c = slots[s];
      const nA = fold.counts[c];
      const nB = slotCounts[s];
      const n = nA + nB;
      const mean = fold.means[c];
      const weight = Math.sqrt((nA * nB) / n);
      const correction = (nb + extra) * size;
      for (let i = 0; i < d; i++) {
        const delta = sums[s * d + i] - mean[i];
        if (nA > 0) y[correction + i] = weight * delta;
        mean[i] += (nB / n) * delta;
      }
      if (nA > 0) extra++;
      fold.counts[c] = n;
    }
    fold.kernel.update(nb + extra);
    fold.buffered = 0;
  }

  /** The fold parts: per fold the pooled within-class scatter (d × d full) and per label count and mean. */
  parts(): FoldPart[] {
    const d = this.d;
    const size = this.size;
    return this.folds.map((fold) => {
      this.flush(fold);
      const withinScatter = symmetricFromUpper(fold.kernel.scatter, size, d);
      const counts = new Map<string, number>();
      const means = new Map<string, Float64Array>();
      this.labels.forEach((label, c) => {
        if (fold.counts[c] === 0) return;
        counts.set(label, fold.counts[c]);
        means.set(
          label,
          Float64Array.from(fold.means[c], (v, i) => this.shifts[c][i] + v),
        );
      });
      return { withinScatter, counts, means };
    });
  }
}

/**
 * One fold's model, solved on total − fold: what its classifier needs and nothing more (a few
 * vectors and r × k directions), so that a parallel pass 2 posts these to its threads rather than
 * the moments they were solved from (K + kFolds matrices of d × d) and solves each fold once.
 */
export interface FoldModel {
  model: ScoringModel;
  /** Index of each of the model's classes in the full solution's class order. */
  toFull: Int32Array;
  /** Classes of the full solution. */
  classes: number;
}

/**
 * One classifier per fold, trained on total − fold (see the module comment). Posteriors and the
 * returned index are in the full solution's class order (a class absent from a training set gets
 * posterior 0). `full` is the fit on all rows (solved here when not given).
 */
export function foldClassifiers(total: Moments, folds: FoldParts, options: LdaOptions, full?: LdaSolution): Classifier[] {
  return solveFoldModels(total, folds, options, full).map(foldClassifier);
}

/** A fold's classifier from its model (cheap: nothing is solved). */
export function foldClassifier(fold: FoldModel): Classifier {
  const inner = createClassifier(fold.model);
  const { toFull, classes } = fold;
  const posterior = new Float64Array(fold.model.labels.length);
  return {
    predict(x: Float64Array, out: Float64Array): number {
      const predicted = inner.predict(x, posterior);
      out.fill(0, 0, classes);
      for (let i = 0; i < toFull.length; i++) out[toFull[i]] = posterior[i];
      return toFull[predicted];
    },
  };
}

/** The fold models foldClassifiers classifies with: one per fold, solved on total − fold. */
export function solveFoldModels(total: Moments, folds: FoldParts, options: LdaOptions, full?: LdaSolution): FoldModel[] {
  const solution = full ?? solveLda(total, options);
  const fixed: LdaOptions =
    solution.solver === 'shrinkage'
      ? { solver: 'shrinkage', priors: options.priors, shrinkageIntensity: solution.shrinkage, conditionNumber: false }
      : { solver: 'exact', priors: options.priors, conditionNumber: false };
  const d = total.features.length;
  const sameFeatures = folds.features.length === d && folds.features.every((f, i) => f === total.features[i]);
  if (!sameFeatures) throw new DataError('moments-mismatch', 'The fold moments and the total moments are over different features.');
  const totalWithin = new Float64Array(d * d);
  for (const c of total.classes) for (let k = 0; k < d * d; k++) totalWithin[k] += c.scatter[k];
  return folds.parts().map((part) => {
    const withinScatter = Float64Array.from(totalWithin);
    for (let k = 0; k < d * d; k++) withinScatter[k] -= part.withinScatter[k];
    const training: PooledMoments = {
      features: [...total.features],
      labels: [],
      counts: [],
      means: [],
      withinScatter,
      quartic: null,
      magnitude: new Float64Array(d),
      singleValue: new Uint8Array(d).fill(1),
      singleValueWithinClasses: new Uint8Array(d).fill(1),
    };
    const lo = new Float64Array(d).fill(Infinity);
    const hi = new Float64Array(d).fill(-Infinity);
    for (const c of total.classes) {
      const nP = part.counts.get(c.label) ?? 0;
      if (nP > c.count) throw new DataError('moments-mismatch', `A fold holds ${nP} rows of class "${c.label}", more than the ${c.count} in all.`);
      const nR = c.count - nP;
      if (nR === 0) continue;
      const mean = Float64Array.from(c.mean);
      if (nP > 0) {
        const p = part.means.get(c.label)!;
        const weight = (nP * c.count) / nR;
        const e = Float64Array.from(p, (v, i) => v - c.mean[i]);
        for (let i = 0; i < d; i++) {
          mean[i] = c.mean[i] - (nP / nR) * e[i];
          const row = i * d;
          for (let j = 0; j < d; j++) withinScatter[row + j] -= weight * e[i] * e[j];
        }
      }
      training.labels.push(c.label);
      training.counts.push(nR);
      training.means.push(mean);
      for (let j = 0; j < d; j++) {
        training.magnitude[j] = Math.max(training.magnitude[j], Math.abs(c.min[j]), Math.abs(c.max[j]));
        if (c.min[j] !== c.max[j]) training.singleValueWithinClasses[j] = 0;
        lo[j] = Math.min(lo[j], c.min[j]);
        hi[j] = Math.max(hi[j], c.max[j]);
      }
    }
    for (let j = 0; j < d; j++) if (lo[j] !== hi[j]) training.singleValue[j] = 0;
    const model = solvePooled(training, fixed);
    return { model: scoringModelOf(model), toFull: Int32Array.from(model.labels, (l) => solution.labels.indexOf(l)), classes: solution.labels.length };
  });
}
