/**
 * The row passes of an analysis, in one thread (firstPass, secondPass) or spread over the workers
 * of a RangeScanner. The parallel version splits splittable text at row starts into ranges, and
 * Parquet between row groups (or within them when they are few: see splitSource) — several ranges per
 * worker, so a worker slowed by other load does not hold up the rest — and runs:
 *
 *  pass 1   each range's cell checks and used-row counts; each worker's moments over its ranges.
 *           Rows are numbered relative to each range and placed once all ranges are in.
 *  folds    (k-fold cross-validation only) each range's fold parts: a class's fold sequence
 *           depends on how many of its rows came before, which pass 1 has now told, so the
 *           folds take one more pass rather than a pass-1 range waiting for the ranges before it.
 *  pass 2   predictions, cross-validation, plot sample and scores, each range started at its
 *           exact row, line and per-class position.
 *
 * The report equals the single-thread report: counts exactly, moments and what follows from them
 * to rounding (mergeParts.ts). Whatever the parallel scan cannot reproduce exactly — a reader
 * error (its line would be relative to the range), skipped ragged rows — is left to the single
 * thread: the passes throw ParallelFallback and the analysis starts over in one thread.
 */
import { DataError } from '../errors';
import { crossProductUpdate, mirrorUpper } from '../linalg';
import { solveFoldModels, type FoldPart, type FoldParts } from '../foldModels';
import { firstPass } from '../pipeline/firstPass';
import type { FirstPassPlan, FirstPassResult } from '../pipeline/firstPass';
import { DUPLICATE_CHECK_CAPACITY } from '../pipeline/duplicateRows';
import { secondPass } from '../pipeline/secondPass';
import type { SecondPassInput, SecondPassResult } from '../pipeline/secondPass';
import { parquetRowGroups, shareParquetDictionaries } from '../read/parquet';
import { alignToRowStart } from '../read/textRange';
import type { ByteRange, TableInspection } from '../read/types';
import type { ByteSource, RunControl } from '../source';
import { FirstPartsMerger, mergeSecondParts, type RangeLayout, type SourceShare } from './mergeParts';
import type { CrossValidationModel, FirstRangePart, FirstWorkerResult, FoldWorkerResult, RangeScanner, SecondRangePart } from './rangeScanner';

/** The passes analyze.ts runs, with the signatures of firstPass and secondPass. */
export interface RowPasses {
  first(source: ByteSource, inspection: TableInspection, plan: FirstPassPlan, control: RunControl | undefined, rowLimit: number | null): Promise<FirstPassResult>;
  second(input: SecondPassInput, control: RunControl | undefined): Promise<SecondPassResult>;
}

export const singleThreadPasses: RowPasses = { first: firstPass, second: secondPass };

/** Thrown by the parallel passes when only a single-thread analysis gives the exact result. */
export class ParallelFallback extends Error {
  override readonly name = 'ParallelFallback';
}

/**
 * Text ranges shrink as the split goes on (guided self-scheduling, Polychronopoulos & Kuck 1987):
 * each is the rest of the file over GUIDED_SHARES · workers, within MIN–MAX_RANGE_BYTES. Large
 * ranges first keep the per-range costs low; small ones last let the threads finish together
 * (a thread that takes the last 64 MiB range alone leaves the others idle for a second).
 */
const GUIDED_SHARES = 4;
const MIN_RANGE_BYTES = 2 * 1024 * 1024;
const MAX_RANGE_BYTES = 64 * 1024 * 1024;

/** The length of the next text range when `rest` bytes are left to split among `workers` (see above). */
export function guidedRangeBytes(rest: number, workers: number): number {
  return Math.min(MAX_RANGE_BYTES, Math.max(MIN_RANGE_BYTES, Math.ceil(rest / (GUIDED_SHARES * Math.max(1, workers)))));
}

/** Whether a parallel scan of this source can give the single-thread result (Parquet: see splitSource). */
export function canScanInParallel(scanner: RangeScanner | undefined, inspection: TableInspection, size: number): scanner is RangeScanner {
  return scanner !== undefined && scanner.workers > 1 && (inspection.format === 'parquet' || inspection.splittable) && size >= scanner.minimumBytes;
}

/**
 * The shares of a source: text split at row starts; Parquet split between row groups in shrinking
 * shares of whole groups, or when there are fewer than two groups per worker, each group split
 * into one run of rows per worker; null when there is only one share.
 */
async function splitSource(source: ByteSource, inspection: TableInspection, scanner: RangeScanner): Promise<SourceShare[] | null> {
  if (inspection.format !== 'parquet') {
    return (await splitAtRowStarts(source, scanner.workers, scanner.rangeBytes)).map((range) => ({ range, bytes: range.end - range.start }));
  }
  const groups = await parquetRowGroups(source);
  const total = groups.reduce((a, b) => a + b, 0);
  if (groups.length < 2 * scanner.workers) {
    // Too few groups to share out whole: each group in `workers` runs of rows. A run that starts
    // inside a group passes over the rows before it (decompressed, not decoded into values).
    const shares: SourceShare[] = [];
    // One group: every thread needs all its dictionaries; hold them once.
    const dictionaries = groups.length === 1 ? await shareParquetDictionaries(source, Math.floor(groups[0]! / Math.min(scanner.workers, groups[0]!))) : null;
    let start = 0;
    for (const count of groups) {
      const pieces = Math.min(scanner.workers, count);
      for (let i = 0; i < pieces; i++) {
        const from = start + Math.floor((i * count) / pieces);
        const to = start + Math.floor(((i + 1) * count) / pieces);
        if (to > from) shares.push({ rows: { start: from, end: to }, bytes: (source.size * (to - from)) / Math.max(1, total), ...(dictionaries ? { dictionaries } : {}) });
      }
      start += count;
    }
    return shares.length < 2 ? null : shares;
  }
  // Whole groups in shrinking shares, as text ranges shrink (GUIDED_SHARES): the last shares are
  // single groups, so the threads finish together.
  const shares: SourceShare[] = [];
  let start = 0;
  let rows = 0;
  groups.forEach((count, g) => {
    rows += count;
    if (rows >= (total - start) / (GUIDED_SHARES * scanner.workers) || g === groups.length - 1) {
      shares.push({ rows: { start, end: start + rows }, bytes: (source.size * rows) / Math.max(1, total) });
      start += rows;
      rows = 0;
    }
  });
  return shares.length < 2 ? null : shares;
}

/**
 * The source split at row starts (empty ranges dropped): into about size / preferredBytes equal
 * ranges when the caller names a size (tests), else in shrinking ranges (GUIDED_SHARES above).
 */
export async function splitAtRowStarts(source: ByteSource, workers: number, preferredBytes?: number): Promise<ByteRange[]> {
  const size = source.size;
  const cuts: number[] = [];
  if (preferredBytes !== undefined) {
    const count = Math.max(1, Math.round(size / preferredBytes));
    for (let i = 1; i < count; i++) cuts.push(Math.floor((i * size) / count));
  } else {
    for (let at = 0; ; ) {
      const rest = size - at;
      const length = guidedRangeBytes(rest, workers);
      // A last piece smaller than the minimum joins the range before it.
      if (rest - length < MIN_RANGE_BYTES) break;
      at += length;
      cuts.push(at);
    }
  }
  const bounds = [0];
  for (const cut of cuts) {
    const at = await alignToRowStart(source, cut);
    if (at > bounds[bounds.length - 1]! && at < size) bounds.push(at);
  }
  bounds.push(size);
  return bounds.slice(0, -1).map((start, i) => ({ start, end: bounds[i + 1]! }));
}

/** A worker's DataError or a reader error: leave the file to the single thread, which reports it with its real line. */
function fallbackOn(error: unknown): never {
  if (error instanceof DataError) throw new ParallelFallback(`${error.code}: ${error.message}`);
  throw error;
}

export function parallelPasses(scanner: RangeScanner): RowPasses {
  // The layout of the last pass 1, for the fold pass and pass 2 over the same columns.
  let last: { features: string; layout: RangeLayout; result: FirstPassResult } | null = null;
  const key = (features: readonly number[]): string => features.join(',');

  async function runFirst(source: ByteSource, inspection: TableInspection, plan: FirstPassPlan, control: RunControl | undefined, ranges: SourceShare[]): Promise<FirstPassResult> {
    // Parts wait here until the ranges before them are in, then join the merger (and are dropped).
    const parts: (FirstRangePart | undefined)[] = new Array(ranges.length);
    const merger = new FirstPartsMerger(plan.featureNames);
    let ragged = false;
    const usedDone: number[] = new Array(ranges.length).fill(-1);
    const columns = { label: plan.label, features: plan.features, featureNames: plan.featureNames };
    const task = (index: number) => {
      // Hash for the duplicate check only the rows the single-thread check could still reach.
      let before = 0;
      for (let i = 0; i < index; i++) if (usedDone[i]! > 0) before += usedDone[i]!;
      const share = ranges[index]!;
      return {
        // Text ranges after the first number their rows and lines from their own start.
        ...(share.range && index > 0 ? { ...share, range: { ...share.range, origin: { line: 1, row: 0 } } } : share),
        duplicateBudget: Math.max(0, DUPLICATE_CHECK_CAPACITY - before),
      };
    };
    const onPart = (index: number, part: unknown): void => {
      const first = part as FirstRangePart;
      usedDone[index] = first.used;
      if (first.summary.raggedRows > 0) ragged = true;
      parts[index] = first;
      while (!ragged && merger.added < ranges.length && parts[merger.added]) {
        const next = merger.added;
        merger.add(parts[next]!, ranges[next]!);
        parts[next] = undefined;
      }
    };
    const results = (await scanner.run({ kind: 'first', inspection, columns }, ranges.length, task, onPart, control).catch(fallbackOn)) as FirstWorkerResult[];
    if (ragged) throw new ParallelFallback('ragged rows skipped');
    if (merger.added !== ranges.length) throw new Error(`internal: ${ranges.length - merger.added} of ${ranges.length} range parts missing after pass 1`);
    const merged = merger.result(results.map((r) => r.moments));
    last = { features: key(plan.features), layout: merged.layout, result: merged.result };
    return merged.result;
  }

  async function runFolds(inspection: TableInspection, plan: FirstPassPlan, control: RunControl | undefined, layout: RangeLayout, first: FirstPassResult): Promise<FirstPassResult> {
    const folds = plan.folds!;
    const columns = { label: plan.label, features: plan.features, featureNames: plan.featureNames };
    const task = (index: number) => ({
      ...layout.ranges[index]!,
      foldRows: layout.appearance.map((label) => layout.usedBefore[index]!.get(label) ?? 0),
    });
    const results = (await scanner
      .run({ kind: 'folds', inspection, columns, folds, appearance: layout.appearance }, layout.ranges.length, task, () => undefined, control)
      .catch(fallbackOn)) as FoldWorkerResult[];
    // Pass 1's other figures are those of the pass before, over the same rows.
    return { ...first, moments: null, folds: mergeFoldParts(plan.featureNames, folds.count, results.map((r) => r.folds)) };
  }

  return {
    async first(source, inspection, plan, control, rowLimit) {
      if (rowLimit !== null || plan.range || plan.rows || !canScanInParallel(scanner, inspection, source.size)) return firstPass(source, inspection, plan, control, rowLimit);
      if (!plan.moments) {
        // Only the folds are wanted: from the layout of pass 1 over the same columns.
        if (plan.folds && last?.features === key(plan.features)) return runFolds(inspection, plan, control, last.layout, last.result);
        return firstPass(source, inspection, plan, control, rowLimit);
      }
      // Folds are collected after pass 1, when they are known to be needed (see the module comment).
      const shares = await splitSource(source, inspection, scanner);
      if (!shares) return firstPass(source, inspection, plan, control, rowLimit);
      return runFirst(source, inspection, plan, control, shares);
    },

    // Pass 2 is the analysis's last pass over the rows: the threads are released as soon as it
    // no longer needs them, before the parts are joined and the report built (which allocate most).
    async second(input, control) {
      const layout = last?.features === key(input.features) ? last.layout : null;
      const crossValidation = layout && input.rowLimit === null && !input.range && !input.rows ? crossValidationModel(input) : null;
      if (!layout || !crossValidation) {
        await scanner.release?.();
        return secondPass(input, control);
      }
      const classRowsBefore = (index: number): number[] => input.solution.labels.map((label) => layout.usedBefore[index]!.get(label) ?? 0);
      const foldRowsBefore = (index: number): number[] => layout.appearance.map((label) => layout.usedBefore[index]!.get(label) ?? 0);
      const parts: SecondRangePart[] = new Array(layout.ranges.length);
      let emitted = 0;
      const onPart = (index: number, part: unknown): void => {
        parts[index] = part as SecondRangePart;
        // Scores go to the caller in file order, as soon as the ranges before have come in.
        while (emitted < parts.length && parts[emitted]) {
          const scores = parts[emitted]!.scores;
          if (scores && input.onScores && scores.rows > 0) input.onScores({ firstRow: scores.firstRow, rows: scores.rows, k: scores.k, scores: scores.values });
          delete parts[emitted]!.scores;
          emitted++;
        }
      };
      await scanner
        .run(
          {
            kind: 'second',
            inspection: input.inspection,
            label: input.label,
            features: input.features,
            solution: input.solution,
            pca: input.pca,
            crossValidation,
            appearance: layout.appearance,
            classCounts: [...input.classCounts],
            plotQuota: [...input.plotQuota],
            topFeatures: input.topFeatures,
            majorityCandidates: input.majorityCandidates,
            misclassifiedLimit: input.misclassifiedLimit,
            scores: input.onScores !== undefined,
          },
          layout.ranges.length,
          (index) => ({
            ...layout.ranges[index]!,
            classRows: classRowsBefore(index),
            ...(crossValidation.kind === 'kfold' ? { foldRows: foldRowsBefore(index) } : {}),
          }),
          onPart,
          control,
        )
        .catch(fallbackOn);
      await scanner.release?.();
      return mergeSecondParts(parts, input.misclassifiedLimit);
    },
  };
}

/** The data the cross-validation models were built from, or null when the caller did not say. */
function crossValidationModel(input: SecondPassInput): CrossValidationModel | null {
  const cv = input.crossValidator;
  if (cv.kind === 'none') return { kind: 'none' };
  if (!cv.trainedOn) return null;
  if (cv.kind === 'loo') return { kind: 'loo', moments: cv.trainedOn.moments };
  const { moments, folds, options } = cv.trainedOn;
  return { kind: 'kfold', folds: solveFoldModels(moments, folds, options, input.solution), seed: cv.seed };
}

/**
 * One fold's parts from several workers: counts add, means weight by count, and the pooled
 * within-class scatter gains Σ_c (n_A n_B / n) δ_c δ_cᵀ per class (Chan et al.'s merge, moments.ts),
 * all classes' terms added in one pass over the d × d matrix. The first worker's parts are merged
 * into, in place.
 */
export function mergeFoldParts(features: string[], kFolds: number, workers: FoldPart[][]): FoldParts {
  const d = features.length;
  // The first worker's parts are the merge's start (they are this thread's own: a copy posted, or
  // FoldMomentsAccumulator.parts's): a fresh d × d matrix per fold would cost its first touch, some
  // 0.3 s at d = 1 000 and 10 folds on a virtual machine.
  const merged: FoldPart[] = workers[0] ?? Array.from({ length: kFolds }, () => ({ withinScatter: new Float64Array(d * d), counts: new Map(), means: new Map() }));
  for (const parts of workers.slice(1)) {
    parts.forEach((part, f) => {
      const into = merged[f]!;
      const scatter = into.withinScatter;
      for (let k = 0; k < d * d; k++) scatter[k]! += part.withinScatter[k]!;
      const weights: number[] = [];
      const deltas: Float64Array[] = [];
      for (const [label, nB] of part.counts) {
        const meanB = part.means.get(label)!;
        const nA = into.counts.get(label) ?? 0;
        const meanA = into.means.get(label);
        if (!meanA || nA === 0) {
          into.counts.set(label, nB);
          into.means.set(label, Float64Array.from(meanB));
          continue;
        }
        const n = nA + nB;
        const delta = Float64Array.from(meanB, (v, i) => v - meanA[i]!);
        weights.push((nA * nB) / n);
        deltas.push(delta);
        for (let i = 0; i < d; i++) meanA[i]! += (nB / n) * delta[i]!;
        into.counts.set(label, n);
      }
      addWeightedOuterProducts(scatter, d, weights, deltas);
    });
  }
  return { features: [...features], kFolds, parts: () => merged };
}

/** S += Σ_c w_c δ_c δ_cᵀ for the symmetric d × d S: linalg's blocked rank-k update of the upper triangle (rows √w_c δ_c), then the mirror. */
function addWeightedOuterProducts(scatter: Float64Array, d: number, weights: number[], deltas: Float64Array[]): void {
  const C = weights.length;
  if (C === 0) return;
  // The block transposed, as crossProductUpdate takes it: entry (i, c) at i·C + c.
  const columns = new Float64Array(d * C);
  for (let c = 0; c < C; c++) {
    const root = Math.sqrt(weights[c]!);
    const delta = deltas[c]!;
    for (let i = 0; i < d; i++) columns[i * C + c] = root * delta[i]!;
  }
  crossProductUpdate(scatter, d, columns, C, C);
  mirrorUpper(scatter, d);
}
