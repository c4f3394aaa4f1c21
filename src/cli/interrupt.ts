/**
 * Interrupting the command line. The first SIGINT or SIGTERM cancels the analysis: it stops at its
 * next check, and the command prints "interrupted" and exits with 130 as usual, its 'exit' handlers
 * run (the scratch folder of spilled row groups is removed there: main.ts). A second signal before
 * that ends the process at once with the same code — what a user pressing Ctrl-C twice wants — and
 * process.exit still runs the 'exit' handlers, so the scratch folder goes too (with Node's default
 * handler back in place, the second signal killed the process and left the folder behind).
 */
import { EXIT_INTERRUPTED } from './command';

/** What the command line prints when it is interrupted, either way. */
export const INTERRUPTED_MESSAGE = 'scatterwise: interrupted.\n';

export interface InterruptOptions {
  /** Signals listened to; default SIGINT and SIGTERM. */
  signals?: readonly NodeJS.Signals[];
  /** Ends the process (tests pass their own); default: prints INTERRUPTED_MESSAGE on stderr and calls process.exit. */
  exit?: (code: number) => void;
}

/** Aborts `abort` at the first signal and exits at the second; returns a function that stops listening. */
export function cancelOnSignals(abort: AbortController, options: InterruptOptions = {}): () => void {
  const signals = options.signals ?? ['SIGINT', 'SIGTERM'];
  const exit =
    options.exit ??
    ((code: number) => {
      process.stderr.write(INTERRUPTED_MESSAGE);
      process.exit(code);
    });
  const onSignal = (): void => {
    if (abort.signal.aborted) exit(EXIT_INTERRUPTED);
    else abort.abort();
  };
  for (const signal of signals) process.on(signal, onSignal);
  return () => {
    for (const signal of signals) process.off(signal, onSignal);
  };
}
