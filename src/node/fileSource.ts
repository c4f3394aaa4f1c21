/**
 * The Node edge of the readers: a read-only ByteSource over a file. The file is opened with flag
 * 'r' and only ever read; reads go into one reused buffer (the ByteSource contract lets the reader
 * copy what it keeps).
 *
 * Threads that do nothing but read rows (the command line's, the parallel scan's) ask for
 * blocking reads: a read then copies from the operating system's cache on the reading thread,
 * instead of a round trip through libuv's thread pool per read. The Parquet reader reads each
 * column 128 KiB at a time; there the round trips left both scanning threads 15–25% idle and cost
 * ~2 s of CPU on the 1 GB table. A blocking source still lets the thread's event loop turn every
 * YIELD_MS (messages from the other scanning threads, a cancellation, a signal are heard then).
 * The extension host and the fit worker (which hashes the file beside its analysis) keep asynchronous reads.
 */
import { readSync } from 'node:fs';
import { open } from 'node:fs/promises';
import { DataError } from '../core/errors';
import type { ByteSource } from '../core/source';

/** Reads up to this size reuse one buffer; larger ones get a buffer of their own (not kept). */
const REUSED_BUFFER_LIMIT = 16 * 1024 * 1024;

/** A blocking source lets the event loop turn at least this often (milliseconds of reading and of the reader's work between reads). */
const YIELD_MS = 20;

export interface FileSourceOptions {
  /** Read on the calling thread (fs.readSync), for threads whose only work is reading: see above. Default false. */
  blocking?: boolean;
}

const turnOfEventLoop = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));

export async function openFileSource(path: string, options: FileSourceOptions = {}): Promise<ByteSource & { close(): Promise<void> }> {
  let handle;
  try {
    handle = await open(path, 'r');
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const reason = code === 'ENOENT' ? 'does not exist' : code === 'EACCES' || code === 'EPERM' ? 'cannot be read (permission denied)' : code === 'EISDIR' ? 'is a folder, not a file' : `cannot be opened (${code ?? String(error)})`;
    throw new DataError('file-unreadable', `${path} ${reason}.`, { file: path }, 'Check the path and that the file is readable.');
  }
  const stats = await handle.stat();
  if (stats.isDirectory()) {
    await handle.close();
    throw new DataError('file-unreadable', `${path} is a folder, not a file.`, { file: path }, 'Give the path of a CSV, TSV or Parquet file.');
  }
  const size = stats.size;
  let buffer = new Uint8Array(0);
  let closed = false;
  const file = handle;
  const blocking = options.blocking === true;
  let lastTurn = performance.now();
  return {
    name: path,
    size,
    async read(offset: number, length: number): Promise<Uint8Array> {
      if (closed) throw new Error(`read after close: ${path}`);
      const wanted = Math.max(0, Math.min(length, size - offset));
      let target: Uint8Array;
      if (wanted > REUSED_BUFFER_LIMIT) target = new Uint8Array(wanted);
      else {
        if (buffer.length < wanted) buffer = new Uint8Array(Math.min(REUSED_BUFFER_LIMIT, Math.max(wanted, 2 * buffer.length)));
        target = buffer;
      }
      if (blocking && performance.now() - lastTurn >= YIELD_MS) {
        await turnOfEventLoop();
        lastTurn = performance.now();
        if (closed) throw new Error(`read after close: ${path}`);
      }
      let filled = 0;
      while (filled < wanted) {
        const bytesRead = blocking ? readSync(file.fd, target, filled, wanted - filled, offset + filled) : (await file.read(target, filled, wanted - filled, offset + filled)).bytesRead;
        if (bytesRead === 0) break;
        filled += bytesRead;
      }
      return target.subarray(0, filled);
    },
    async close(): Promise<void> {
      if (closed) return;
      closed = true;
      await file.close();
    },
  };
}
