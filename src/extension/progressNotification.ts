/**
 * The progress notification of one fit: it appears only when the fit runs longer than `delay` ms
 * (a quick fit shows none), shows the percentage of the bytes read by the full analysis, offers
 * Cancel, and closes when the worker has exited, whatever ended it.
 */
import * as vscode from 'vscode';

export class ProgressNotification {
  private latest: { phase: string; fraction: number } | undefined;
  private update: ((phase: string, fraction: number) => void) | undefined;

  constructor(title: string, ended: Promise<unknown>, delay: number, onCancel: () => void) {
    let open = true;
    void ended.then(() => (open = false));
    const timer = setTimeout(() => {
      if (!open) return;
      void vscode.window.withProgress({ location: vscode.ProgressLocation.Notification, title, cancellable: true }, (progress, token) => {
        token.onCancellationRequested(onCancel);
        let shown = 0;
        this.update = (phase, fraction) => {
          const percent = phase === 'analysis' ? Math.round(fraction * 100) : 0;
          progress.report({ increment: Math.max(0, percent - shown), message: phase === 'analysis' ? `${percent}% of the bytes` : phase });
          shown = Math.max(shown, percent);
        };
        if (this.latest) this.update(this.latest.phase, this.latest.fraction);
        return ended.then(() => (this.update = undefined));
      });
    }, delay);
    void ended.then(() => clearTimeout(timer));
  }

  report(phase: string, fraction: number): void {
    this.latest = { phase, fraction };
    this.update?.(phase, fraction);
  }
}
