/**
 * Progress events and cancellation for one pass over a source: an event at most every ~1% of the
 * bytes or every 64 MiB, whichever comes first, and a cancellation check at each step.
 */
import { throwIfAborted } from '../errors';
import type { Progress, RunControl } from '../source';

const PROGRESS_BYTES = 64 * 1024 * 1024;

export class PassProgress {
  private lastReported = -1;
  private readonly step: number;

  constructor(
    private readonly control: RunControl | undefined,
    private readonly pass: Progress['pass'],
    private readonly bytesTotal: number,
  ) {
    this.step = Math.max(1, Math.min(PROGRESS_BYTES, Math.floor(bytesTotal / 100)));
  }

  /** Throws CancelledError when the caller aborted; reports progress when enough bytes went by. */
  update(bytesRead: number): void {
    throwIfAborted(this.control?.signal);
    if (this.control?.onProgress === undefined) return;
    if (this.lastReported >= 0 && bytesRead - this.lastReported < this.step && bytesRead < this.bytesTotal) return;
    this.lastReported = bytesRead;
    this.control.onProgress({ pass: this.pass, bytesRead, bytesTotal: this.bytesTotal });
  }

  /** The final event of the pass (once, even when the last update already said 100%). */
  finish(): void {
    throwIfAborted(this.control?.signal);
    if (this.lastReported === this.bytesTotal) return;
    this.lastReported = this.bytesTotal;
    this.control?.onProgress?.({ pass: this.pass, bytesRead: this.bytesTotal, bytesTotal: this.bytesTotal });
  }
}
