/**
 * Messages between the extension host and the fit worker (dist/worker.js). The worker gets one
 * request as its first message (a spare thread is started before it is needed), posts progress,
 * the content hash, at most one provisional and one final result (or an error), and then ends.
 * The host stops it with `Worker.terminate()`.
 *
 * After a provisional result, the fit worker runs the full analysis in a thread of its own (the
 * same script, started with FULL_ANALYSIS_ROLE as its workerData): it takes a FitRequest, posts
 * FromWorker messages (no 'hashed': the fit worker hashes the file meanwhile) and ends. Terminating
 * the fit worker stops that thread too (Node stops a thread's own workers with it).
 */
import type { ScriptLanguage, SqlDialect } from '../core/scripts/index';
import type { FitOptions } from '../core/types';
import type { ColumnChoice, PanelReport } from '../shared/messages';

export interface FitRequest {
  /** Local file path; the worker opens it read-only. With `bytes`, only the name shown in messages. */
  path: string;
  /** The data itself instead of a file (a version read from git for a comparison); copied to the worker. */
  bytes?: Uint8Array;
  options: Partial<FitOptions>;
  /** Analyse this many leading bytes first and post that provisional result, when the file is larger. */
  provisionalBytes: number;
  /** Threads for the row passes of large text files; default one per core but one (see worker.ts). */
  scanThreads?: number;
  /** The fit's scratch folder (src/node/scratchFiles.ts): chosen by the host, which removes it when the fit's thread has ended. */
  scratchFolder?: string;
  /** Also write this script for the finished fit (the "generate fit script" command): the final result carries its text. */
  script?: ScriptChoice;
}

/** Which script the worker writes for a finished fit (src/extension/fitScript.ts). */
export interface ScriptChoice {
  language: ScriptLanguage;
  /** Identifier and string quoting of the SQL query; `ansi` when not given. */
  dialect?: SqlDialect;
  /** Names the program and version in the script's header. */
  generator: string;
}

/** A DataError (or an unexpected failure) in a form that survives structured cloning. */
export interface FitFailure {
  /** DataError code, or `internal` for anything the core did not expect. */
  code: string;
  message: string;
  hint?: string;
  where?: { file?: string; line?: number; row?: number; column?: string; byteOffset?: number };
  /** Stack trace of an unexpected failure, for the output channel. */
  stack?: string;
}

/**
 * When the worker's steps happened, as epoch milliseconds (`performance.timeOrigin + performance.now()`,
 * comparable across threads): the host writes where the time went to its output channel.
 */
export interface WorkerTiming {
  /** The worker took its request (its bundle was loaded by then: a spare loads it before it is asked). */
  started: number;
  /** The analysis behind this result began and ended. */
  analysisStarted: number;
  analysisEnded: number;
}

/** workerData of the thread a fit worker starts for its full analysis (see above). */
export const FULL_ANALYSIS_ROLE = 'scatterwise-full-analysis';

export type FromWorker =
  | { type: 'progress'; phase: string; fraction: number }
  | { type: 'hashed'; sha256: string }
  /** The report's plot sample packed, its buffers transferred (src/shared/packedSample.ts). */
  | { type: 'result'; report: PanelReport; columns: ColumnChoice[]; timing?: WorkerTiming; script?: string }
  | { type: 'failed'; failure: FitFailure; columns?: ColumnChoice[] };

/** The progress phases a worker reports: the first look at a large file's first bytes, then the full analysis. */
export const FIRST_LOOK_PHASE = 'first look';
export const FULL_ANALYSIS_PHASE = 'analysis';
