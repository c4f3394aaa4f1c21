/**
 * The wide-table figures of the side-by-side benchmark, measured in a child process:
 *  - the moments update (MomentsAccumulator: per-class shift, blocks of rows, the blocked rank-k
 *    cross-product, Chan merges) over n rows of d features held in memory, in one thread and split
 *    over two as the parallel pass 1 runs it (two threads that live for the whole measurement,
 *    claiming shares of the rows as the passes claim ranges of a file; the first split untimed,
 *    as numpy's first product is), against numpy's X.T @ X on the very same rows
 *    (bench/alternatives/cross_product.py reads the file written here). Measured two ways:
 *    "steady", into an accumulator that already holds the rows once, as the bulk of a long pass
 *    runs (its scatters' memory touched) and as numpy's timed products run (they reuse the memory
 *    of the warm-up product that cross_product.py leaves out); and "fresh", into a new accumulator,
 *    which first touches K scatters of d × d doubles (on this kind of virtual machine a first
 *    touch costs 12–20 µs per 4 KiB page: ten scatters at d = 1000 take ~0.3 s of it);
 *  - the fit from moments at d = 1000, K = 10: solveLda alone (the discriminants, the target) and
 *    fitMoments (everything a report takes from the moments: LDA, PCA, the tests with Box's M).
 * Rows: uniform values with small class shifts on every third feature, K classes in turn, from the
 * Park–Miller generator, written once as little-endian float64 (n × d, row-major).
 */
import { closeSync, existsSync, openSync, readFileSync, writeSync } from 'node:fs';
import { Worker, parentPort } from 'node:worker_threads';
import { simdAvailable } from '../src/core/crossProductKernel';
import { solveLda } from '../src/core/lda';
import { guidedRangeBytes } from '../src/core/parallel/rowPasses';
import { MomentsAccumulator, mergeMomentsInPlace, momentsBuffers, type Moments } from '../src/core/moments';
import { fitMoments } from '../src/core/pipeline/fitMoments';
import { resolveOptions } from '../src/core/pipeline/options';

export function writeKernelRows(path: string, n: number, d: number, classes: number): void {
  if (existsSync(path)) return;
  let state = 7;
  const file = openSync(path, 'w');
  const block = new Float64Array(1000 * d);
  for (let start = 0; start < n; start += 1000) {
    const rows = Math.min(1000, n - start);
    for (let r = 0; r < rows; r++) {
      const k = (start + r) % classes;
      for (let j = 0; j < d; j++) {
        state = (state * 48271) % 2147483647;
        block[r * d + j] = state / 2147483647 + (j % 3 === 0 ? 0.05 * k : 0);
      }
    }
    writeSync(file, new Uint8Array(block.buffer, 0, rows * d * 8));
  }
  closeSync(file);
}

/** The rows, on a SharedArrayBuffer (the split update's threads share them). */
function readRows(path: string, n: number, d: number): Float64Array {
  const bytes = readFileSync(path);
  const values = new Float64Array(new SharedArrayBuffer(n * d * 8));
  new Uint8Array(values.buffer).set(bytes.subarray(0, n * d * 8));
  return values;
}

const median = (values: number[]): number => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]!;

export interface KernelResult {
  n: number;
  d: number;
  /** Whether the cross-product ran as WebAssembly SIMD. */
  simd: boolean;
  /** Median seconds, one thread, of the steady update: all n rows into an accumulator that already holds them once, and its finish(). */
  momentsSeconds: number;
  momentsCpuSeconds: number;
  /** The same into a new accumulator (its memory touched for the first time). */
  momentsFreshSeconds: number;
  /**
   * Median seconds of the steady update split over two worker threads (TwoThreads), each holding
   * its half of the rows once before the clock starts; the threads claim shares of the rows as the
   * parallel passes do (claimShare); the clock covers the update, the moments handed back (as the
   * parallel pass 1's workers hand them: finished accumulators, their scatters in shared memory,
   * the small arrays transferred) and the merge in place, as the parallel pass 1 needs them.
   */
  twoThreadSeconds: number;
  /** CPU seconds of the whole process (both workers and the merging thread) over that span: on a shared machine the cost of the split without the other load's waiting. */
  twoThreadCpuSeconds: number;
  /** The same into a new accumulator in each thread (warmed up on another one). */
  twoThreadFreshSeconds: number;
  /** With `fit`: median seconds of solveLda and of fitMoments on the moments. */
  solveLdaSeconds?: number;
  fitMomentsSeconds?: number;
}

/** What each of the two worker threads of the split update is handed (workerData), all of it shared, not copied. */
export interface KernelThreadData {
  /** The n × d rows, row-major, and their class ids, on SharedArrayBuffers. */
  values: Float64Array;
  ids: Int32Array;
  /** The next row not yet claimed by a thread (one Int32 on a SharedArrayBuffer). */
  next: Int32Array;
  n: number;
  d: number;
  classes: number;
  /** The rows this thread adds before a steady run (its half: the rows the moments already hold). */
  first: number;
  count: number;
}

/** Main thread to worker: get ready for a run (steady or fresh), then go. */
type KernelOrder = { prepare: 'steady' | 'fresh' } | 'go';

/**
 * The next share of rows, [start, end), or null when all are claimed: as long as the parallel
 * passes' next text range would be for the rest of the rows' doubles (guidedRangeBytes: large
 * shares first, small ones last, so that a thread slowed by the machine's other load takes
 * fewer), claimed with a compare-and-swap on the shared counter.
 */
function claimShare(data: KernelThreadData): [number, number] | null {
  const rowBytes = 8 * data.d;
  for (;;) {
    const start = Atomics.load(data.next, 0);
    if (start >= data.n) return null;
    const end = Math.min(data.n, start + Math.max(1, Math.ceil(guidedRangeBytes((data.n - start) * rowBytes, 2) / rowBytes)));
    if (Atomics.compareExchange(data.next, 0, start, end) === start) return [start, end];
  }
}

/**
 * In each of the two worker threads of the split update (TwoThreads), for every run: on
 * `prepare`, a steady run's accumulator takes the thread's half of the rows (untimed), a fresh
 * run's is made on `go`; on `go` the thread claims shares of the rows until none is left, adds
 * them, and hands the moments back (MomentsAccumulator.finish: the scatters shared, not copied).
 */
export function kernelThread(data: KernelThreadData): void {
  const labels = Array.from({ length: data.classes }, (_, k) => `class ${k + 1}`);
  const features = Array.from({ length: data.d }, (_, j) => `feature_${j + 1}`);
  let accumulator: MomentsAccumulator | null = null;
  parentPort!.on('message', (order: KernelOrder) => {
    if (order !== 'go') {
      accumulator = order.prepare === 'steady' ? warmUp(features, data.values.subarray(data.first * data.d), data.ids.subarray(data.first), data.count, labels) : null;
      parentPort!.postMessage('ready');
      return;
    }
    const target = accumulator ?? new MomentsAccumulator(features);
    for (let share = claimShare(data); share; share = claimShare(data)) {
      const [start, end] = share;
      target.add(data.values.subarray(start * data.d, end * data.d), data.ids.subarray(start, end), end - start, labels);
    }
    const moments = target.finish();
    parentPort!.postMessage(moments, momentsBuffers(moments));
  });
}

/**
 * An accumulator that has taken the rows once, so that the timed runs see optimised code
 * (JavaScript and WebAssembly tiered up), as the bulk of a long pass does: in a fresh thread a
 * shorter warm-up left the first timed run up to twice as slow. The steady runs go on adding to it.
 */
function warmUp(features: string[], values: Float64Array, ids: Int32Array, n: number, labels: string[]): MomentsAccumulator {
  const warm = new MomentsAccumulator(features);
  warm.add(values, ids, n, labels);
  return warm;
}

/**
 * The split update: two worker threads that live for the whole measurement, as the parallel
 * passes' threads live for a fit, holding the rows once between them (shared memory). run()
 * returns the seconds (wall and CPU) from `go` until the threads' moments are merged.
 */
class TwoThreads {
  private readonly workers: Worker[];
  private readonly next: Int32Array;

  /** `values` and `ids` on SharedArrayBuffers. */
  constructor(values: Float64Array, ids: Int32Array, n: number, d: number, classes: number) {
    this.next = new Int32Array(new SharedArrayBuffer(4));
    const half = Math.floor(n / 2);
    this.workers = [0, half].map((first) => {
      const data: KernelThreadData = { values, ids, next: this.next, n, d, classes, first, count: first === 0 ? half : n - half };
      return new Worker(__filename, { workerData: { kernelThread: data } });
    });
  }

  private all<T>(order: KernelOrder): Promise<T[]> {
    return Promise.all(
      this.workers.map(
        (worker) =>
          new Promise<T>((resolve, reject) => {
            const fail = (error: Error): void => reject(error);
            worker.once('error', fail);
            worker.once('message', (message: T) => {
              worker.off('error', fail);
              resolve(message);
            });
            worker.postMessage(order);
          }),
      ),
    );
  }

  async run(steady: boolean): Promise<{ wall: number; cpu: number }> {
    await this.all<string>({ prepare: steady ? 'steady' : 'fresh' });
    Atomics.store(this.next, 0, 0);
    const started = performance.now();
    const used = process.cpuUsage();
    const parts = await this.all<Moments>('go');
    mergeMomentsInPlace(parts[0]!, parts[1]!);
    const seconds = (performance.now() - started) / 1000;
    const cpu = process.cpuUsage(used);
    return { wall: seconds, cpu: (cpu.user + cpu.system) / 1e6 };
  }

  close(): Promise<number[]> {
    return Promise.all(this.workers.map((w) => w.terminate()));
  }
}

/** Times the moments update (and with `fit` the fit from its moments); prints nothing. */
export async function measureKernel(path: string, n: number, d: number, classes: number, fit: boolean): Promise<KernelResult> {
  const values = readRows(path, n, d);
  const ids = new Int32Array(new SharedArrayBuffer(n * 4));
  for (let i = 0; i < n; i++) ids[i] = i % classes;
  const labels = Array.from({ length: classes }, (_, k) => `class ${k + 1}`);
  const features = Array.from({ length: d }, (_, j) => `feature_${j + 1}`);
  warmUp(features, values, ids, n, labels).finish();
  const fresh: number[] = [];
  let moments: Moments | null = null;
  for (let round = 0; round < 3; round++) {
    const accumulator = new MomentsAccumulator(features);
    const started = performance.now();
    accumulator.add(values, ids, n, labels);
    moments = accumulator.finish();
    fresh.push((performance.now() - started) / 1000);
  }
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let round = 0; round < 3; round++) {
    const accumulator = warmUp(features, values, ids, n, labels);
    const started = performance.now();
    const used = process.cpuUsage();
    accumulator.add(values, ids, n, labels);
    accumulator.finish();
    const spent = process.cpuUsage(used);
    cpu.push((spent.user + spent.system) / 1e6);
    wall.push((performance.now() - started) / 1000);
  }
  const two: number[] = [];
  const twoCpu: number[] = [];
  const twoFresh: number[] = [];
  const threads = new TwoThreads(values, ids, n, d, classes);
  try {
    // Untimed, as numpy's first product is: every thread's code (the merge's too) warmed up.
    await threads.run(true);
    for (let round = 0; round < 3; round++) {
      const split = await threads.run(true);
      two.push(split.wall);
      twoCpu.push(split.cpu);
      twoFresh.push((await threads.run(false)).wall);
    }
  } finally {
    await threads.close();
  }
  const result: KernelResult = {
    n,
    d,
    simd: simdAvailable(),
    momentsSeconds: median(wall),
    momentsCpuSeconds: median(cpu),
    momentsFreshSeconds: median(fresh),
    twoThreadSeconds: median(two),
    twoThreadCpuSeconds: median(twoCpu),
    twoThreadFreshSeconds: median(twoFresh),
  };
  if (fit) {
    const options = resolveOptions({});
    const lda: number[] = [];
    const whole: number[] = [];
    for (let round = 0; round < 3; round++) {
      let started = performance.now();
      solveLda(moments!, { solver: options.solver, priors: options.priors });
      lda.push((performance.now() - started) / 1000);
      started = performance.now();
      fitMoments(moments!, options);
      whole.push((performance.now() - started) / 1000);
    }
    result.solveLdaSeconds = median(lda);
    result.fitMomentsSeconds = median(whole);
  }
  return result;
}
