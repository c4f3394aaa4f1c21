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
 * Pass 1 of the whole file from its ranges' parts (in file order) and the workers' moments.
 * Text ranges number their rows from 0 and their lines from 1 (placed here); Parquet rows are
 * numbered in the file already. Ragged rows are not merged here: the caller reads such a file in
 * one thread.
 */
export function mergeFirstParts(parts: FirstRangePart[], ranges: readonly SourceShare[], workerMoments: Moments[], featureNames: string[]): { result: FirstPassResult; layout: RangeLayout } {
  const d = featureNames.length;
  const labels: string[] = [];
  const labelId = new Map<string, number>();
  const appearance: number[] = [];
  const seenUsed = new Set<string>();
  const nanCells = new Float64Array(d);
  const positiveInfinity = new Float64Array(d);
  const negativeInfinity = new Float64Array(d);
  const nonNumeric = new Array<number>(d).fill(0);
  const nonNumericExamples: CellExample[][] = Array.from({ length: d }, () => []);
  const duplicates = new DuplicateRows();
  const majority = new MajorityVote(d);
  const layoutRanges: SourceShare[] = [];
  const usedBefore: Map<string, number>[] = [];
  const running = new Map<string, number>();
  let rows = 0;
  let lineBase = 0;
  let used = 0;
  let droppedMissing = 0;
  let droppedNonFinite = 0;
  let labelMissing = 0;

  parts.forEach((part, index) => {
    const share = ranges[index]!;
    const relative = share.range !== undefined;
    const rowBase = relative ? rows : 0;
    if (share.range && index > 0) layoutRanges.push({ ...share, range: { start: share.range.start, end: share.range.end, origin: { line: lineBase + 1, row: rowBase } } });
    else layoutRanges.push(share);
    usedBefore.push(new Map(running));
    const toGlobal = part.labels.map((label) => {
      let id = labelId.get(label);
      if (id === undefined) {
        id = labels.length;
        labelId.set(label, id);
        labels.push(label);
      }
      return id;
    });
    part.appearance.forEach((label, i) => {
      if (!seenUsed.has(label)) {
        seenUsed.add(label);
        appearance.push(labelId.get(label)!);
      }
      running.set(label, (running.get(label) ?? 0) + part.usedByClass[i]!);
    });
    const record = part.duplicates;
    for (let r = 0; r < record.rows.length && duplicates.open; r++) {
      const key = rowKey(record.hashes[2 * r]!, record.hashes[2 * r + 1]!, toGlobal[record.labels[r]!]!);
      duplicates.addKey(key, record.rows[r]! + rowBase, relative ? record.lines[r]! + lineBase : undefined);
    }
    mergeMajorityVotes(majority, part.majority.candidates, part.majority.votes);
    for (let j = 0; j < d; j++) {
      nanCells[j]! += part.nanCells[j]!;
      positiveInfinity[j]! += part.positiveInfinity[j]!;
      negativeInfinity[j]! += part.negativeInfinity[j]!;
      nonNumeric[j]! += part.summary.nonNumeric[j]!;
      const room = EXAMPLES - nonNumericExamples[j]!.length;
      if (room > 0) append(nonNumericExamples[j]!, shifted(part.summary.nonNumericExamples[j]!.slice(0, room), rowBase, lineBase));
    }
    rows += part.rows;
    lineBase += (part.summary.endLine ?? 1) - 1;
    used += part.used;
    droppedMissing += part.droppedMissing;
    droppedNonFinite += part.droppedNonFinite;
    labelMissing += part.labelMissing;
  });

  const summary: ScanSummary = {
    rows,
    labels: [...labels],
    nonNumeric,
    nonNumericExamples,
    raggedRows: 0,
    raggedExamples: [],
    notes: parts[0]?.summary.notes ?? [],
    endLine: lineBase + 1,
  };
  // The workers' moments are the pass's own (finished accumulators, shared or handed over): merged
  // into one another in place, so no d × d matrix is allocated or copied here.
  const moments: Moments = { features: [...featureNames], classes: [] };
  for (const part of workerMoments) mergeMomentsInPlace(moments, part);
  const order = new Map(appearance.map((id, i) => [labels[id]!, i]));
  moments.classes.sort((a, b) => (order.get(a.label) ?? 0) - (order.get(b.label) ?? 0));
  const result: FirstPassResult = {
    moments,
    folds: null,
    labels,
    appearance,
    rows,
    used,
    droppedMissing,
    droppedNonFinite,
    labelMissing,
    nanCells,
    positiveInfinity,
    negativeInfinity,
    summary,
    rowLimit: null,
    duplicates,
    majority,
  };
  return { result, layout: { ranges: layoutRanges, appearance: appearance.map((id) => labels[id]!), usedBefore } };
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
