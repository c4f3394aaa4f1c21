/**
 * The wide-table figures of the side-by-side benchmark, measured in a child process:
 *  - the moments update (MomentsAccumulator: per-class shift, blocks of rows, the blocked rank-k
 *    cross-product, Chan merges) over n rows of d features held in memory, in one thread and split
 *    over two (as the parallel pass 1 runs it), against numpy's X.T @ X on the very same rows
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

function readRows(path: string, n: number, d: number, first = 0): Float64Array {
  const bytes = readFileSync(path);
  const values = new Float64Array(n * d);
  new Uint8Array(values.buffer).set(bytes.subarray(first * d * 8, (first + n) * d * 8));
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
   * Median seconds of the steady update split over two worker threads, each started, holding its
   * half (already accumulated once, which also warms the code up) before the clock starts; the
   * clock covers the update, the moments handed back (as the parallel pass 1's workers hand them:
   * finished accumulators, their scatters in shared memory, the small arrays transferred) and the
   * merge in place, as the parallel pass 1 needs them.
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

export interface HalfTask {
  path: string;
  first: number;
  n: number;
  d: number;
  classes: number;
  /** Whether the timed update goes into the warmed-up accumulator (steady) or a new one (fresh). */
  steady: boolean;
}

/**
 * In a worker thread started by twoThreads: reads its half of the rows, accumulates them once
 * (which warms the code up) and on 'go' accumulates them again (steady) or into a new accumulator
 * (fresh) and hands the moments back (MomentsAccumulator.finish: the scatters shared, not copied).
 */
export function kernelHalfWorker(task: HalfTask): void {
  const values = readRows(task.path, task.n, task.d, task.first);
  const ids = Int32Array.from({ length: task.n }, (_, i) => (task.first + i) % task.classes);
  const labels = Array.from({ length: task.classes }, (_, k) => `class ${k + 1}`);
  const features = Array.from({ length: task.d }, (_, j) => `feature_${j + 1}`);
  const warm = warmUp(features, values, ids, task.n, labels);
  parentPort!.postMessage('ready');
  parentPort!.once('message', () => {
    const accumulator = task.steady ? warm : new MomentsAccumulator(features);
    accumulator.add(values, ids, task.n, labels);
    const moments = accumulator.finish();
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

/** Seconds (wall and CPU) to accumulate the rows in two threads (one half each) and merge their moments. */
function twoThreads(path: string, n: number, d: number, classes: number, steady: boolean): Promise<{ wall: number; cpu: number }> {
  const half = Math.floor(n / 2);
  const tasks: HalfTask[] = [
    { path, first: 0, n: half, d, classes, steady },
    { path, first: half, n: n - half, d, classes, steady },
  ];
  return new Promise<{ wall: number; cpu: number }>((resolve, reject) => {
    const workers = tasks.map((task) => new Worker(__filename, { workerData: { kernelHalf: task } }));
    let ready = 0;
    let started = 0;
    let used = process.cpuUsage();
    const parts: Moments[] = [];
    for (const worker of workers) {
      worker.on('error', reject);
      worker.on('message', (message: unknown) => {
        if (message === 'ready') {
          if (++ready === workers.length) {
            started = performance.now();
            used = process.cpuUsage();
            for (const w of workers) w.postMessage('go');
          }
          return;
        }
        parts.push(message as Moments);
        if (parts.length === workers.length) {
          mergeMomentsInPlace(parts[0]!, parts[1]!);
          const seconds = (performance.now() - started) / 1000;
          const cpu = process.cpuUsage(used);
          void Promise.all(workers.map((w) => w.terminate())).then(() => resolve({ wall: seconds, cpu: (cpu.user + cpu.system) / 1e6 }));
        }
      });
    }
  });
}

/** Times the moments update (and with `fit` the fit from its moments); prints nothing. */
export async function measureKernel(path: string, n: number, d: number, classes: number, fit: boolean): Promise<KernelResult> {
  const values = readRows(path, n, d);
  const ids = Int32Array.from({ length: n }, (_, i) => i % classes);
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
  for (let round = 0; round < 3; round++) {
    const split = await twoThreads(path, n, d, classes, true);
    two.push(split.wall);
    twoCpu.push(split.cpu);
    twoFresh.push((await twoThreads(path, n, d, classes, false)).wall);
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
