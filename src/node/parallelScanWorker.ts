/**
 * A worker thread of the parallel row passes (bundled to dist/scanWorker.js): opens the data file
 * read-only, runs each job it is given (openPassJob) over the ranges it is handed, one at a time,
 * and posts each range's part and, when told to finish, its job result.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { DataError } from '../core/errors';
import { openPassJob, type PassJobRunner } from '../core/parallel/passJobs';
import type { ByteSource, Progress } from '../core/source';
import { openFileSource } from './fileSource';
import type { ErrorData, FromScanWorker, ScanWorkerData, ToScanWorker } from './parallelScanProtocol';
import { useScratchFolder } from './scratchFiles';

const PROGRESS_INTERVAL_MS = 100;

const port = parentPort;
if (!port) throw new Error('parallelScanWorker.ts runs only as a worker thread');

function post(message: FromScanWorker): void {
  port!.postMessage(message);
}

function errorData(error: unknown): ErrorData {
  if (error instanceof DataError) {
    return { name: error.name, message: error.message, code: error.code, where: { ...error.where }, ...(error.hint !== undefined ? { hint: error.hint } : {}) };
  }
  const e = error instanceof Error ? error : new Error(String(error));
  return { name: e.name, message: e.message, ...(e.stack !== undefined ? { stack: e.stack } : {}) };
}

const { path, name, scratch } = workerData as ScanWorkerData;
if (scratch) useScratchFolder(scratch.folder, scratch.limits);
const opened = openFileSource(path, { blocking: true });
let runner: PassJobRunner | null = null;
// Messages are handled one after the other: a range is scanned to its end before the next.
let queue: Promise<void> = Promise.resolve();

/** One source object for all the messages: readers may keep what they learnt of it (a Parquet footer). */
const source: Promise<ByteSource> = opened.then((file) => ({ name, size: file.size, read: (offset, length) => file.read(offset, length) }));

async function handle(message: ToScanWorker): Promise<void> {
  const sourceOfFile = await source;
  if (message.type === 'job') {
    runner = openPassJob(sourceOfFile, message.job);
  } else if (message.type === 'range') {
    const index = message.index;
    let posted = 0;
    const onProgress = (progress: Progress): void => {
      // Only a byte range's progress is relative to it (a row range counts when done); at most
      // ten a second: each message costs the main thread a wake-up.
      if (!message.task.range) return;
      const now = Date.now();
      if (now - posted < PROGRESS_INTERVAL_MS) return;
      posted = now;
      post({ type: 'progress', index, bytesRead: progress.bytesRead });
    };
    const part = await runner!.scan(message.task, { onProgress });
    post({ type: 'part', index, part });
  } else {
    const result = runner!.finish();
    runner = null;
    post({ type: 'result', result });
  }
}

port.on('message', (message: ToScanWorker) => {
  queue = queue.then(() => handle(message)).catch((error: unknown) => post({ type: 'error', error: errorData(error) }));
});
