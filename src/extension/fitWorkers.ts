/**
 * Starts fit workers (dist/worker.js) and keeps count of the live ones. One worker runs one
 * request; cancelling terminates the thread at once, which also closes the files it opened.
 */
import { Worker } from 'node:worker_threads';
import type { ColumnChoice, PanelReport } from '../shared/messages';
import type { FitFailure, FitRequest, FromWorker, WorkerTiming } from './workerProtocol';

export interface FitJobListener {
  progress(phase: string, fraction: number): void;
  hashed(sha256: string): void;
  /** Called for a provisional report (report.provisional) and for the final one. */
  result(report: PanelReport, columns: ColumnChoice[], timing?: WorkerTiming): void;
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

  constructor(private readonly workerPath: string) {}

  /** Worker threads currently alive (started and not yet exited). */
  get count(): number {
    return this.live.size;
  }

  /** Stops every worker (the extension is shutting down). */
  dispose(): void {
    for (const worker of this.live) void worker.terminate();
  }

  start(request: FitRequest, listener: FitJobListener): FitJob {
    const worker = new Worker(this.workerPath, { workerData: request });
    this.live.add(worker);
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
            listener.result(message.report, message.columns, message.timing);
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
        if (settle()) {
          listener.failed({ code: 'internal', message: `The analysis stopped without an answer (worker exit code ${code}).` });
        }
        resolve(cancelled ? 'cancelled' : 'finished');
      });
    });
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
