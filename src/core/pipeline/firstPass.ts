/**
 * Pass 1 over the rows: what every cell is (missing, not a number, infinite), which rows are used,
 * and the per-class moments of the used rows, with constant memory.
 *
 * A row is used when its label is present and every feature value is a finite number; otherwise it
 * is dropped and counted: `droppedMissing` (missing label, or a feature missing / not a number) takes
 * precedence over `droppedNonFinite` (±∞). Alongside the moments the pass feeds the duplicate-row
 * check, the majority vote of each feature (for the near-constant rule) and, when k-fold
 * cross-validation may run, the fold parts of the moments.
 *
 * Fold assignment: folds.ts's FoldAssigner, called once per used row in file order with the class's
 * order of first appearance among the used rows (0 for the class of the first used row, …). Pass 2
 * replays the same calls, so no fold is stored per row.
 */
import { FoldMomentsAccumulator } from '../classify';
import type { FoldParts } from '../foldModels';
import { FoldAssigner } from '../folds';
import type { Moments } from '../moments';
import { MomentsAccumulator } from '../moments';
import type { ByteRange, CellExample, RowBatch, ScanSummary, TableInspection } from '../read/types';
import { scanTable } from '../read/index';
import type { ByteSource, RunControl } from '../source';
import { DuplicateRows } from './duplicateRows';
import { MajorityVote } from './majorityValue';
import { PassControl } from './passControl';

export interface FirstPassPlan {
  label: number;
  /** File positions of the features, in feature order. */
  features: number[];
  featureNames: string[];
  /** Fold count when fold parts are to be collected, with the generator's seed. */
  folds?: { count: number; seed: number };
  /** Whether to accumulate moments (false when only the fold parts are wanted again). */
  moments: boolean;
  /** Text: scan only the rows that start in this byte range (one share of a parallel scan). */
  range?: ByteRange;
  /** Parquet: scan only these data rows (one share of a parallel scan). */
  rows?: { start: number; end: number };
  /**
   * Accumulators that outlive the pass (a parallel worker's, over all its ranges): rows go into
   * them, and the result then holds `moments: null` (the caller reads them at the end).
   */
  into?: { moments?: MomentsAccumulator; folds?: FoldMomentsAccumulator };
  /**
   * For a range that is not the start of the file: each class's order of first appearance among
   * the used rows of the whole file (by label) and its used rows before the range, so the folds
   * continue where the rows before left off.
   */
  foldStart?: { order: ReadonlyMap<string, number>; rowsBefore: readonly number[] };
  /** Receives the rows for the duplicate check instead of the pass's own DuplicateRows. */
  duplicateSink?: Pick<DuplicateRows, 'add'>;
}

export interface FirstPassResult {
  moments: Moments | null;
  folds: FoldParts | null;
  /** The scan's label dictionary, in order of first appearance in the file (all rows). */
  labels: string[];
  /** Label ids (scan dictionary) in order of first appearance among the used rows. */
  appearance: number[];
  /** Data rows seen (including skipped ragged rows); with an early stop, the rows kept. */
  rows: number;
  used: number;
  droppedMissing: number;
  droppedNonFinite: number;
  labelMissing: number;
  /** Per feature: cells that were NaN (missing or not a number), +∞, −∞, over every row. */
  nanCells: Float64Array;
  positiveInfinity: Float64Array;
  negativeInfinity: Float64Array;
  /** The reader's summary; absent after an early stop (non-numeric cells then count as missing). */
  summary: ScanSummary | null;
  /** The row limit when rows were left out (provisional), or null when every row was read. */
  rowLimit: number | null;
  duplicates: DuplicateRows;
  majority: MajorityVote;
}

/** Rows gathered before handing a block to the accumulators. */
const BLOCK_ROWS = 4096;

/** What changes from one share of the rows to the next (a parallel worker's ranges). */
export type FirstPassShare = Pick<FirstPassPlan, 'range' | 'rows' | 'foldStart' | 'duplicateSink'>;

export async function firstPass(
  source: ByteSource,
  inspection: TableInspection,
  plan: FirstPassPlan,
  control: RunControl | undefined,
  /** Read only the data rows before this one (the provisional answer); null = every row. */
  rowLimit: number | null = null,
): Promise<FirstPassResult> {
  return openFirstPass(source, inspection, plan)(plan, control, rowLimit);
}

/**
 * Pass 1 set up once for several shares of the rows (a parallel worker's ranges, scanned one after
 * the other, never two at once; they need `plan.into`'s accumulators, which outlive the shares):
 * the returned function scans one share. The batch callback is made here, once, not per share:
 * V8 folds a closure's captured constants into its optimised code only while the closure is the
 * one made from its source (see openSecondPass).
 */
export function openFirstPass(
  source: ByteSource,
  inspection: TableInspection,
  plan: Omit<FirstPassPlan, keyof FirstPassShare>,
): (share: FirstPassShare, control: RunControl | undefined, rowLimit?: number | null) => Promise<FirstPassResult> {
  const d = plan.features.length;
  let opened = false;
  const blockValues = new Float64Array(BLOCK_ROWS * d);
  const blockClasses = new Int32Array(BLOCK_ROWS);
  const blockFolds = new Int32Array(BLOCK_ROWS);

  // One share's state, set at the start of each scan.
  let accumulator: MomentsAccumulator | null = null;
  let folds: FoldMomentsAccumulator | null = null;
  let assigner: FoldAssigner | null = null;
  let foldStart: FirstPassShare['foldStart'];
  let foldOrderOf: number[] = []; // scan label id → order of first appearance in the whole file (with foldStart)
  let duplicates: DuplicateRows;
  let duplicateSink: Pick<DuplicateRows, 'add'>;
  let majority: MajorityVote;
  let nanCells: Float64Array;
  let positiveInfinity: Float64Array;
  let negativeInfinity: Float64Array;
  let labels: readonly string[] = [];
  let appearanceOf: number[] = []; // scan label id → order of first appearance among used rows, or -1
  let appearance: number[] = [];
  let rows = 0;
  let used = 0;
  let droppedMissing = 0;
  let droppedNonFinite = 0;
  let labelMissing = 0;
  let rowLimit: number | null = null;
  let pass: PassControl;
  let blockRows = 0;

  const flush = (): void => {
    if (blockRows === 0) return;
    const values = blockValues.subarray(0, blockRows * d);
    const classes = blockClasses.subarray(0, blockRows);
    accumulator?.add(values, classes, blockRows, labels);
    folds?.add(values, classes, blockRows, labels, blockFolds.subarray(0, blockRows));
    blockRows = 0;
  };

  // Rows [from, to) of a batch until the block is full; returns the next row's index. The loop is
  // a function of its own, with the batch's arrays as arguments and the block flushed by the caller,
  // for the reason openSecondPass gives for its scoreRows.
  const checkRows = (values: Float64Array, labelIds: Int32Array, lines: Int32Array | undefined, firstRow: number, from: number, to: number): number => {
    let i = from;
    for (; i < to && blockRows < BLOCK_ROWS; i++) {
      const row = firstRow + i;
      const label = labelIds[i]!;
      let missing = label < 0;
      if (missing) labelMissing++;
      let infinite = false;
      const offset = i * d;
      for (let j = 0; j < d; j++) {
        const v = values[offset + j]!;
        if (v !== v) {
          nanCells[j]! += 1;
          missing = true;
        } else if (v === Infinity) {
          positiveInfinity[j]! += 1;
          infinite = true;
        } else if (v === -Infinity) {
          negativeInfinity[j]! += 1;
          infinite = true;
        }
      }
      if (missing) {
        droppedMissing++;
        continue;
      }
      if (infinite) {
        droppedNonFinite++;
        continue;
      }
      used++;
      let order = appearanceOf[label];
      if (order === undefined || order < 0) {
        while (appearanceOf.length <= label) appearanceOf.push(-1);
        order = appearance.length;
        appearanceOf[label] = order;
        appearance.push(label);
      }
      const at = blockRows * d;
      for (let j = 0; j < d; j++) blockValues[at + j] = values[offset + j]!;
      blockClasses[blockRows] = label;
      if (assigner) {
        if (foldStart) {
          let whole = foldOrderOf[label];
          if (whole === undefined) {
            whole = foldStart.order.get(labels[label]!) ?? -1;
            foldOrderOf[label] = whole;
          }
          order = whole;
        }
        blockFolds[blockRows] = assigner.foldOf(order);
      }
      blockRows++;
      duplicateSink.add(label, values, offset, d, row, lines === undefined ? undefined : lines[i]);
      majority.vote(values, offset);
    }
    return i;
  };

  const onBatch = (batch: RowBatch, dictionary: readonly string[]): void => {
    labels = dictionary;
    // Rows from the limit on are left out, and the pass stops at the first of them.
    const end = rowLimit !== null ? Math.max(0, Math.min(batch.rows, rowLimit - batch.firstRow)) : batch.rows;
    const { values, labels: labelIds, lines, firstRow } = batch;
    for (let i = 0; i < end; ) {
      i = checkRows(values, labelIds, lines, firstRow, i, end);
      if (blockRows === BLOCK_ROWS) flush();
    }
    if (end > 0) rows = firstRow + end;
    if (end < batch.rows) pass.stop();
  };

  return async (share, control, limit = null) => {
    if (opened && (!plan.moments || !plan.into?.moments) && (!plan.folds || !plan.into?.folds)) {
      throw new Error('internal: a first pass scans several shares only into accumulators that outlive them (plan.into)');
    }
    opened = true;
    accumulator = plan.moments ? (plan.into?.moments ?? new MomentsAccumulator(plan.featureNames)) : null;
    folds = plan.folds ? (plan.into?.folds ?? new FoldMomentsAccumulator(plan.featureNames, plan.folds.count)) : null;
    assigner = plan.folds ? new FoldAssigner(plan.folds.count, plan.folds.seed) : null;
    foldStart = share.foldStart;
    if (assigner && foldStart) foldStart.rowsBefore.forEach((count, order) => assigner!.skip(order, count));
    foldOrderOf = [];
    duplicates = new DuplicateRows();
    duplicateSink = share.duplicateSink ?? duplicates;
    majority = new MajorityVote(d);
    nanCells = new Float64Array(d);
    positiveInfinity = new Float64Array(d);
    negativeInfinity = new Float64Array(d);
    labels = [];
    appearanceOf = [];
    appearance = [];
    rows = 0;
    used = 0;
    droppedMissing = 0;
    droppedNonFinite = 0;
    labelMissing = 0;
    rowLimit = limit;
    blockRows = 0;
    pass = new PassControl('moments', control);
    const summary = await pass.run(() =>
      scanTable({
        source,
        inspection,
        plan: { label: plan.label, features: plan.features },
        control: pass.control,
        ...(share.range ? { range: share.range } : {}),
        ...(share.rows ? { rows: share.rows } : {}),
        ...(limit !== null && limit !== undefined ? { rowLimit: limit } : {}),
        onBatch,
      }),
    );
    flush();
    // Rows were left out only when the reader had more than the limit.
    const cut = rowLimit !== null && (pass.stoppedEarly || (summary !== undefined && summary.rows > rowLimit)) ? rowLimit : null;
    return {
      moments: accumulator && !plan.into?.moments ? accumulator.finish() : null,
      folds,
      labels: [...labels],
      appearance,
      rows: cut === null && summary ? summary.rows : rows,
      used,
      droppedMissing,
      droppedNonFinite,
      labelMissing,
      nanCells,
      positiveInfinity,
      negativeInfinity,
      summary: summary ?? null,
      rowLimit: cut,
      duplicates,
      majority,
    };
  };
}

/** Missing cells of feature j: NaN cells that the reader did not count as non-numeric. */
export function missingCells(result: FirstPassResult, j: number): number {
  return result.nanCells[j]! - (result.summary?.nonNumeric[j] ?? 0);
}

/** The reader's first non-numeric examples of feature j (none after an early stop). */
export function nonNumericExamples(result: FirstPassResult, j: number): CellExample[] {
  return result.summary?.nonNumericExamples[j] ?? [];
}
