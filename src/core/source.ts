/**
 * The only way the core reads bytes. A Node file, a VS Code document, a browser File and a
 * git blob all become a ByteSource at the edge; nothing in `src/core` touches `fs`.
 */
export interface ByteSource {
  /** What to call the data in messages (a file name or `REF:path`). */
  readonly name: string;
  /** Total size in bytes. */
  readonly size: number;
  /**
   * Bytes [offset, offset + length), fewer only at the end of the source.
   * The returned array may be reused by the source after the next call: copy what must be kept.
   */
  read(offset: number, length: number): Promise<Uint8Array>;
}

/** A ByteSource over bytes already in memory (tests, browser uploads, `git show` output). */
export function memorySource(name: string, bytes: Uint8Array): ByteSource {
  return {
    name,
    size: bytes.length,
    async read(offset: number, length: number): Promise<Uint8Array> {
      return bytes.subarray(Math.min(offset, bytes.length), Math.min(offset + length, bytes.length));
    },
  };
}

/** Progress of a pass over a source, in bytes. */
export interface Progress {
  pass: 'inspect' | 'moments' | 'rows';
  bytesRead: number;
  bytesTotal: number;
}

/** What every long-running core function accepts from its caller. */
export interface RunControl {
  signal?: AbortSignal;
  onProgress?: (progress: Progress) => void;
}
