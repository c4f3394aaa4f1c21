/**
 * The contract between the analysis and whatever runs its row passes in parallel. The core stays
 * free of threads: the Node edge (src/node/parallelScan.ts) implements RangeScanner with
 * worker_threads, tests and single-threaded hosts with inProcessScanner.ts. A scanner is bound to
 * one source; jobs and tasks are plain data (structured-clone safe), and every worker runs a job
 * through openPassJob (passJobs.ts) on its own copy of the source.
 *
 * A job runs over the ranges of one pass: each worker opens the job once, takes the next range
 * (in file order) whenever it is free, and keeps its job state (e.g. a moments accumulator) over
 * all the ranges it scans; the range parts and, at the end, each worker's result come back.
 */
import type { Moments } from '../moments';
import type { FoldModel, FoldPart } from '../foldModels';
import type { LdaSolution } from '../lda';
import type { PcaSolution } from '../pca';
import type { SharedDictionaries } from '../read/parquet';
import type { ByteRange, ScanSummary, TableInspection } from '../read/types';
import type { RunControl } from '../source';
import type { SecondPassResult } from '../pipeline/secondPass';
import type { PackedSample } from '../pipeline/sampleCollector';

/** The columns a row pass reads. */
export interface PassColumns {
  label: number;
  /** File positions of the features, in feature order. */
  features: number[];
  featureNames: string[];
}

/** Pass 1: cell checks and per-class moments. */
export interface FirstPassJob {
  kind: 'first';
  inspection: TableInspection;
  columns: PassColumns;
}

/** The fold parts of k-fold cross-validation, once pass 1 has told how many rows of each class precede each range. */
export interface FoldPassJob {
  kind: 'folds';
  inspection: TableInspection;
  columns: PassColumns;
  folds: { count: number; seed: number };
  /** Labels in order of first appearance among the used rows of the whole file. */
  appearance: string[];
}

/**
 * What a worker needs for the cross-validation models exactly as the analysis built them: for
 * leave-one-out the moments it downdates, for k-fold the fold models, solved once by the calling
 * thread (foldModels.ts).
 */
export type CrossValidationModel =
  | { kind: 'none' }
  | { kind: 'loo'; moments: Moments }
  | { kind: 'kfold'; folds: FoldModel[]; seed: number };

/** Pass 2: predictions, cross-validation, plot sample and scores with the fitted model. */
export interface SecondPassJob {
  kind: 'second';
  inspection: TableInspection;
  label: number;
  features: number[];
  solution: LdaSolution;
  pca: PcaSolution;
  crossValidation: CrossValidationModel;
  /** Labels in order of first appearance among the used rows. */
  appearance: string[];
  classCounts: number[];
  plotQuota: number[];
  topFeatures: number[];
  majorityCandidates: Float64Array;
  misclassifiedLimit: number;
  /** Whether to return each row's discriminant scores. */
  scores: boolean;
}

export type PassJob = FirstPassJob | FoldPassJob | SecondPassJob;

/** One range of one pass, described when a worker takes it: bytes of text, or rows of Parquet. */
export interface RangeTask {
  range?: ByteRange;
  rows?: { start: number; end: number };
  /** The range's share of the source's bytes, for progress. */
  bytes: number;
  /** Parquet: dictionaries of a row group the threads share (decoded once, in shared memory). */
  dictionaries?: SharedDictionaries;
  /** Pass 1: how many used rows of this range to hash for the duplicate check (0: none). */
  duplicateBudget?: number;
  /** Used rows before the range per class in order of first appearance (folds). */
  foldRows?: number[];
  /** Used rows before the range per class in the solution's order (plot sample). */
  classRows?: number[];
}

/** Pass 1 over one range; for text, rows and lines are relative to the range (row 0 on line 1). */
export interface FirstRangePart {
  /** The range's own label dictionary, in order of first appearance. */
  labels: string[];
  /** Labels in order of first appearance among the range's used rows, with their used rows. */
  appearance: string[];
  usedByClass: number[];
  rows: number;
  used: number;
  droppedMissing: number;
  droppedNonFinite: number;
  labelMissing: number;
  nanCells: Float64Array;
  positiveInfinity: Float64Array;
  negativeInfinity: Float64Array;
  summary: ScanSummary;
  majority: { candidates: Float64Array; votes: Float64Array };
  /** The first `duplicateBudget` used rows: value hashes (two words a row), label ids (the range's), rows, lines. */
  duplicates: { hashes: Uint32Array; labels: Int32Array; rows: Int32Array; lines: Int32Array };
}

export interface FirstWorkerResult {
  moments: Moments;
}

export interface FoldWorkerResult {
  folds: FoldPart[];
}

export interface SecondRangePart {
  /** The range's pass 2, its plot sample left empty: the points are in `sample`. */
  result: SecondPassResult;
  sample: PackedSample;
  /** With `scores`: rows × k discriminant scores (NaN for dropped rows) from `firstRow`. */
  scores?: { firstRow: number; rows: number; k: number; values: Float64Array };
}

export interface RangeScanner {
  /** Workers scanning at once. */
  readonly workers: number;
  /** Sources smaller than this are read by one thread: starting workers would not pay. */
  readonly minimumBytes: number;
  /** Bytes per range (small values are for tests); default: shrinking ranges, 64 MiB down to 2 MiB (rowPasses.ts). */
  readonly rangeBytes?: number;
  /**
   * Runs `job` over ranges 0..count−1: a free worker takes the next range index, `task(index)`
   * describes it at that moment, and `onPart` receives each range's part as it completes (in any
   * order). Progress goes to `control.onProgress` as bytes of all ranges; an abort of
   * `control.signal` stops the workers and rejects with CancelledError; a DataError in a worker
   * rejects with a DataError. Resolves with each worker's result.
   */
  run(job: PassJob, count: number, task: (index: number) => RangeTask, onPart: (index: number, part: unknown) => void, control?: RunControl): Promise<unknown[]>;
  /**
   * The analysis needs no more passes: the scanner may free its threads now, before the report is
   * built (their memory would otherwise add to the peak). A later run starts them again.
   */
  release?(): Promise<void>;
}
