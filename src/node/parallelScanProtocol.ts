/** Messages between parallelScan.ts and its worker threads (parallelScanWorker.ts). */
import type { PassJob, RangeTask } from '../core/parallel/rangeScanner';
import type { SpillLimits } from '../core/read/scratch';

/** What the worker is started with: the file to open read-only, and the name messages give it. */
export interface ScanWorkerData {
  path: string;
  name: string;
  /** The analysis's scratch folder (scratchFiles.ts) and when to spill, shared by its threads; null: none. */
  scratch: { folder: string; limits: SpillLimits } | null;
}

export type ToScanWorker = { type: 'job'; job: PassJob } | { type: 'range'; index: number; task: RangeTask } | { type: 'finish' };

/** A thrown error, as data: a DataError keeps its code, place and hint. */
export interface ErrorData {
  name: string;
  message: string;
  code?: string;
  where?: { file?: string; line?: number; row?: number; column?: string; byteOffset?: number };
  hint?: string;
  stack?: string;
}

export type FromScanWorker =
  | { type: 'progress'; index: number; bytesRead: number }
  | { type: 'part'; index: number; part: unknown }
  | { type: 'result'; result: unknown }
  | { type: 'error'; error: ErrorData };
