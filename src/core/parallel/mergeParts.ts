/**
 * Joining the per-range parts of a parallel pass into what the single-threaded pass returns.
 * Ranges are joined in file order, so everything that depends on order comes out as one scan
 * from the start would give it: the label dictionary and the classes' order of first appearance,
 * row and line numbers (pass 1 numbers rows relative to each range; the bases are the row and
 * line counts of the ranges before), the duplicate check (replayed from each range's first rows'
 * hashes until it is full), the examples kept (the first ones in file order), the misclassified
 * rows and the plot sample. Counts add; moments merge (equal to the one-scan moments to rounding).
 */
import { EXAMPLES } from '../read/scanTally';
import type { Moments } from '../moments';
import { mergeMomentsInPlace } from '../moments';
import type { CellExample, ScanSummary } from '../read/types';
import { DuplicateRows, rowKey } from '../pipeline/duplicateRows';
import type { FirstPassResult } from '../pipeline/firstPass';
import { MajorityVote, mergeMajorityVotes } from '../pipeline/majorityValue';
import type { SecondPassResult } from '../pipeline/secondPass';
import { unpackSamples } from '../pipeline/sampleCollector';
import type { FirstRangePart, RangeTask, SecondRangePart } from './rangeScanner';

/** Where each range of a pass-1 split sits in the file, for the passes after it. */
export interface RangeLayout {
  /** The ranges, text ones with their exact first line and row. */
  ranges: SourceShare[];
  /** Labels in order of first appearance among the used rows of the whole file. */
  appearance: string[];
  /** Per range: the used rows of each label in all the ranges before it. */
  usedBefore: Map<string, number>[];
}

function shifted(examples: CellExample[], rowBase: number, lineBase: number): CellExample[] {
  return examples.map((e) => ({ ...e, row: e.row + rowBase, ...(e.line !== undefined ? { line: e.line + lineBase } : {}) }));
}

/** A share of a source for one task: a byte range of text or the rows of Parquet row groups, with its share of the bytes. */
export type SourceShare = Pick<RangeTask, 'range' | 'rows' | 'bytes' | 'dictionaries'>;

/**
 * Pass 1 of the whole file from its ranges' parts, joined one range at a time in file order:
 * `add` each part as soon as it and all the ranges before it are in (the parallel pass does so
 * while the other ranges are still being scanned, so the duplicate check's replay and the rest
 * run beside the workers rather than after them), then `result` with the workers' moments.
 * Text ranges number their rows from 0 and their lines from 1 (placed here); Parquet rows are
 * numbered in the file already. Ragged rows are not merged here: the caller reads such a file in
 * one thread.
 */
export class FirstPartsMerger {
  private readonly d: number;
  private readonly labels: string[] = [];
  private readonly labelId = new Map<string, number>();
  private readonly appearance: number[] = [];
  private readonly seenUsed = new Set<string>();
  private readonly nanCells: Float64Array;
  private readonly positiveInfinity: Float64Array;
  private readonly negativeInfinity: Float64Array;
  private readonly nonNumeric: number[];
  private readonly nonNumericExamples: CellExample[][];
  private readonly duplicates = new DuplicateRows();
  private readonly majority: MajorityVote;
  private readonly layoutRanges: SourceShare[] = [];
  private readonly usedBefore: Map<string, number>[] = [];
  private readonly running = new Map<string, number>();
  private notes: ScanSummary['notes'] | null = null;
  private rows = 0;
  private lineBase = 0;
  private used = 0;
  private droppedMissing = 0;
  private droppedNonFinite = 0;
  private labelMissing = 0;
  /** Ranges joined so far. */
  added = 0;

  constructor(private readonly featureNames: string[]) {
    const d = featureNames.length;
    this.d = d;
    this.nanCells = new Float64Array(d);
    this.positiveInfinity = new Float64Array(d);
    this.negativeInfinity = new Float64Array(d);
    this.nonNumeric = new Array<number>(d).fill(0);
    this.nonNumericExamples = Array.from({ length: d }, () => []);
    this.majority = new MajorityVote(d);
  }

  /** The next range's part (range `added`), with where the range sits in the source. */
  add(part: FirstRangePart, share: SourceShare): void {
    const index = this.added++;
    const relative = share.range !== undefined;
    const rowBase = relative ? this.rows : 0;
    const lineBase = this.lineBase;
    if (share.range && index > 0) this.layoutRanges.push({ ...share, range: { start: share.range.start, end: share.range.end, origin: { line: lineBase + 1, row: rowBase } } });
    else this.layoutRanges.push(share);
    this.usedBefore.push(new Map(this.running));
    const toGlobal = part.labels.map((label) => {
      let id = this.labelId.get(label);
      if (id === undefined) {
        id = this.labels.length;
        this.labelId.set(label, id);
        this.labels.push(label);
      }
      return id;
    });
    part.appearance.forEach((label, i) => {
      if (!this.seenUsed.has(label)) {
        this.seenUsed.add(label);
        this.appearance.push(this.labelId.get(label)!);
      }
      this.running.set(label, (this.running.get(label) ?? 0) + part.usedByClass[i]!);
    });
    const record = part.duplicates;
    const duplicates = this.duplicates;
    for (let r = 0; r < record.rows.length && duplicates.open; r++) {
      const key = rowKey(record.hashes[2 * r]!, record.hashes[2 * r + 1]!, toGlobal[record.labels[r]!]!);
      duplicates.addKey(key, record.rows[r]! + rowBase, relative ? record.lines[r]! + lineBase : undefined);
    }
    mergeMajorityVotes(this.majority, part.majority.candidates, part.majority.votes);
    for (let j = 0; j < this.d; j++) {
      this.nanCells[j]! += part.nanCells[j]!;
      this.positiveInfinity[j]! += part.positiveInfinity[j]!;
      this.negativeInfinity[j]! += part.negativeInfinity[j]!;
      this.nonNumeric[j]! += part.summary.nonNumeric[j]!;
      const room = EXAMPLES - this.nonNumericExamples[j]!.length;
      if (room > 0) append(this.nonNumericExamples[j]!, shifted(part.summary.nonNumericExamples[j]!.slice(0, room), rowBase, lineBase));
    }
    this.notes ??= part.summary.notes;
    this.rows += part.rows;
    this.lineBase += (part.summary.endLine ?? 1) - 1;
    this.used += part.used;
    this.droppedMissing += part.droppedMissing;
    this.droppedNonFinite += part.droppedNonFinite;
    this.labelMissing += part.labelMissing;
  }

  /** Pass 1 of the whole file, once every range is added, with each worker's moments. */
  result(workerMoments: Moments[]): { result: FirstPassResult; layout: RangeLayout } {
    const { labels, appearance } = this;
    const summary: ScanSummary = {
      rows: this.rows,
      labels: [...labels],
      nonNumeric: this.nonNumeric,
      nonNumericExamples: this.nonNumericExamples,
      raggedRows: 0,
      raggedExamples: [],
      notes: this.notes ?? [],
      endLine: this.lineBase + 1,
    };
    // The workers' moments are the pass's own (finished accumulators, shared or handed over): merged
    // into one another in place, so no d × d matrix is allocated or copied here.
    const moments: Moments = { features: [...this.featureNames], classes: [] };
    for (const part of workerMoments) mergeMomentsInPlace(moments, part);
    const order = new Map(appearance.map((id, i) => [labels[id]!, i]));
    moments.classes.sort((a, b) => (order.get(a.label) ?? 0) - (order.get(b.label) ?? 0));
    const result: FirstPassResult = {
      moments,
      folds: null,
      labels,
      appearance,
      rows: this.rows,
      used: this.used,
      droppedMissing: this.droppedMissing,
      droppedNonFinite: this.droppedNonFinite,
      labelMissing: this.labelMissing,
      nanCells: this.nanCells,
      positiveInfinity: this.positiveInfinity,
      negativeInfinity: this.negativeInfinity,
      summary,
      rowLimit: null,
      duplicates: this.duplicates,
      majority: this.majority,
    };
    return { result, layout: { ranges: this.layoutRanges, appearance: appearance.map((id) => labels[id]!), usedBefore: this.usedBefore } };
  }
}

/** Appends one by one: a spread of a million-point sample would overflow the call stack. */
function append<T>(target: T[], items: readonly T[]): void {
  for (const item of items) target.push(item);
}

/** Pass 2 of the whole file from its ranges' parts, in file order. */
export function mergeSecondParts(parts: SecondRangePart[], misclassifiedLimit: number): SecondPassResult {
  const first = parts[0]!.result;
  const K = first.confusion.length;
  const square = (): number[][] => Array.from({ length: K }, () => new Array<number>(K).fill(0));
  const confusion = square();
  const crossValidatedConfusion = first.crossValidatedConfusion ? square() : null;
  const misclassified: SecondPassResult['misclassified'] = [];
  let misclassifiedTotal = 0;
  const majorityCounts = new Float64Array(first.majorityCounts.length);
  for (const { result } of parts) {
    for (let i = 0; i < K; i++) {
      for (let j = 0; j < K; j++) {
        confusion[i]![j]! += result.confusion[i]![j]!;
        if (crossValidatedConfusion) crossValidatedConfusion[i]![j]! += result.crossValidatedConfusion![i]![j]!;
      }
    }
    for (const entry of result.misclassified) if (misclassified.length < misclassifiedLimit) misclassified.push(entry);
    misclassifiedTotal += result.misclassifiedTotal;
    for (let j = 0; j < majorityCounts.length; j++) majorityCounts[j]! += result.majorityCounts[j]!;
  }
  const sample = unpackSamples(parts.map((part) => part.sample));
  return { confusion, crossValidatedConfusion, misclassified, misclassifiedTotal, sample, majorityCounts };
}
