/**
 * The Node edge of the core's scratch space (src/core/read/scratch.ts): files in a folder of the
 * system's temporary directory, one folder per analysis, named `scatterwise-<pid>-<random>`.
 *
 * The thread that starts an analysis chooses the folder (newScratchFolder) and removes it when the
 * analysis ends (the command line when its process exits; the editor when a fit's thread ends,
 * finished or cancelled); it is created only when something is spilled. Scanning threads are
 * given the same folder (parallelScan.ts), so a spill written by one serves the others. A file is
 * written under a temporary name and renamed once complete: a file of the final name is whole.
 */
import { closeSync, mkdirSync, openSync, readSync, renameSync, rmSync, writeSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { threadId } from 'node:worker_threads';
import { DEFAULT_SPILL_LIMITS, ScratchUnavailable, useScratchSpace, type ScratchSpace, type SpillLimits } from '../core/read/scratch';

/** Failures of the disk, not of the program: the reader goes on without scratch space. */
const UNAVAILABLE = new Set(['ENOSPC', 'EDQUOT', 'EACCES', 'EPERM', 'EROFS', 'EMFILE', 'ENFILE', 'ENOENT', 'ENOTDIR', 'EIO']);

function unavailable(error: unknown): Error {
  const code = (error as NodeJS.ErrnoException).code;
  return code !== undefined && UNAVAILABLE.has(code) ? new ScratchUnavailable(`scratch space: ${(error as Error).message}`) : (error as Error);
}

let inUse: { folder: string; limits: SpillLimits } | null = null;
let written = 0;

/** A fresh folder path for an analysis's scratch files (not created yet). */
export function newScratchFolder(): string {
  return join(tmpdir(), `scatterwise-${process.pid}-${randomBytes(6).toString('hex')}`);
}

/** Files in `folder`, created when first needed. */
export function scratchFiles(folder: string): ScratchSpace {
  return {
    async open(name) {
      let fd: number;
      try {
        fd = openSync(join(folder, name), 'r');
      } catch (error) {
        if ((error as NodeJS.ErrnoException).code === 'ENOENT') return null;
        throw error;
      }
      let closed = false;
      return {
        async read(offset, target) {
          let filled = 0;
          while (filled < target.length) {
            const n = readSync(fd, target, filled, target.length - filled, offset + filled);
            if (n === 0) throw new Error(`scratch file ${name} ends at byte ${offset + filled}`);
            filled += n;
          }
        },
        async close() {
          if (closed) return;
          closed = true;
          closeSync(fd);
        },
      };
    },
    async create(name) {
      const part = join(folder, `${name}.${threadId}.${++written}.part`);
      let fd: number;
      try {
        mkdirSync(folder, { recursive: true });
        fd = openSync(part, 'w');
      } catch (error) {
        throw unavailable(error);
      }
      let open = true;
      const close = (): void => {
        if (!open) return;
        open = false;
        closeSync(fd);
      };
      return {
        async write(offset, bytes) {
          try {
            let done = 0;
            while (done < bytes.length) done += writeSync(fd, bytes, done, bytes.length - done, offset + done);
          } catch (error) {
            throw unavailable(error);
          }
        },
        async commit() {
          close();
          renameSync(part, join(folder, name));
        },
        async discard() {
          try {
            close();
          } catch {
            // Closed already, or the disk failed: the file goes either way.
          }
          try {
            rmSync(part, { force: true });
          } catch {
            // Left for the folder's removal.
          }
        },
      };
    },
  };
}

/** Makes `folder` this thread's scratch space (null: none); `limits`: when to spill (tests spill small files). */
export function useScratchFolder(folder: string | null, limits: SpillLimits = DEFAULT_SPILL_LIMITS): void {
  inUse = folder === null ? null : { folder, limits };
  useScratchSpace(folder === null ? null : scratchFiles(folder), limits);
}

/** This thread's scratch folder and limits, to hand to the threads it starts. */
export function scratchFolderInUse(): { folder: string; limits: SpillLimits } | null {
  return inUse;
}

/** Removes a scratch folder and what is in it; never throws. */
export function removeScratchFolder(folder: string): void {
  try {
    rmSync(folder, { recursive: true, force: true });
  } catch {
    // Left for the system's cleaning of its temporary directory.
  }
}
