/**
 * Pass 2 over the rows, with the model fitted: training predictions and the confusion matrix,
 * cross-validated predictions (exact leave-one-out by downdating, or the fold models), the list of
 * misclassified rows, the plot sample with its discriminant and principal-component scores, the
 * discriminant scores of every row for the caller (`--scores`), and the exact count of each
 * feature's majority value. Rows are judged used or dropped exactly as in pass 1.
 *
 * A misclassified row's `posterior` is the posterior probability of the class it was predicted as.
 */
import type { Classifier, LeaveOneOut } from '../classify';
import { softmaxInPlace } from '../classify';
import type { FoldParts } from '../foldModels';
import type { Moments } from '../moments';
import { FoldAssigner } from '../folds';
import type { LdaOptions, LdaSolution } from '../lda';
import { scoreRow } from '../lda';
import type { PcaSolution } from '../pca';
import { pcaScoreRow } from '../pca';
import { PlotSampler } from '../plotSample';
import { scanTable } from '../read/index';
import type { ByteRange, RowBatch, TableInspection } from '../read/types';
import type { ByteSource, RunControl } from '../source';
import type { FitReport } from '../types';
import { CandidateCount } from './majorityValue';
import { SampleCollector, unpackSamples, type PackedSample } from './sampleCollector';
import { PassControl } from './passControl';

/** Discriminant scores of a batch of rows, for the caller: `rows × k`, NaN for rows not used. */
export interface ScoreBatch {
  /** 0-based data row of the first row; rows are consecutive. */
  firstRow: number;
  rows: number;
  k: number;
  scores: Float64Array;
}

/**
 * The cross-validation models; `trainedOn` is what they were built from, so that a parallel pass
 * can rebuild the same models in each worker (models are functions and do not cross threads; for
 * k-fold it posts the fold models solved from `trainedOn`, not `trainedOn` itself).
 * analyze() builds `model` and `classifiers` on first read (getters), which a parallel pass 2 never
 * makes: see lazyCrossValidator in analyze.ts.
 */
export type CrossValidator =
  | { kind: 'loo'; model: LeaveOneOut; trainedOn?: { moments: Moments } }
  | { kind: 'kfold'; classifiers: Classifier[]; seed: number; trainedOn?: { moments: Moments; folds: FoldParts; options: LdaOptions } }
  | { kind: 'none' };

export interface SecondPassInput {
  source: ByteSource;
  inspection: TableInspection;
  label: number;
  features: number[];
  solution: LdaSolution;
  pca: PcaSolution;
  classifier: Classifier;
  crossValidator: CrossValidator;
  /** Scan label ids in order of first appearance among used rows (from pass 1), for the fold replay. */
  appearance: readonly number[];
  /** Used rows per class, in the solution's class order. */
  classCounts: readonly number[];
  plotQuota: readonly number[];
  /** Indices (into the features) of the features whose values the plot sample keeps. */
  topFeatures: number[];
  majorityCandidates: Float64Array;
  misclassifiedLimit: number;
  /** Stop after this many data rows (the provisional cut of pass 1). */
  rowLimit: number | null;
  onScores?: (batch: ScoreBatch) => void;
  /** Text: only the rows that start in this byte range (one share of a parallel scan). */
  range?: ByteRange;
  /** Parquet: only these data rows (one share of a parallel scan). */
  rows?: { start: number; end: number };
  /**
   * For a range that is not the start of the file: the used rows before it, per class in the
   * solution's order (plot sample) and per order of first appearance (folds).
   */
  start?: { classRows: readonly number[]; foldRows?: readonly number[] };
  /** The labels in order of first appearance among used rows; replaces `appearance` when the scan's label ids are its own (a range). */
  appearanceLabels?: readonly string[];
  /** Return the plot sample as `packedSample` (flat arrays, to join with other ranges' later). */
  packSample?: boolean;
}

export interface SecondPassResult {
  confusion: number[][];
  crossValidatedConfusion: number[][] | null;
  misclassified: FitReport['misclassified'];
  misclassifiedTotal: number;
  sample: Omit<FitReport['sample'], 'topFeatures'> & { topFeatureValues: number[][] };
  /** With `packSample`: the sample in flat arrays (and `sample` empty). */
  packedSample?: PackedSample;
  majorityCounts: Float64Array;
}

function square(K: number): number[][] {
  return Array.from({ length: K }, () => new Array<number>(K).fill(0));
}

/** What changes from one share of the rows to the next (a parallel worker's ranges). */
export type SecondPassShare = Pick<SecondPassInput, 'range' | 'rows' | 'start'>;

export async function secondPass(input: SecondPassInput, control: RunControl | undefined): Promise<SecondPassResult> {
  return openSecondPass(input)(input, control);
}

/**
 * Pass 2 set up once for several shares of the rows (a parallel worker's ranges, scanned one after
 * the other, never two at once): the returned function scans one share. The batch callback is made
 * here, once, not per share: V8 folds a closure's captured constants into its optimised code only
 * while the closure is the one made from its source, and the per-row work ran ~17% slower on a
 * worker's second range when each share made its own.
 */
export function openSecondPass(input: Omit<SecondPassInput, keyof SecondPassShare>): (share: SecondPassShare, control: RunControl | undefined) => Promise<SecondPassResult> {
  const { solution, pca, classifier, crossValidator } = input;
  const d = input.features.length;
  const K = solution.labels.length;
  const k = solution.eigenvalues.length;
  const plotAxes = Math.min(k, 3);
  const classOfLabel = new Map(solution.labels.map((label, c) => [label, c]));
  const appearanceOrder = new Map(input.appearance.map((id, order) => [id, order]));
  const labelOrder = input.appearanceLabels ? new Map(input.appearanceLabels.map((label, order) => [label, order])) : null;
  // The models, read once (CrossValidator's may be built on this first read).
  const leaveOneOut = crossValidator.kind === 'loo' ? crossValidator.model : null;
  const foldModels = crossValidator.kind === 'kfold' ? crossValidator.classifiers : null;
  const posterior = new Float64Array(K);
  const x = new Float64Array(d);
  const ld = new Float64Array(k);
  const pc = new Float64Array(2);
  let scores = new Float64Array(0);
  const wantScores = input.onScores !== undefined;
  const { misclassifiedLimit, topFeatures } = input;

  // One share's state, set at the start of each scan.
  let assigner: FoldAssigner | null = null;
  let sampler: PlotSampler;
  let majority: CandidateCount;
  let confusion: number[][];
  let cvConfusion: number[][] | null;
  // The misclassified rows listed, as numbers (the report's entries are made after the scan, out
  // of the row loop): row, line (-1 when none), true and predicted class, posterior; grown as
  // needed up to the limit (which may be large).
  let listed = new Float64Array(5 * Math.min(misclassifiedLimit, 128));
  let misclassifiedTotal = 0;
  let sample: SampleCollector;
  let classOfId: number[] = [];
  let orderOfId: number[] = [];
  let pass: PassControl;

  // The rows of a batch, in a function of their own: V8 compiles the loop while the first batch
  // runs (on-stack replacement), and code after the loop in the same function would then be
  // compiled before it ever ran, and deoptimized when it first did (each thread of a parallel
  // pass, each pass: counted with --trace-deopt).
  const scoreRows = (values: Float64Array, labelIds: Int32Array, lines: Int32Array | undefined, firstRow: number, rows: number): void => {
    for (let i = 0; i < rows; i++) {
      const offset = i * d;
      const id = labelIds[i]!;
      let clean = id >= 0;
      for (let j = 0; clean && j < d; j++) {
        const v = values[offset + j]!;
        if (v !== v || v === Infinity || v === -Infinity) clean = false;
      }
      if (!clean) {
        if (wantScores) scores.fill(NaN, i * k, (i + 1) * k);
        continue;
      }
      const truth = classOfId[id]!;
      for (let j = 0; j < d; j++) x[j] = values[offset + j]!; // a copy: no view allocated per row
      scoreRow(solution, x, ld);
      if (wantScores) scores.set(ld, i * k);
      majority.count(values, offset);

      // Log scores where the models give them: the posterior (a softmax) is needed only for
      // the misclassified rows listed.
      let logScores = classifier.predictFromScores !== undefined;
      const predicted = logScores ? classifier.predictFromScores!(ld, posterior) : classifier.predict(x, posterior);
      confusion[truth]![predicted]! += 1;
      let judged = predicted;
      if (leaveOneOut) {
        logScores = leaveOneOut.logScores !== undefined;
        judged = logScores ? leaveOneOut.logScores!(x, truth, posterior) : leaveOneOut.predict(x, truth, posterior);
      } else if (foldModels) {
        const fold = assigner!.foldOf(orderOfId[id]!);
        judged = foldModels[fold]!.predict(x, posterior);
        logScores = false;
      }
      if (cvConfusion) cvConfusion[truth]![judged]! += 1;
      const row = firstRow + i;
      const line = lines === undefined ? undefined : lines[i];
      if (judged !== truth) {
        const index = misclassifiedTotal++;
        if (index < misclassifiedLimit) listMisclassified(index, row, line, truth, judged, logScores);
      }

      sample.total++;
      if (sampler.take(truth)) {
        pcaScoreRow(pca, x, pc);
        sample.add(row, line, truth, ld, pc, values, offset, topFeatures);
      }
    }
  };

  /** Keeps the `index`-th misclassified row of the share (index < misclassifiedLimit). */
  const listMisclassified = (index: number, row: number, line: number | undefined, truth: number, judged: number, logScores: boolean): void => {
    if (logScores) softmaxInPlace(posterior, K);
    const at = 5 * index;
    if (at === listed.length) {
      const grown = new Float64Array(Math.min(2 * listed.length, 5 * misclassifiedLimit));
      grown.set(listed);
      listed = grown;
    }
    listed[at] = row;
    listed[at + 1] = line === undefined ? -1 : line;
    listed[at + 2] = truth;
    listed[at + 3] = judged;
    listed[at + 4] = posterior[judged]!;
  };

  const misclassifiedList = (): FitReport['misclassified'] =>
    Array.from({ length: Math.min(misclassifiedTotal, misclassifiedLimit) }, (_, i) => {
      const at = 5 * i;
      const entry: FitReport['misclassified'][number] = {
        row: listed[at]!,
        label: solution.labels[listed[at + 2]!]!,
        predicted: solution.labels[listed[at + 3]!]!,
        posterior: listed[at + 4]!,
      };
      if (listed[at + 1]! >= 0) entry.line = listed[at + 1]!;
      return entry;
    });

  const onBatch = (batch: RowBatch, labels: readonly string[]): void => {
    while (classOfId.length < labels.length) classOfId.push(classOfLabel.get(labels[classOfId.length]!) ?? -1);
    while (orderOfId.length < labels.length) {
      const id = orderOfId.length;
      orderOfId.push((labelOrder ? labelOrder.get(labels[id]!) : appearanceOrder.get(id)) ?? -1);
    }
    let rows = batch.rows;
    if (input.rowLimit !== null) rows = Math.max(0, Math.min(rows, input.rowLimit - batch.firstRow));
    if (input.onScores && scores.length < rows * k) scores = new Float64Array(batch.rows * k);
    if (!batch.lines) sample.hasLines = false;
    scoreRows(batch.values, batch.labels, batch.lines, batch.firstRow, rows);
    if (input.onScores && rows > 0) input.onScores({ firstRow: batch.firstRow, rows, k, scores: scores.subarray(0, rows * k) });
    if (input.rowLimit !== null && batch.firstRow + batch.rows >= input.rowLimit) pass.stop();
  };

  return async (share, control) => {
    assigner = crossValidator.kind === 'kfold' ? new FoldAssigner(foldModels!.length, crossValidator.seed) : null;
    if (assigner && share.start?.foldRows) share.start.foldRows.forEach((rows, order) => assigner!.skip(order, rows));
    sampler = new PlotSampler(input.classCounts, input.plotQuota, share.start?.classRows);
    majority = new CandidateCount(input.majorityCandidates);
    confusion = square(K);
    cvConfusion = crossValidator.kind === 'none' ? null : square(K);
    misclassifiedTotal = 0;
    sample = new SampleCollector(plotAxes, input.topFeatures.length);
    // The scan's label ids are its own.
    classOfId = [];
    orderOfId = [];
    pass = new PassControl('rows', control);
    await pass.run(() =>
      scanTable({
        source: input.source,
        inspection: input.inspection,
        plan: { label: input.label, features: input.features },
        control: pass.control,
        ...(share.range ? { range: share.range } : {}),
        ...(share.rows ? { rows: share.rows } : {}),
        ...(input.rowLimit !== null ? { rowLimit: input.rowLimit } : {}),
        onBatch,
      }),
    );
    const packed = sample.packed();
    return {
      confusion,
      crossValidatedConfusion: cvConfusion,
      misclassified: misclassifiedList(),
      misclassifiedTotal,
      sample: input.packSample ? unpackSamples([]) : unpackSamples([packed]),
      ...(input.packSample ? { packedSample: packed } : {}),
      majorityCounts: majority.counts,
    };
  };
}
