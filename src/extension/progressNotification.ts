/**
 * The progress notification of one fit: it appears only when the full analysis runs longer than
 * `delay` ms (a quick fit shows none), shows the percentage of the bytes read by the full analysis,
 * offers Cancel, and closes when the worker has exited, whatever ended it.
 *
 * The delay counts from the first progress of the full analysis (phase `analysis`), not from the
 * start of the job: a large file's first look comes before it, and a notification shown while
 * there is no percentage yet draws VS Code's indeterminate, animated bar. On a two-core machine
 * without a GPU that animation took a core from the first look (the worker's 3 MiB analysis in the
 * editor benchmark: 0.8–1.2 s with it, 0.6–0.7 s without).
 */
import * as vscode from 'vscode';
import { FULL_ANALYSIS_PHASE as FULL_ANALYSIS } from './workerProtocol';

export class ProgressNotification {
  private latest: { phase: string; fraction: number } | undefined;
  private update: ((phase: string, fraction: number) => void) | undefined;
  private open = true;
  private timer: ReturnType<typeof setTimeout> | undefined;

  constructor(
    private readonly title: string,
    private readonly ended: Promise<unknown>,
    private readonly delay: number,
    private readonly onCancel: () => void,
  ) {
    void ended.then(() => {
      this.open = false;
      clearTimeout(this.timer);
    });
  }

  report(phase: string, fraction: number): void {
    this.latest = { phase, fraction };
    if (phase === FULL_ANALYSIS && this.open && this.timer === undefined) this.timer = setTimeout(() => this.show(), this.delay);
    this.update?.(phase, fraction);
  }

  private show(): void {
    if (!this.open) return;
    void vscode.window.withProgress({ location: vscode.ProgressLocation.Notification, title: this.title, cancellable: true }, (progress, token) => {
      token.onCancellationRequested(this.onCancel);
      let shown = 0;
      this.update = (phase, fraction) => {
        const percent = phase === FULL_ANALYSIS ? Math.round(fraction * 100) : 0;
        progress.report({ increment: Math.max(0, percent - shown), message: phase === FULL_ANALYSIS ? `${percent}% of the bytes` : phase });
        shown = Math.max(shown, percent);
      };
      if (this.latest) this.update(this.latest.phase, this.latest.fraction);
      return this.ended.then(() => (this.update = undefined));
    });
  }
}
