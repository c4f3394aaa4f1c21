/**
 * A RangeScanner whose "workers" take turns in the calling thread: the same jobs, ranges, parts
 * and merges as the worker threads of src/node/parallelScan.ts, without the threads. Jobs, tasks
 * and parts go through structuredClone, as they would between threads, so what works here
 * crosses a thread boundary too. For tests, and for hosts without threads.
 */
import { CancelledError, throwIfAborted } from '../errors';
import type { ByteSource, Progress } from '../source';
import { openPassJob } from './passJobs';
import type { PassJob, RangeScanner } from './rangeScanner';

/** The pass name progress events carry for a job. */
export function progressPassOf(job: PassJob): Progress['pass'] {
  return job.kind === 'second' ? 'rows' : 'moments';
}

/**
 * The source for the turn-taking workers: one read at a time, each returned as a copy. A source may
 * read into one reused buffer (the ByteSource contract lets it), and two scans reading at once
 * would otherwise overwrite each other's bytes.
 */
function oneReadAtATime(source: ByteSource): ByteSource {
  let queue: Promise<unknown> = Promise.resolve();
  return {
    name: source.name,
    size: source.size,
    read(offset, length) {
      const result = queue.then(async () => (await source.read(offset, length)).slice());
      queue = result.catch(() => undefined);
      return result;
    },
  };
}

export function inProcessScanner(shared: ByteSource, options: { workers: number; minimumBytes?: number; rangeBytes?: number }): RangeScanner {
  const source = oneReadAtATime(shared);
  return {
    workers: options.workers,
    minimumBytes: options.minimumBytes ?? 0,
    ...(options.rangeBytes !== undefined ? { rangeBytes: options.rangeBytes } : {}),
    async run(job, count, task, onPart, control) {
      throwIfAborted(control?.signal);
      const pass = progressPassOf(job);
      const done: number[] = new Array(count).fill(0);
      let total = 0;
      let next = 0;
      const worker = async (): Promise<unknown> => {
        const runner = openPassJob(source, structuredClone(job));
        while (next < count) {
          const index = next++;
          const described = structuredClone(task(index));
          const size = described.bytes;
          total += size;
          const part = await runner.scan(described, {
            ...(control?.signal ? { signal: control.signal } : {}),
            onProgress: (progress) => {
              // Only a byte range's progress is relative to it; a row range counts when done.
              if (!described.range) return;
              done[index] = Math.min(size, progress.bytesRead);
              control?.onProgress?.({ pass, bytesRead: done.reduce((a, b) => a + b, 0), bytesTotal: Math.max(total, source.size) });
            },
          });
          done[index] = size;
          onPart(index, structuredClone(part));
        }
        return structuredClone(runner.finish());
      };
      const results = await Promise.all(Array.from({ length: options.workers }, worker));
      if (control?.signal?.aborted) throw new CancelledError();
      return results;
    },
  };
}
