/**
 * The two fits of an editor comparison, each in its own worker thread (never on the host's event
 * loop): the base from the bytes read at a git ref, the head from the file on disk, with the same
 * options. Resolves with both reports and their column lists, or rejects with a DataError carrying
 * the worker's explanation.
 */
import { DataError } from '../core/errors';
import type { FitOptions } from '../core/types';
import type { PanelReport } from '../shared/messages';
import type { FitWorkers } from './fitWorkers';
import type { FitRequest } from './workerProtocol';

export interface WorkerFit {
  /** With its plot sample packed, as the panel takes it. */
  report: PanelReport;
  columns: string[];
}

/** One fit in a worker; `signal` stops it (the worker is terminated). */
export function fitInWorker(workers: FitWorkers, request: FitRequest, signal?: AbortSignal): Promise<WorkerFit> {
  return new Promise((resolve, reject) => {
    // No provisional answer: a comparison needs both full fits.
    const job = workers.start(
      { ...request, provisionalBytes: Number.MAX_SAFE_INTEGER },
      {
        progress: () => undefined,
        hashed: () => undefined,
        result: (report, columns) => {
          if (!report.provisional) resolve({ report, columns: columns.map((c) => c.name) });
        },
        failed: (failure) => reject(new DataError(failure.code, failure.message, failure.where ?? {}, failure.hint)),
      },
    );
    signal?.addEventListener('abort', () => {
      job.cancel();
      reject(new DataError('cancelled', 'The comparison was cancelled.'));
    });
  });
}

export interface ComparisonFits {
  base: WorkerFit;
  head: WorkerFit;
}

/** Fits the base bytes and the head file at once, in two workers. */
export async function fitBothSides(
  workers: FitWorkers,
  base: { name: string; bytes: Uint8Array },
  headPath: string,
  options: Partial<FitOptions>,
  signal?: AbortSignal,
): Promise<ComparisonFits> {
  const stop = new AbortController();
  signal?.addEventListener('abort', () => stop.abort());
  try {
    const [baseFit, headFit] = await Promise.all([
      fitInWorker(workers, { path: base.name, bytes: base.bytes, options, provisionalBytes: 0 }, stop.signal),
      fitInWorker(workers, { path: headPath, options, provisionalBytes: 0 }, stop.signal),
    ]);
    return { base: baseFit, head: headFit };
  } catch (error) {
    // One side failed: the other has nothing left to answer.
    stop.abort();
    throw error;
  }
}
