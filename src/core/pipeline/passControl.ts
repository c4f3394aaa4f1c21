/**
 * The control handed to the reader for one pass: progress relabelled with the pass's name, the
 * caller's cancellation, and an early stop (the editor's provisional answer reads only the first
 * rows). An early stop aborts the reader through a signal of our own; `run` then tells a stop from
 * a cancellation, so the caller's abort still surfaces as CancelledError.
 */
import { CancelledError } from '../errors';
import type { Progress, RunControl } from '../source';

export class PassControl {
  private readonly abort = new AbortController();
  private stopped = false;
  private detach: () => void = () => {};
  readonly control: RunControl;

  constructor(
    pass: Progress['pass'],
    private readonly outer: RunControl | undefined,
  ) {
    const signal = outer?.signal;
    if (signal) {
      if (signal.aborted) this.abort.abort();
      else {
        const forward = (): void => this.abort.abort();
        signal.addEventListener('abort', forward, { once: true });
        this.detach = () => signal.removeEventListener('abort', forward);
      }
    }
    this.control = {
      signal: this.abort.signal,
      onProgress: (progress) => outer?.onProgress?.({ ...progress, pass }),
    };
  }

  /** Ask the reader to stop early (not a cancellation). */
  stop(): void {
    if (this.stopped) return;
    this.stopped = true;
    this.abort.abort();
  }

  /** Whether the pass ended by `stop()` rather than at the end of the data. */
  get stoppedEarly(): boolean {
    return this.stopped;
  }

  /** Runs the pass; an early stop ends it quietly, a cancellation by the caller still throws. */
  async run<T>(pass: () => Promise<T>): Promise<T | undefined> {
    try {
      return await pass();
    } catch (error) {
      if (this.stopped && !this.outer?.signal?.aborted && (error instanceof CancelledError || (error as Error)?.name === 'AbortError')) return undefined;
      throw error;
    } finally {
      this.detach();
    }
  }
}
