/**
 * The Node edge of the readers: a read-only ByteSource over a file. The file is opened with flag
 * 'r' and only ever read; reads go into one reused buffer (the ByteSource contract lets the reader
 * copy what it keeps).
 */
import { open } from 'node:fs/promises';
import { DataError } from '../core/errors';
import type { ByteSource } from '../core/source';

/** Reads up to this size reuse one buffer; larger ones get a buffer of their own (not kept). */
const REUSED_BUFFER_LIMIT = 16 * 1024 * 1024;

export async function openFileSource(path: string): Promise<ByteSource & { close(): Promise<void> }> {
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
      let filled = 0;
      while (filled < wanted) {
        const { bytesRead } = await file.read(target, filled, wanted - filled, offset + filled);
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
