/**
 * Scratch space: files a reader may write beside its work and read back later in the same
 * analysis, never the data file. The Parquet reader spills the columns of a huge row group whose
 * dictionaries would not fit its memory budget (parquetSpill.ts).
 *
 * The core touches no file system: a Node entry point (the command line, the editor's fit worker,
 * a scanning thread) registers one for its thread with `useScratchSpace`; a thread with none
 * (a browser, a test that sets none) reads as if there were no scratch space.
 */

/** Spill files by name: written once (create → write … → commit), then read by any thread of the analysis. */
export interface ScratchSpace {
  /** The committed file of this name, or null when there is none yet. */
  open(name: string): Promise<ScratchReader | null>;
  /** A new file, seen under `name` once committed (a file left uncommitted is never seen). */
  create(name: string): Promise<ScratchWriter>;
}

export interface ScratchWriter {
  /** Writes all of `bytes` at `offset`. */
  write(offset: number, bytes: Uint8Array): Promise<void>;
  commit(): Promise<void>;
  /** Drops the file (after a failure or a cancellation); never throws. */
  discard(): Promise<void>;
}

export interface ScratchReader {
  /** Fills all of `target` from `offset` (throws when the file ends before). */
  read(offset: number, target: Uint8Array): Promise<void>;
  close(): Promise<void>;
}

/**
 * When the Parquet reader spills a share of a row group: when the dictionary pages of its
 * spillable columns come to `dictionaryBytes` or more and it has `minRows` rows or more (a first
 * look at a file's head reads only the dictionaries' first entries, and a spill of it would not pay).
 */
export interface SpillLimits {
  dictionaryBytes: number;
  minRows: number;
}

/** Dictionaries of 32 MiB and more: the default-groups copy of the 1 GB benchmark table holds none over 1 MB a group, its one-group copy 129 MB. */
export const DEFAULT_SPILL_LIMITS: SpillLimits = { dictionaryBytes: 32 * 1024 * 1024, minRows: 131_072 };

/** Thrown by a scratch space that cannot take a file (full disk, no permission): the reader goes on without it. */
export class ScratchUnavailable extends Error {
  override readonly name = 'ScratchUnavailable';
}

let current: { space: ScratchSpace; limits: SpillLimits } | null = null;

/** Sets (or with null clears) this thread's scratch space, and when to spill into it. */
export function useScratchSpace(space: ScratchSpace | null, limits: SpillLimits = DEFAULT_SPILL_LIMITS): void {
  current = space === null ? null : { space, limits };
}

/** This thread's scratch space and when to spill into it, or null. */
export function scratchSpace(): { space: ScratchSpace; limits: SpillLimits } | null {
  return current;
}

/** A scratch space in memory (tests, and a caller that wants spilling without files). */
export function memoryScratchSpace(): ScratchSpace & { names(): string[]; size(name: string): number } {
  const files = new Map<string, Uint8Array>();
  return {
    names: () => [...files.keys()],
    size: (name) => files.get(name)?.length ?? 0,
    async open(name) {
      const bytes = files.get(name);
      if (!bytes) return null;
      return {
        async read(offset, target) {
          if (offset + target.length > bytes.length) throw new Error(`scratch file ${name} ends at byte ${bytes.length}`);
          target.set(bytes.subarray(offset, offset + target.length));
        },
        async close() {},
      };
    },
    async create(name) {
      let bytes = new Uint8Array(0);
      let written = 0;
      return {
        async write(offset, data) {
          written = Math.max(written, offset + data.length);
          if (offset + data.length > bytes.length) {
            const grown = new Uint8Array(Math.max(offset + data.length, 2 * bytes.length));
            grown.set(bytes);
            bytes = grown;
          }
          bytes.set(data, offset);
        },
        async commit() {
          files.set(name, bytes.slice(0, written));
        },
        async discard() {},
      };
    },
  };
}
