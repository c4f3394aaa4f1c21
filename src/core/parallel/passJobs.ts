/**
 * What a worker does with a job of the parallel passes (rangeScanner.ts): the same firstPass and
 * secondPass as the single-threaded analysis, each run over one byte range at a time, with the
 * accumulators kept across the worker's ranges. Pure: the source comes from the caller.
 */
import { createClassifier, createLeaveOneOut, foldClassifier } from '../classify';
import { FoldMomentsAccumulator } from '../foldModels';
import { MomentsAccumulator } from '../moments';
import { openFirstPass } from '../pipeline/firstPass';
import { rowValueHash } from '../pipeline/duplicateRows';
import { openSecondPass } from '../pipeline/secondPass';
import { adoptParquetDictionaries } from '../read/parquet';
import type { CrossValidator, ScoreBatch } from '../pipeline/secondPass';
import type { ByteSource, RunControl } from '../source';
import type {
  FirstPassJob,
  FirstRangePart,
  FirstWorkerResult,
  FoldPassJob,
  FoldWorkerResult,
  PassJob,
  RangeTask,
  SecondPassJob,
  SecondRangePart,
} from './rangeScanner';

export interface PassJobRunner {
  scan(task: RangeTask, control?: RunControl): Promise<unknown>;
  finish(): unknown;
}

/** The part of the source a task covers, as firstPass and secondPass take it. */
function share(task: RangeTask): { range?: RangeTask['range']; rows?: RangeTask['rows'] } {
  return { ...(task.range ? { range: task.range } : {}), ...(task.rows ? { rows: task.rows } : {}) };
}

export function openPassJob(source: ByteSource, job: PassJob): PassJobRunner {
  const runner = job.kind === 'first' ? firstJob(source, job) : job.kind === 'folds' ? foldJob(source, job) : secondJob(source, job);
  return {
    async scan(task, control) {
      // A Parquet row group shared by the threads: its dictionaries come with the task, decoded once.
      if (task.dictionaries) await adoptParquetDictionaries(source, task.dictionaries);
      return runner.scan(task, control);
    },
    finish: () => runner.finish(),
  };
}

/**
 * Counts the used rows of each label (firstPass hands every used row to its duplicate sink) and
 * records the value hashes of the first `budget` of them, for the duplicate check that the
 * coordinator replays in file order. One recorder serves all of a worker's ranges (`start` begins
 * each): its arrays are kept, and the row loop that calls `add` sees the same objects in every
 * range, so a later range does not first take a path (a new label's counter, a larger record)
 * that V8 compiled the loop without.
 */
class UsedRowRecorder {
  /** Used rows by the range's label id (zeroed at each start). */
  readonly usedById: number[] = [];
  private count = 0;
  private budget = 0;
  private hashes = new Uint32Array(0);
  private labels = new Int32Array(0);
  private rows = new Int32Array(0);
  private lines = new Int32Array(0);
  private readonly hash = new Uint32Array(2);

  start(budget: number): void {
    this.budget = budget;
    this.count = 0;
    this.usedById.fill(0);
  }

  add(label: number, values: Float64Array, offset: number, d: number, row: number, line: number | undefined): void {
    const used = this.usedById;
    while (used.length <= label) used.push(0);
    used[label]! += 1;
    const n = this.count;
    if (n >= this.budget) return;
    if (n === this.rows.length) this.grow(Math.min(this.budget, Math.max(1024, 2 * n)));
    rowValueHash(values, offset, d, this.hash);
    this.hashes[2 * n] = this.hash[0]!;
    this.hashes[2 * n + 1] = this.hash[1]!;
    this.labels[n] = label;
    this.rows[n] = row;
    this.lines[n] = line ?? 0;
    this.count = n + 1;
  }

  /** Grows the record as rows come (a budget of 250 000 rows would be 5 MB for each range). */
  private grow(size: number): void {
    const hashes = new Uint32Array(2 * size);
    hashes.set(this.hashes);
    this.hashes = hashes;
    for (const name of ['labels', 'rows', 'lines'] as const) {
      const grown = new Int32Array(size);
      grown.set(this[name]);
      this[name] = grown;
    }
  }

  /** This range's record (copies: the arrays serve the next range). */
  record(): FirstRangePart['duplicates'] {
    const n = this.count;
    return { hashes: this.hashes.slice(0, 2 * n), labels: this.labels.slice(0, n), rows: this.rows.slice(0, n), lines: this.lines.slice(0, n) };
  }
}

function firstJob(source: ByteSource, job: FirstPassJob): PassJobRunner {
  const moments = new MomentsAccumulator(job.columns.featureNames);
  // Opened once for all the worker's ranges (see openFirstPass).
  const scanShare = openFirstPass(source, job.inspection, { ...job.columns, moments: true, into: { moments } });
  const recorder = new UsedRowRecorder();
  return {
    async scan(task, control): Promise<FirstRangePart> {
      recorder.start(task.duplicateBudget ?? 0);
      const pass = await scanShare({ ...share(task), duplicateSink: recorder }, control);
      return {
        labels: pass.labels,
        appearance: pass.appearance.map((id) => pass.labels[id]!),
        usedByClass: pass.appearance.map((id) => recorder.usedById[id] ?? 0),
        rows: pass.rows,
        used: pass.used,
        droppedMissing: pass.droppedMissing,
        droppedNonFinite: pass.droppedNonFinite,
        labelMissing: pass.labelMissing,
        nanCells: pass.nanCells,
        positiveInfinity: pass.positiveInfinity,
        negativeInfinity: pass.negativeInfinity,
        summary: pass.summary!,
        majority: { candidates: pass.majority.candidates, votes: pass.majority.votes },
        duplicates: recorder.record(),
      };
    },
    finish(): FirstWorkerResult {
      return { moments: moments.finish() };
    },
  };
}

function foldJob(source: ByteSource, job: FoldPassJob): PassJobRunner {
  const folds = new FoldMomentsAccumulator(job.columns.featureNames, job.folds.count);
  const order = new Map(job.appearance.map((label, index) => [label, index]));
  const ignore = { add: (): void => undefined };
  const scanShare = openFirstPass(source, job.inspection, { ...job.columns, moments: false, folds: job.folds, into: { folds } });
  return {
    async scan(task, control): Promise<Record<string, never>> {
      await scanShare({ ...share(task), foldStart: { order, rowsBefore: task.foldRows ?? [] }, duplicateSink: ignore }, control);
      return {};
    },
    finish(): FoldWorkerResult {
      return { folds: folds.parts() };
    },
  };
}

/** The cross-validator the analysis built, rebuilt from the same moments (so the same predictions). */
function crossValidatorOf(job: SecondPassJob): CrossValidator {
  const model = job.crossValidation;
  if (model.kind === 'loo') return { kind: 'loo', model: createLeaveOneOut(job.solution, model.moments) };
  if (model.kind === 'kfold') return { kind: 'kfold', classifiers: model.folds.map(foldClassifier), seed: model.seed };
  return { kind: 'none' };
}

function secondJob(source: ByteSource, job: SecondPassJob): PassJobRunner {
  let scores: SecondRangePart['scores'] | undefined;
  const onScores = (batch: ScoreBatch): void => {
    if (!scores) scores = { firstRow: batch.firstRow, rows: 0, k: batch.k, values: new Float64Array(Math.max(1, 4096 * batch.k)) };
    const needed = (scores.rows + batch.rows) * batch.k;
    if (scores.values.length < needed) {
      const grown = new Float64Array(Math.max(needed, 2 * scores.values.length));
      grown.set(scores.values.subarray(0, scores.rows * batch.k));
      scores.values = grown;
    }
    scores.values.set(batch.scores.subarray(0, batch.rows * batch.k), scores.rows * batch.k);
    scores.rows += batch.rows;
  };
  // Opened once for all the worker's ranges (see openSecondPass).
  const scanShare = openSecondPass({
    source,
    inspection: job.inspection,
    label: job.label,
    features: job.features,
    solution: job.solution,
    pca: job.pca,
    classifier: createClassifier(job.solution),
    crossValidator: crossValidatorOf(job),
    appearance: [],
    appearanceLabels: job.appearance,
    classCounts: job.classCounts,
    plotQuota: job.plotQuota,
    topFeatures: job.topFeatures,
    majorityCandidates: job.majorityCandidates,
    misclassifiedLimit: job.misclassifiedLimit,
    rowLimit: null,
    packSample: true,
    ...(job.scores ? { onScores } : {}),
  });
  return {
    async scan(task, control): Promise<SecondRangePart> {
      scores = undefined;
      const result = await scanShare({ ...share(task), start: { classRows: task.classRows ?? [], ...(task.foldRows ? { foldRows: task.foldRows } : {}) } }, control);
      const rangeScores = scores as SecondRangePart['scores'] | undefined;
      if (rangeScores) rangeScores.values = rangeScores.values.slice(0, rangeScores.rows * rangeScores.k);
      const sample = result.packedSample!;
      delete result.packedSample;
      return { result, sample, ...(rangeScores ? { scores: rangeScores } : {}) };
    },
    finish(): null {
      return null;
    },
  };
}
