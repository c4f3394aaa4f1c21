/**
 * The Node edge of the parallel row passes: a RangeScanner bound to one file. The calling thread
 * scans ranges itself, beside `workers − 1` worker threads (each opens the file read-only for
 * itself): the caller would otherwise only wait, and a thread fewer is some 50 MB less memory.
 * Pass the scanner to analyze() as `scanner`; close it when the analysis is done. The threads
 * serve every pass of the analysis; they start with the scanner for a CSV or TSV file large enough
 * to be split (starting a thread takes a good part of a second on a busy machine, spent while the
 * file is inspected), else at the first pass that uses them. A cancellation or an error stops
 * them, and so does `release` once the rows are read (a later pass starts new ones).
 *
 * Scanning threads: the machine's available parallelism (os.availableParallelism), at most 8.
 * They spill into the calling thread's scratch folder (scratchFiles.ts), when it has one.
 */
import { statSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { CancelledError, DataError } from '../core/errors';
import { formatFromName } from '../core/read/format';
import { progressPassOf } from '../core/parallel/inProcessScanner';
import { openPassJob } from '../core/parallel/passJobs';
import type { RangeScanner } from '../core/parallel/rangeScanner';
import type { ByteSource } from '../core/source';
import { openFileSource } from './fileSource';
import type { ErrorData, FromScanWorker, ScanWorkerData, ToScanWorker } from './parallelScanProtocol';
import { scratchFolderInUse } from './scratchFiles';

export interface ParallelScanOptions {
  /** Threads scanning at once, the calling one included. Default: available parallelism, at most 8. */
  workers?: number;
  /** Default 32 MiB: below that one thread reads the file while the workers would still be starting. */
  minimumBytes?: number;
  /** Bytes per range (tests use small ones); default as splitAtRowStarts decides. */
  rangeBytes?: number;
  /** The bundled worker (default: scanWorker.js beside this bundle, i.e. dist/scanWorker.js). */
  workerScript?: string;
  /**
   * Whether the calling thread reads its ranges with blocking reads (fileSource.ts), as the worker
   * threads always do. Default true; false for a calling thread that has other reading to do
   * beside the scan on its event loop (the fit worker hashes the file meanwhile).
   */
  blockingReads?: boolean;
  /** Called as each worker thread comes online (the command line re-applies its V8 flags then: see src/cli/youngGeneration.ts). */
  onWorkerOnline?: () => void;
}

export const DEFAULT_MINIMUM_BYTES = 32 * 1024 * 1024;

/**
 * A worker's young generation: its passes allocate little (typed arrays reused across batches), and
 * V8's default lets the semi-spaces grow to 16 MiB each, memory the process holds to its end.
 */
const WORKER_LIMITS = { maxYoungGenerationSizeMb: 4 };

/** Ranges handed to a worker thread ahead: it starts the next as soon as it ends one, even while the calling thread is busy scanning. */
const AHEAD = 2;

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
  let local: Promise<ByteSource & { close(): Promise<void> }> | null = null;

  const stopAll = async (): Promise<void> => {
    const stopping = pool;
    pool = [];
    await Promise.all(stopping.map((w) => w.terminate()));
  };

  const ensurePool = (): Worker[] => {
    while (pool.length < workers - 1) {
      const data: ScanWorkerData = { path, name, scratch: scratchFolderInUse() };
      const worker = new Worker(script, { workerData: data, resourceLimits: WORKER_LIMITS });
      if (options.onWorkerOnline) worker.once('online', options.onWorkerOnline);
      pool.push(worker);
    }
    return pool;
  };
  const minimumBytes = options.minimumBytes ?? DEFAULT_MINIMUM_BYTES;
  const format = formatFromName(name) ?? formatFromName(path);
  if (workers > 1 && size >= minimumBytes && (format === 'csv' || format === 'tsv')) ensurePool();

  let localNamed: Promise<ByteSource> | null = null;
  const localSource = (): Promise<ByteSource> => {
    // One source object for every pass: readers may keep what they learnt of it (a Parquet footer).
    local ??= openFileSource(path, { blocking: options.blockingReads ?? true });
    localNamed ??= local.then((file) => ({ name, size: file.size, read: (offset, length) => file.read(offset, length) }));
    return localNamed;
  };

  return {
    workers,
    minimumBytes,
    ...(options.rangeBytes !== undefined ? { rangeBytes: options.rangeBytes } : {}),

    run(job, count, task, onPart, control) {
      if (control?.signal?.aborted) return Promise.reject(new CancelledError());
      const threads = ensurePool();
      const pass = progressPassOf(job);
      const progress = new Float64Array(count);
      const sizes = new Float64Array(count);
      let next = 0;
      const results: unknown[] = new Array(threads.length + 1);
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
        const done = (slot: number, result: unknown): void => {
          results[slot] = result;
          finished++;
          if (finished === results.length) settle(null);
        };
        const reportProgress = (): void => {
          if (!control?.onProgress) return;
          let read = 0;
          for (let i = 0; i < count; i++) read += Math.min(progress[i]!, sizes[i]!);
          control.onProgress({ pass, bytesRead: read, bytesTotal: size });
        };
        /** The next range's index and description, or null when all are handed out. */
        const take = (): { index: number; described: ReturnType<typeof task> } | null => {
          if (next >= count) return null;
          const index = next++;
          const described = task(index);
          sizes[index] = described.bytes;
          return { index, described };
        };
        const accept = (index: number, part: unknown): boolean => {
          progress[index] = sizes[index]!;
          try {
            onPart(index, part);
            return true;
          } catch (error) {
            settle(error as Error);
            return false;
          }
        };

        // The calling thread's first range is the first of all: where a range passes over rows before
        // it (a Parquet row group split in runs: the second run decompresses the first), the
        // calling thread, which also merges the parts and has read the footer and any shared
        // dictionaries, does not pass over any.
        let firstLocal: ReturnType<typeof take> = null;
        try {
          firstLocal = take();
        } catch (error) {
          settle(error as Error);
          return;
        }

        // Worker threads: each keeps AHEAD ranges in hand (fewer when there are too few ranges to go
        // round: with two shares and one worker, two in hand left the calling thread none), then is
        // told to finish.
        const ahead = Math.max(1, Math.min(AHEAD, Math.floor(count / (threads.length + 1))));
        threads.forEach((worker, w) => {
          let inHand = 0;
          let finishing = false;
          const give = (): void => {
            let taken;
            try {
              taken = take();
            } catch (error) {
              settle(error as Error);
              return;
            }
            if (taken) {
              inHand++;
              worker.postMessage({ type: 'range', index: taken.index, task: taken.described } satisfies ToScanWorker);
            } else if (inHand === 0 && !finishing) {
              finishing = true;
              worker.postMessage({ type: 'finish' } satisfies ToScanWorker);
            }
          };
          const onMessage = (message: FromScanWorker): void => {
            if (settled) return;
            if (message.type === 'progress') {
              progress[message.index] = message.bytesRead;
              reportProgress();
            } else if (message.type === 'part') {
              inHand--;
              if (accept(message.index, message.part)) give();
            } else if (message.type === 'result') done(w, message.result);
            else settle(toError(message.error));
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
          for (let i = 0; i < ahead; i++) give();
        });

        // The calling thread scans too, one range after another.
        void (async (): Promise<void> => {
          const runner = openPassJob(await localSource(), job);
          for (;;) {
            if (settled) return;
            const taken = firstLocal ?? take();
            firstLocal = null;
            if (!taken) break;
            const part = await runner.scan(taken.described, {
              ...(control?.signal ? { signal: control.signal } : {}),
              onProgress: (p) => {
                if (!taken.described.range) return;
                progress[taken.index] = p.bytesRead;
                reportProgress();
              },
            });
            if (settled || !accept(taken.index, part)) return;
          }
          done(threads.length, runner.finish());
        })().catch((error: unknown) => settle(error as Error));
      });
    },

    release: stopAll,

    async close(): Promise<void> {
      await stopAll();
      const file = local;
      local = null;
      localNamed = null;
      await (await file)?.close();
    },
  };
}
