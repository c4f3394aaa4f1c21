/**
 * The Node edge of the parallel row passes: a RangeScanner over worker_threads, bound to one
 * file (each worker opens it read-only for itself). Pass it to analyze() as `scanner`; close it
 * when the analysis is done. The workers start at the first pass that uses them and serve every
 * pass of the analysis; a cancellation or an error stops them (the next pass starts new ones).
 *
 * Worker count: the machine's available parallelism (os.availableParallelism), at most 8.
 */
import { statSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { CancelledError, DataError } from '../core/errors';
import { progressPassOf } from '../core/parallel/inProcessScanner';
import type { RangeScanner } from '../core/parallel/rangeScanner';
import type { ErrorData, FromScanWorker, ScanWorkerData, ToScanWorker } from './parallelScanProtocol';

export interface ParallelScanOptions {
  /** Default: available parallelism, at most 8. */
  workers?: number;
  /** Default 32 MiB: below that one thread reads the file while the workers would still be starting. */
  minimumBytes?: number;
  /** Bytes per range (tests use small ones); default as splitAtRowStarts decides. */
  rangeBytes?: number;
  /** The bundled worker (default: scanWorker.js beside this bundle, i.e. dist/scanWorker.js). */
  workerScript?: string;
}

export const DEFAULT_MINIMUM_BYTES = 32 * 1024 * 1024;

function toError(data: ErrorData): Error {
  if (data.name === 'DataError') return new DataError(data.code ?? 'data-error', data.message, data.where ?? {}, data.hint);
  const error = new Error(data.message);
  error.name = data.name;
  if (data.stack) error.stack = data.stack;
  return error;
}

export function createParallelScanner(path: string, name: string, options: ParallelScanOptions = {}): RangeScanner & { close(): Promise<void> } {
  const workers = Math.max(1, Math.floor(options.workers ?? Math.min(8, availableParallelism())));
  const script = options.workerScript ?? join(__dirname, 'scanWorker.js');
  const size = statSync(path).size;
  let pool: Worker[] = [];

  const stopAll = async (): Promise<void> => {
    const stopping = pool;
    pool = [];
    await Promise.all(stopping.map((w) => w.terminate()));
  };

  const ensurePool = (): Worker[] => {
    while (pool.length < workers) {
      const data: ScanWorkerData = { path, name };
      pool.push(new Worker(script, { workerData: data }));
    }
    return pool;
  };

  return {
    workers,
    minimumBytes: options.minimumBytes ?? DEFAULT_MINIMUM_BYTES,
    ...(options.rangeBytes !== undefined ? { rangeBytes: options.rangeBytes } : {}),

    run(job, count, task, onPart, control) {
      if (control?.signal?.aborted) return Promise.reject(new CancelledError());
      const threads = ensurePool();
      const pass = progressPassOf(job);
      const progress = new Float64Array(count);
      const sizes = new Float64Array(count);
      let next = 0;
      const results: unknown[] = new Array(threads.length);
      let finished = 0;

      return new Promise<unknown[]>((resolve, reject) => {
        let settled = false;
        const listeners: (() => void)[] = [];
        const settle = (error: Error | null): void => {
          if (settled) return;
          settled = true;
          for (const remove of listeners) remove();
          control?.signal?.removeEventListener('abort', onAbort);
          if (error) {
            // A worker's job state is now unknown: stop them all; a later pass starts new ones.
            void stopAll().then(() => reject(error), () => reject(error));
          } else resolve(results);
        };
        const onAbort = (): void => settle(new CancelledError());
        control?.signal?.addEventListener('abort', onAbort, { once: true });

        const give = (worker: Worker): void => {
          if (next < count) {
            const index = next++;
            let described;
            try {
              described = task(index);
            } catch (error) {
              settle(error as Error);
              return;
            }
            sizes[index] = described.range.end - described.range.start;
            worker.postMessage({ type: 'range', index, task: described } satisfies ToScanWorker);
          } else worker.postMessage({ type: 'finish' } satisfies ToScanWorker);
        };

        threads.forEach((worker, w) => {
          const onMessage = (message: FromScanWorker): void => {
            if (settled) return;
            if (message.type === 'progress') {
              progress[message.index] = message.bytesRead;
              if (control?.onProgress) {
                let read = 0;
                for (let i = 0; i < count; i++) read += Math.min(progress[i]!, sizes[i]!);
                control.onProgress({ pass, bytesRead: read, bytesTotal: size });
              }
            } else if (message.type === 'part') {
              progress[message.index] = sizes[message.index]!;
              try {
                onPart(message.index, message.part);
              } catch (error) {
                settle(error as Error);
                return;
              }
              give(worker);
            } else if (message.type === 'result') {
              results[w] = message.result;
              finished++;
              if (finished === threads.length) settle(null);
            } else settle(toError(message.error));
          };
          const onError = (error: Error): void => settle(error);
          const onExit = (code: number): void => settle(new Error(`a scan worker stopped (exit code ${code})`));
          worker.on('message', onMessage);
          worker.on('error', onError);
          worker.on('exit', onExit);
          listeners.push(() => {
            worker.off('message', onMessage);
            worker.off('error', onError);
            worker.off('exit', onExit);
          });
          worker.postMessage({ type: 'job', job } satisfies ToScanWorker);
          give(worker);
        });
      });
    },

    close: stopAll,
  };
}
