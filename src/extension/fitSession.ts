/**
 * One open data file: runs its fit in a worker, keeps the latest answer, and talks to the panels
 * showing it (usually one). A panel hears nothing before it says `ready`; a panel that was hidden
 * and shown again says `ready` again and gets the latest state replayed.
 */
import { promises as fs } from 'node:fs';
import * as vscode from 'vscode';
import type { FitOptions } from '../core/types';
import {
  isFromPanel,
  type ColumnChoice,
  type ComparisonMessage,
  type PanelReport,
  type EditableOptions,
  type ErrorMessage,
  type FromPanel,
  type ProgressMessage,
  type ResultMessage,
  type ToPanel,
} from '../shared/messages';
import type { FitJob, FitWorkers } from './fitWorkers';
import { baseName, exportFromPanel, revealRow, routedCommands, runRoutedCommand } from './panelActions';
import type { PostLog } from './postLog';
import { ProgressNotification } from './progressNotification';
import { projectSettingsFor } from './projectConfig';
import type { FileStamp, ResultCache } from './resultCache';
import { readSettings } from './settings';
import type { FitFailure, WorkerTiming } from './workerProtocol';

/** Epoch milliseconds with sub-millisecond resolution, comparable with the worker's (WorkerTiming). */
const clock = (): number => performance.timeOrigin + performance.now();

export interface SessionServices {
  workers: FitWorkers;
  cache: ResultCache;
  log: PostLog;
  output: vscode.LogOutputChannel;
  /** A file larger than this gets a provisional answer from its first bytes. */
  provisionalBytes: number;
  /** Milliseconds a fit runs before its progress notification appears (quick fits show none). */
  notificationDelay: number;
}

interface PanelEntry {
  panel: vscode.WebviewPanel;
  ready: boolean;
}

/** What a panel that becomes ready is told, in order, after `init`. */
interface LatestState {
  provisional?: ResultMessage;
  final?: ResultMessage;
  error?: ErrorMessage;
  progress?: ProgressMessage;
  /** A comparison shown over the final result (until the next fit). */
  comparison?: ComparisonMessage;
}

type CancelReason = 'user' | 'closed' | 'superseded';

export class FitSession implements vscode.Disposable {
  readonly fileName: string;
  private readonly panels = new Set<PanelEntry>();
  private readonly disposables: vscode.Disposable[] = [];
  private overrides: EditableOptions | undefined;
  private requested: Partial<FitOptions> = {};
  private job: FitJob | undefined;
  private generation = 0;
  private latest: LatestState = {};
  private rerunTimer: ReturnType<typeof setTimeout> | undefined;
  private notification: ProgressNotification | undefined;
  private disposed = false;

  constructor(
    readonly uri: vscode.Uri,
    private readonly services: SessionServices,
  ) {
    this.fileName = baseName(uri);
    if (uri.scheme === 'file') {
      const watcher = vscode.workspace.createFileSystemWatcher(new vscode.RelativePattern(vscode.Uri.joinPath(uri, '..'), this.fileName));
      // A data file rewritten on disk (e.g. by its generator) is analysed again; a burst of writes runs once.
      watcher.onDidChange(() => this.rerunSoon(), undefined, this.disposables);
      watcher.onDidCreate(() => this.rerunSoon(), undefined, this.disposables);
      this.disposables.push(watcher);
    }
  }

  get format(): 'csv' | 'tsv' | 'parquet' {
    const known = this.latest.final?.report.source.format ?? this.latest.provisional?.report.source.format;
    if (known) return known;
    return /\.parquet$/i.test(this.fileName) ? 'parquet' : /\.(tsv|tab)$/i.test(this.fileName) ? 'tsv' : 'csv';
  }

  /** Shows this file in a panel: its page, its messages, and the end of the fit when the last panel closes. */
  attach(panel: vscode.WebviewPanel, html: (webview: vscode.Webview) => string, resourceRoot: vscode.Uri): void {
    const entry: PanelEntry = { panel, ready: false };
    this.panels.add(entry);
    panel.webview.options = { enableScripts: true, localResourceRoots: [resourceRoot] };
    panel.webview.onDidReceiveMessage((message: unknown) => this.receive(message, entry), undefined, this.disposables);
    panel.onDidDispose(
      () => {
        this.panels.delete(entry);
        if (this.panels.size === 0) this.cancel('closed');
      },
      undefined,
      this.disposables,
    );
    panel.webview.html = html(panel.webview);
  }

  /** A message as the panel posts it; checked, since a webview message is untrusted input. */
  receive(message: unknown, from?: PanelEntry): void {
    if (!isFromPanel(message)) {
      this.services.output.warn(`${this.fileName}: ignored a malformed message from the panel: ${JSON.stringify(message)?.slice(0, 200)}`);
      return;
    }
    void this.handle(message, from).catch((error: unknown) => {
      const text = error instanceof Error ? error.message : String(error);
      this.services.output.error(`${this.fileName}: ${message.type} failed: ${error instanceof Error ? error.stack : text}`);
      void vscode.window.showErrorMessage(`Scatterwise: ${text}`);
    });
  }

  private async handle(message: FromPanel, from: PanelEntry | undefined): Promise<void> {
    switch (message.type) {
      case 'ready':
        if (from) this.greet(from);
        return;
      case 'refit':
        this.overrides = message.options;
        this.run();
        return;
      case 'revealRow':
        return revealRow(this.uri, this.format, message);
      case 'export':
        return exportFromPanel(this.uri, message);
      case 'command':
        if (message.command === 'cancel') this.cancel('user');
        else if (message.command in routedCommands) {
          await runRoutedCommand(message.command, this.uri, this.editableOptions(), (answer) => (answer.type === 'comparison' ? this.present(answer) : this.broadcast(answer)));
        }
        return;
    }
  }

  /** Starts a fit with the current settings and the panel's options; a fit already running stops. */
  run(): void {
    if (this.disposed) return;
    const previous = this.job;
    this.cancel('superseded');
    const generation = ++this.generation;
    const settings = readSettings();
    for (const problem of settings.problems) this.services.output.warn(problem);
    // The project config's options for this file sit between the settings and the panel's edits.
    this.requested = { ...settings.options, ...projectSettingsFor(this.uri, this.services.output).options, ...this.overrides };
    this.latest = {};
    void this.start(generation, previous?.ended).catch((error: unknown) => {
      if (generation === this.generation) this.fail({ code: 'internal', message: String(error), stack: error instanceof Error ? error.stack : undefined });
    });
  }

  private async start(generation: number, previousEnded?: Promise<unknown>): Promise<void> {
    // One worker per file at a time: the replaced one exits first (terminating takes milliseconds).
    await previousEnded;
    if (generation !== this.generation) return;
    if (this.uri.scheme !== 'file') {
      this.fail({
        code: 'not-a-local-file',
        message: `${this.fileName} is not a file on this machine's disk (${this.uri.scheme}:), and Scatterwise reads local files only.`,
        hint: 'Copy the table into a local folder and open it there.',
      });
      return;
    }
    const path = this.uri.fsPath;
    let stamp: FileStamp;
    try {
      const stat = await fs.stat(path);
      stamp = { path, size: stat.size, modified: stat.mtimeMs };
    } catch (error) {
      if (generation !== this.generation) return;
      this.fail({ code: 'unreadable-file', message: `${this.fileName} could not be read: ${(error as Error).message}`, hint: 'Check that the file exists and can be read.' });
      return;
    }
    if (generation !== this.generation) return;
    const options = this.requested;
    const knownHash = this.services.cache.hashOf(stamp);
    const cached = knownHash ? this.services.cache.get(knownHash, options) : undefined;
    if (cached) {
      this.services.output.info(`${this.fileName}: answered from the cache (same content and options).`);
      this.finish(cached.report, cached.columns);
      return;
    }
    this.progress('starting', 0);
    const started = clock();
    const job = this.services.workers.start(
      { path, options, provisionalBytes: this.services.provisionalBytes },
      {
        progress: (phase, fraction) => this.progress(phase, fraction),
        hashed: (sha256) => {
          const known = this.services.cache.get(sha256, options);
          if (!known) return;
          this.services.cache.rememberHash(stamp, sha256);
          this.settled(job);
          job.cancel();
          this.services.output.info(`${this.fileName}: same content as a file analysed before; answered from the cache.`);
          this.finish(known.report, known.columns);
        },
        result: (report, columns, timing) => {
          const received = clock();
          if (report.provisional) {
            this.latest.provisional = this.resultMessage(report, columns);
            this.broadcast(this.latest.provisional);
            this.services.output.info(
              `${this.fileName}: first look from ${report.rows.total} rows; ${this.timeline(started, received, timing)}; posted to the panel in ${Math.round(clock() - received)} ms.`,
            );
            return;
          }
          if (report.source.sha256) {
            this.services.cache.put(report.source.sha256, options, { report, columns });
            void this.rememberIfUnchanged(stamp, report.source.sha256);
          }
          this.services.output.info(
            `${this.fileName}: ${report.rows.used} of ${report.rows.total} rows, ${report.classes.length} classes, ` +
              `${report.features.length} features, ${report.findings.length} findings; ${this.timeline(started, received, timing)}.`,
          );
          this.settled(job);
          this.finish(report, columns);
          this.services.output.info(`${this.fileName}: full answer posted ${Math.round(clock() - received)} ms after it arrived from the worker.`);
        },
        failed: (failure, columns) => {
          this.settled(job);
          this.fail(failure, columns);
        },
      },
    );
    this.job = job;
    void job.ended.then(() => this.settled(job));
    this.notification = new ProgressNotification(`Scatterwise: analysing ${this.fileName}`, job.ended, this.services.notificationDelay, () => {
      if (this.job === job) this.cancel('user');
    });
  }

  /** Where the milliseconds from starting a worker to a result in hand went, for the output channel. */
  private timeline(started: number, received: number, timing: WorkerTiming | undefined): string {
    const ms = (from: number, to: number): string => `${Math.round(to - from)} ms`;
    if (!timing) return `${ms(started, received)} after the worker was started`;
    return (
      `worker running after ${ms(started, timing.started)}, analysing from ${ms(started, timing.analysisStarted)} for ${ms(timing.analysisStarted, timing.analysisEnded)}, ` +
      `in the host ${ms(timing.analysisEnded, received)} later, ${ms(started, received)} in all`
    );
  }

  /** The job has its answer (or ended): closing the editor now has nothing to stop. */
  private settled(job: FitJob): void {
    if (this.job === job) this.job = undefined;
  }

  /** Stops the running fit. The user's cancel is said in the panel; closing or a new run says nothing. */
  cancel(reason: CancelReason): void {
    if (this.rerunTimer && reason !== 'superseded') clearTimeout(this.rerunTimer);
    const job = this.job;
    if (!job) return;
    this.job = undefined;
    this.generation++;
    job.cancel();
    this.services.output.info(`${this.fileName}: analysis stopped (${reason === 'user' ? 'cancelled' : reason === 'closed' ? 'editor closed' : 'a new run started'}).`);
    if (reason === 'user') {
      this.latest.error = {
        type: 'error',
        code: 'cancelled',
        message: `The analysis of ${this.fileName} was cancelled.`,
        hint: 'Run it again with Refit.',
        options: this.editableOptions(),
      };
      this.latest.progress = undefined;
      this.broadcast(this.latest.error);
    }
  }

  /** Shows a comparison now and to panels that become ready later, until the next fit replaces it. */
  present(message: ComparisonMessage): void {
    this.latest.comparison = message;
    this.broadcast(message);
  }

  dispose(): void {
    this.disposed = true;
    this.cancel('closed');
    if (this.rerunTimer) clearTimeout(this.rerunTimer);
    for (const disposable of this.disposables.splice(0)) disposable.dispose();
  }

  private rerunSoon(): void {
    if (this.rerunTimer) clearTimeout(this.rerunTimer);
    this.rerunTimer = setTimeout(() => {
      this.rerunTimer = undefined;
      this.services.output.info(`${this.fileName}: the file changed on disk; analysing it again.`);
      this.run();
    }, 500);
  }

  private async rememberIfUnchanged(stamp: FileStamp, sha256: string): Promise<void> {
    const after = await fs.stat(stamp.path).catch(() => undefined);
    if (after && after.size === stamp.size && after.mtimeMs === stamp.modified) this.services.cache.rememberHash(stamp, sha256);
  }


  private progress(phase: string, fraction: number): void {
    this.latest.progress = { type: 'progress', phase, fraction };
    this.notification?.report(phase, fraction);
    this.broadcast(this.latest.progress);
  }

  private finish(report: PanelReport, columns: ColumnChoice[]): void {
    this.latest = { final: this.resultMessage(report, columns) };
    this.broadcast(this.latest.final!);
  }

  private fail(failure: FitFailure, columns?: ColumnChoice[]): void {
    const where = failure.where ? Object.entries(failure.where).map(([key, value]) => `${key} ${value}`).join(', ') : '';
    this.services.output.error(
      `${this.fileName}: ${failure.code}: ${failure.message}${where ? ` (${where})` : ''}${failure.hint ? `\n  hint: ${failure.hint}` : ''}` +
        (failure.stack ? `\n${failure.stack}` : ''),
    );
    const internal = failure.code === 'internal';
    this.latest = {
      error: {
        type: 'error',
        code: failure.code,
        message: internal ? `Scatterwise could not analyse ${this.fileName}. ${failure.message}` : failure.message,
        hint: internal ? 'The details are in the Scatterwise output channel; please report them.' : failure.hint,
        columns,
        options: this.editableOptions(),
      },
    };
    this.broadcast(this.latest.error!);
  }

  private resultMessage(report: PanelReport, columns: ColumnChoice[]): ResultMessage {
    return { type: 'result', report, columns, options: { ...this.editableOptions(), label: report.label } };
  }

  /** The options the panel's role form edits, as the current run asked for them. */
  private editableOptions(): EditableOptions {
    const options = this.requested;
    const defaults = readSettings().options;
    return {
      label: options.label,
      features: options.features,
      exclude: options.exclude,
      solver: options.solver ?? defaults.solver!,
      priors: options.priors ?? defaults.priors!,
      cv: options.cv ?? defaults.cv!,
      missing: options.missing ?? defaults.missing!,
    };
  }

  private greet(entry: PanelEntry): void {
    entry.ready = true;
    this.post(entry, { type: 'init', fileName: this.fileName, settings: { plotBudget: readSettings().plotBudget } });
    const { provisional, final, error, progress, comparison } = this.latest;
    for (const message of [final ?? provisional, error, final ? undefined : progress, comparison]) if (message) this.post(entry, message);
  }

  private broadcast(message: ToPanel): void {
    for (const entry of this.panels) if (entry.ready) this.post(entry, message);
  }

  private post(entry: PanelEntry, message: ToPanel): void {
    this.services.log.record(this.uri, message);
    void entry.panel.webview.postMessage(message);
  }
}
