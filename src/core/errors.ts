/**
 * An input problem the user can act on: the message names the file, and where known the
 * 1-based line (text files), the 0-based data row and the column. The CLI prints it and exits 2;
 * the extension shows it in the panel. Anything else thrown from the core is a bug.
 */
export class DataError extends Error {
  override readonly name = 'DataError';
  constructor(
    /** Stable code, e.g. `empty-file`, `ragged-row`, `one-class`. */
    readonly code: string,
    message: string,
    readonly where: { file?: string; line?: number; row?: number; column?: string; byteOffset?: number } = {},
    /** What to do next, in one sentence. */
    readonly hint?: string,
  ) {
    super(message);
  }
}

/** Thrown when a RunControl's signal aborts a pass. */
export class CancelledError extends Error {
  override readonly name = 'CancelledError';
  constructor() {
    super('The analysis was cancelled.');
  }
}

export function throwIfAborted(signal: AbortSignal | undefined): void {
  if (signal?.aborted) throw new CancelledError();
}
