/**
 * The fit worker (bundled to dist/worker.js): runs one analysis off the extension host's event
 * loop. Its request is its first message (the thread may be started before it is needed). It
 * opens the data file read-only, posts a provisional result from the first bytes of a large file,
 * hashes the bytes while the full analysis reads them (after a provisional result, in a thread of
 * its own: fullAnalysisInFreshThread), posts the full result (with the script of the "generate fit
 * script" command when the request asks for one: fitScript.ts), and ends. The host cancels by
 * terminating the thread, which stops any thread it started, so nothing here polls for cancellation.
 */
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';
import { availableParallelism } from 'node:os';
import { performance } from 'node:perf_hooks';
import { parentPort, Worker, workerData } from 'node:worker_threads';
import { analyze } from '../core/analyze';
import { DataError } from '../core/errors';
import { DEFAULT_FIT_OPTIONS } from '../core/types';
import { inspectTable } from '../core/read/index';
import type { TableInspection } from '../core/read/types';
import { memorySource, type ByteSource, type Progress } from '../core/source';
import { openFileSource } from '../node/fileSource';
import { useScratchFolder } from '../node/scratchFiles';
import { createParallelScanner } from '../node/parallelScan';
import type { ColumnChoice } from '../shared/messages';
import { packReport, sampleBuffers, unpackReport } from '../shared/packedSample';
import { fitScript } from './fitScript';
import { FIRST_LOOK_PHASE, FULL_ANALYSIS_PHASE, FULL_ANALYSIS_ROLE, type FitFailure, type FitRequest, type FromWorker } from './workerProtocol';

/** Epoch milliseconds, comparable with the host's (see WorkerTiming). */
const clock = (): number => performance.timeOrigin + performance.now();

const port = parentPort;
if (!port) throw new Error('worker.ts runs only as a worker thread');

/**
 * Points in the provisional answer's plot sample. Handing a report to the panel costs the host
 * roughly in proportion to its sample (VS Code serializes every posted message on the host's event
 * loop: measured here ~0.7–1.4 s for 50 000 points on a busy two-core machine), and the first look
 * is about arriving quickly; the full answer brings the full sample.
 */
const PROVISIONAL_PLOT_BUDGET = 10_000;

function post(message: FromWorker): void {
  // A report's sample buffers move to the host instead of being copied (the worker is done with them).
  port!.postMessage(message, message.type === 'result' ? sampleBuffers(message.report.sample) : []);
}

/** SHA-256 of the file's bytes, read through its own read-only stream. */
function hashFile(path: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const hash = createHash('sha256');
    createReadStream(path, { flags: 'r', highWaterMark: 1 << 20 })
      .on('data', (chunk) => hash.update(chunk))
      .on('error', reject)
      .on('end', () => resolve(hash.digest('hex')));
  });
}

function columnChoices(inspection: TableInspection): ColumnChoice[] {
  return inspection.columns.map((column) => ({ name: column.name, kind: column.kind, distinct: column.distinct }));
}

/**
 * Maps the passes of one analysis onto [0, 1] of its bytes: the rows are read twice (moments,
 * then scores), so each pass is one half; the inspection reads only the head and counts as zero.
 * Posts at most every 100 ms and never goes backwards (the drop-columns policy re-reads pass 1).
 */
function progressPoster(phase: string): (progress: Progress) => void {
  let lastFraction = -1;
  let lastTime = 0;
  return (progress) => {
    const share = progress.bytesTotal > 0 ? Math.min(1, progress.bytesRead / progress.bytesTotal) : 1;
    const fraction = progress.pass === 'inspect' ? 0 : progress.pass === 'moments' ? share / 2 : 0.5 + share / 2;
    const now = Date.now();
    if (fraction <= lastFraction || (now - lastTime < 100 && fraction < 1)) return;
    lastFraction = fraction;
    lastTime = now;
    post({ type: 'progress', phase, fraction });
  };
}

function toFailure(error: unknown): FitFailure {
  if (error instanceof DataError) {
    return { code: error.code, message: error.message, hint: error.hint, where: { ...error.where } };
  }
  const unexpected = error instanceof Error ? error : new Error(String(error));
  return { code: 'internal', message: `Unexpected failure: ${unexpected.message}`, stack: unexpected.stack };
}

async function run(request: FitRequest): Promise<void> {
  const started = clock();
  let source: Awaited<ReturnType<typeof openFileSource>> | undefined;
  try {
    const bytes = request.bytes;
    source = bytes ? { ...memorySource(request.path, bytes), close: async () => undefined } : await openFileSource(request.path);
    const startHashing = (): Promise<string> => {
      const hashing = (bytes ? Promise.resolve(createHash('sha256').update(bytes).digest('hex')) : hashFile(request.path)).then((sha256) => {
        post({ type: 'hashed', sha256 });
        return sha256;
      });
      hashing.catch(() => undefined); // a read failure surfaces through the analysis or the await below
      return hashing;
    };
    let lookedFirst = false;
    if (source.size > request.provisionalBytes) {
      lookedFirst = true;
      try {
        const quickOptions = { ...request.options, plotBudget: Math.min(request.options.plotBudget ?? DEFAULT_FIT_OPTIONS.plotBudget, PROVISIONAL_PLOT_BUDGET) };
        const analysisStarted = clock();
        const quick = await analyze(source, quickOptions, {
          provisionalBytes: request.provisionalBytes,
          onProgress: progressPoster(FIRST_LOOK_PHASE),
        });
        post({ type: 'result', report: packReport(quick.report), columns: columnChoices(quick.inspection), timing: { started, analysisStarted, analysisEnded: clock() } });
      } catch (error) {
        // The first bytes may hold one class only, or end inside a row: the full pass decides.
        if (!(error instanceof DataError)) throw error;
      }
    }
    // Hashing reads the whole file on this thread: it starts once the first look is out, not beside it.
    // Its reads are asynchronous and so are the analysis's here (no blocking file source): a
    // blocking reader lets the event loop turn only every 20 ms, and the hash then fell behind
    // the analysis of the 1 GB table, delaying the full answer by ~0.7 s.
    const hashing = startHashing();
    // After a first look, the full analysis runs in a fresh thread. V8 compiles the closures that
    // a second analysis in the same thread makes (its passes' batch callbacks, the leave-one-out
    // scoring) without the constants the first one's had folded in: measured on the 1 GB table,
    // one scan thread, the full analysis took 13.4 s after the first look in the same thread and
    // 10.0 s alone. (A table in memory stays here: it would be copied to the thread.)
    const answer = lookedFirst && !bytes ? await fullAnalysisInFreshThread(request, started) : await fullAnalysis(source, request, started);
    if (answer.type === 'result') {
      answer.report.source.sha256 = await hashing;
      if (request.script) answer.script = await fitScript(source, request.path, unpackReport(answer.report), request.script);
    }
    post(answer);
  } catch (error) {
    post({ type: 'failed', failure: toFailure(error), columns: await columnsIfReadable(source, request) });
  } finally {
    await source?.close();
  }
}

type ResultMessage = Extract<FromWorker, { type: 'result' }>;
type FailedMessage = Extract<FromWorker, { type: 'failed' }>;

/** The full analysis of the request's table in this thread, as the message that carries its result. */
async function fullAnalysis(source: ByteSource, request: FitRequest, started: number): Promise<ResultMessage> {
  const scanner = request.bytes ? undefined : parallelScanner(request);
  const analysisStarted = clock();
  let full;
  try {
    full = await analyze(source, request.options, { onProgress: progressPoster(FULL_ANALYSIS_PHASE), ...(scanner ? { scanner } : {}) });
  } finally {
    await scanner?.close();
  }
  return { type: 'result', report: packReport(full.report), columns: columnChoices(full.inspection), timing: { started, analysisStarted, analysisEnded: clock() } };
}

/**
 * The full analysis in a thread of this script started for it (workerData FULL_ANALYSIS_ROLE):
 * its progress is passed on as it comes, its result or failure returned. Terminating this thread
 * (the host cancelling) stops that one too.
 */
function fullAnalysisInFreshThread(request: FitRequest, started: number): Promise<ResultMessage | FailedMessage> {
  return new Promise((resolve) => {
    const thread = new Worker(__filename, { workerData: FULL_ANALYSIS_ROLE });
    thread.on('message', (message: FromWorker) => {
      if (message.type === 'progress') post(message);
      else if (message.type === 'result' || message.type === 'failed') resolve(message);
    });
    thread.on('error', (error) => resolve({ type: 'failed', failure: toFailure(error) }));
    // After an answer this settles nothing (a promise settles once).
    thread.on('exit', (code) => resolve({ type: 'failed', failure: { code: 'internal', message: `The analysis stopped without an answer (thread exit code ${code}).` } }));
    const job: FullAnalysisJob = { request, started };
    thread.postMessage(job);
  });
}

interface FullAnalysisJob {
  request: FitRequest;
  /** When the fit worker took the request (WorkerTiming.started). */
  started: number;
}

/** The thread started by fullAnalysisInFreshThread: opens the file, analyses it, posts the answer. */
async function runFullAnalysis({ request, started }: FullAnalysisJob): Promise<void> {
  let source: Awaited<ReturnType<typeof openFileSource>> | undefined;
  try {
    source = await openFileSource(request.path);
    post(await fullAnalysis(source, request, started));
  } catch (error) {
    post({ type: 'failed', failure: toFailure(error), columns: await columnsIfReadable(source, request) });
  } finally {
    await source?.close();
  }
}

/**
 * Threads for the row passes of large splittable text (src/node/parallelScan.ts; it reads small
 * files with one thread anyway). One core stays with the editor: its host, renderer and this
 * worker's own bookkeeping, so a two-core machine reads with this worker alone.
 */
function parallelScanner(request: FitRequest): ReturnType<typeof createParallelScanner> | undefined {
  const threads = request.scanThreads ?? availableParallelism() - 1;
  return threads >= 2 ? createParallelScanner(request.path, request.path, { workers: threads, blockingReads: false }) : undefined;
}

/** The columns, when the table's head can still be read, so the panel can offer another label. */
async function columnsIfReadable(
  source: Awaited<ReturnType<typeof openFileSource>> | undefined,
  request: FitRequest,
): Promise<ColumnChoice[] | undefined> {
  if (!source) return undefined;
  try {
    return columnChoices(await inspectTable(source, request.options.read));
  } catch {
    return undefined;
  }
}

// The request is the first message: a thread may be started before it is needed (fitWorkers.ts).
// Both threads spill into the fit's scratch folder (the host removes it).
if (workerData === FULL_ANALYSIS_ROLE) {
  port.once('message', (job: FullAnalysisJob) => {
    useScratchFolder(job.request.scratchFolder ?? null);
    void runFullAnalysis(job);
  });
} else {
  port.once('message', (request: FitRequest) => {
    useScratchFolder(request.scratchFolder ?? null);
    void run(request);
  });
}
