/**
 * Starts fit workers (dist/worker.js) and keeps count of the live ones. One worker runs one
 * request; cancelling terminates the thread at once, which also closes the files it opened.
 *
 * One spare thread is kept started with its bundle loaded (from activation, and again after each
 * fit ends), so the next fit begins at once: starting a thread and loading the 1 MB bundle is
 * ~0.2 s of CPU, most of the time to the editor's first look when the machine is busy.
 */
import { Worker } from 'node:worker_threads';
import { newScratchFolder, removeScratchFolder } from '../node/scratchFiles';
import type { ColumnChoice, PanelReport } from '../shared/messages';
import type { FitFailure, FitRequest, FromWorker, WorkerTiming } from './workerProtocol';

export interface FitJobListener {
  progress(phase: string, fraction: number): void;
  hashed(sha256: string): void;
  /** Called for a provisional report (report.provisional) and for the final one, which carries the requested script (FitRequest.script). */
  result(report: PanelReport, columns: ColumnChoice[], timing?: WorkerTiming, script?: string): void;
  failed(failure: FitFailure, columns?: ColumnChoice[]): void;
}

export type FitJobEnd = 'finished' | 'cancelled';

export interface FitJob {
  /** Settles once the worker thread has exited. */
  readonly ended: Promise<FitJobEnd>;
  cancel(): void;
}

export class FitWorkers {
  private readonly live = new Set<Worker>();
  /** A thread started ahead of need, waiting for its request as its first message. */
  private spare: Worker | undefined;
  private disposed = false;

  constructor(private readonly workerPath: string) {}

  /** Worker threads running a request (started and not yet exited); the spare is not one of them. */
  get count(): number {
    return this.live.size;
  }

  /** Stops every worker (the extension is shutting down). */
  dispose(): void {
    this.disposed = true;
    for (const worker of this.live) void worker.terminate();
    void this.spare?.terminate();
    this.spare = undefined;
  }

  /** Starts the spare thread when there is none. */
  prepare(): void {
    if (this.spare || this.disposed) return;
    const spare = new Worker(this.workerPath);
    // Waiting for work must not keep the host alive; a spare that fails to start is simply dropped.
    spare.unref();
    const drop = (): void => {
      if (this.spare === spare) this.spare = undefined;
    };
    spare.once('error', drop);
    spare.once('exit', drop);
    this.spare = spare;
  }

  start(request: FitRequest, listener: FitJobListener): FitJob {
    const spare = this.spare;
    this.spare = undefined;
    const worker = spare ?? new Worker(this.workerPath);
    if (spare) {
      spare.removeAllListeners();
      spare.ref();
    }
    this.live.add(worker);
    const scratchFolder = request.scratchFolder ?? newScratchFolder();
    let settled = false;
    let cancelled = false;
    const settle = (): boolean => {
      if (settled || cancelled) return false;
      settled = true;
      return true;
    };
    worker.on('message', (message: FromWorker) => {
      if (cancelled || settled) return;
      switch (message.type) {
        case 'progress':
          listener.progress(message.phase, message.fraction);
          break;
        case 'hashed':
          listener.hashed(message.sha256);
          break;
        case 'result':
          if (!message.report.provisional && settle()) {
            listener.result(message.report, message.columns, message.timing, message.script);
            void worker.terminate();
          } else if (message.report.provisional) {
            listener.result(message.report, message.columns, message.timing);
          }
          break;
        case 'failed':
          if (settle()) {
            listener.failed(message.failure, message.columns);
            void worker.terminate();
          }
          break;
      }
    });
    worker.on('error', (error) => {
      if (settle()) listener.failed({ code: 'internal', message: `The analysis stopped: ${error.message}`, stack: error.stack });
    });
    const ended = new Promise<FitJobEnd>((resolve) => {
      worker.on('exit', (code) => {
        this.live.delete(worker);
        // Its spills (a Parquet file's huge row group: src/core/read/parquetSpill.ts) go with it.
        removeScratchFolder(scratchFolder);
        // The next fit gets a started thread; made when this one is done, not beside its work.
        this.prepare();
        if (settle()) {
          listener.failed({ code: 'internal', message: `The analysis stopped without an answer (worker exit code ${code}).` });
        }
        resolve(cancelled ? 'cancelled' : 'finished');
      });
    });
    worker.postMessage({ ...request, scratchFolder } satisfies FitRequest);
    return {
      ended,
      cancel: () => {
        if (settled || cancelled) return;
        cancelled = true;
        void worker.terminate();
      },
    };
  }
}
