/**
 * The CLI's file edges: opening the data file read-only with a DataError when it cannot be read,
 * and writing outputs so that they never replace the data file and never leave a half-written file
 * behind (written to a temporary name beside the target, renamed into place when complete).
 */
import { closeSync, fsyncSync, openSync, realpathSync, renameSync, rmSync, statSync, writeSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { DataError } from '../core/errors';
import type { CommandIO } from './command';
import type { ByteSource } from '../core/source';
import { openFileSource } from '../node/fileSource';

/** Opens a data file for reading; a missing, unreadable or non-regular file is a DataError. */
export async function openInput(cwd: string, path: string): Promise<ByteSource & { close(): Promise<void> }> {
  const full = resolve(cwd, path);
  let isFile: boolean;
  try {
    isFile = statSync(full).isFile();
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : `cannot be read (${code ?? String(error)})`;
    throw new DataError('unreadable-file', `${path}: ${why}.`, { file: path }, 'Check the path and that you may read the file.');
  }
  if (!isFile) throw new DataError('unreadable-file', `${path}: not a regular file.`, { file: path }, 'Give the path of a CSV, TSV or Parquet file.');
  try {
    const file = await openFileSource(full, { blocking: true });
    // Named as the user wrote it, so messages and reports carry no absolute path of this machine.
    return { name: path, size: file.size, read: (offset, length) => file.read(offset, length), close: () => file.close() };
  } catch (error) {
    if (error instanceof DataError) throw error;
    const code = (error as NodeJS.ErrnoException).code;
    throw new DataError('unreadable-file', `${path}: cannot be opened (${code ?? String(error)}).`, { file: path }, 'Check that you may read the file.');
  }
}

/** The real path a (possibly not yet existing) file would have. */
function realTarget(full: string): string {
  try {
    return realpathSync(full);
  } catch {
    try {
      return join(realpathSync(dirname(full)), basename(full));
    } catch {
      return full;
    }
  }
}

function sameFile(a: string, b: string): boolean {
  if (realTarget(a) === realTarget(b)) return true;
  try {
    const sa = statSync(a);
    const sb = statSync(b);
    return sa.dev === sb.dev && sa.ino === sb.ino;
  } catch {
    return false;
  }
}

/**
 * Resolves output paths against `cwd` and refuses any that is the data file (also through a
 * symbolic or hard link) or that two outputs share.
 */
export function checkOutputs(cwd: string, input: string, outputs: { option: string; path: string }[]): string[] {
  const inputFull = resolve(cwd, input);
  const resolved = outputs.map((o) => resolve(cwd, o.path));
  outputs.forEach((o, i) => {
    if (sameFile(resolved[i]!, inputFull)) {
      throw new DataError('output-is-input', `--${o.option} ${o.path} is the data file ${input}; scatterwise never writes to a data file.`, { file: input }, `Choose another file for --${o.option}.`);
    }
    for (let j = 0; j < i; j++) {
      if (sameFile(resolved[i]!, resolved[j]!)) {
        throw new DataError('outputs-collide', `--${o.option} and --${outputs[j]!.option} name the same file ${o.path}.`, {}, 'Give each output its own file.');
      }
    }
  });
  return resolved;
}

/** A file written in pieces under a temporary name and renamed into place by `commit()`. */
export class OutputFile {
  private readonly temporary: string;
  private fd: number | null;

  constructor(readonly path: string) {
    this.temporary = join(dirname(path), `.${basename(path)}.${process.pid}.partial`);
    try {
      this.fd = openSync(this.temporary, 'wx');
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code;
      throw new DataError('unwritable-output', `${path}: cannot be written (${code ?? String(error)}).`, { file: path }, 'Check that the folder exists and that you may write to it.');
    }
  }

  write(text: string): void {
    if (this.fd === null) throw new Error(`OutputFile ${this.path} already closed`);
    writeSync(this.fd, text);
  }

  commit(): void {
    if (this.fd === null) return;
    fsyncSync(this.fd);
    closeSync(this.fd);
    this.fd = null;
    try {
      renameSync(this.temporary, this.path);
    } catch (error) {
      rmSync(this.temporary, { force: true });
      const code = (error as NodeJS.ErrnoException).code;
      throw new DataError('unwritable-output', `${this.path}: cannot be written (${code ?? String(error)}).`, { file: this.path }, 'Give the path of a file, in a folder you may write to.');
    }
  }

  /** Removes the temporary file (after a failure). */
  discard(): void {
    if (this.fd !== null) {
      closeSync(this.fd);
      this.fd = null;
    }
    rmSync(this.temporary, { force: true });
  }
}

/** Pieces of text gathered into chunks of about 64 KiB, so that writing them costs few calls. */
function* chunked(pieces: Iterable<string>): Generator<string> {
  let chunk = '';
  for (const piece of pieces) {
    chunk += piece;
    if (chunk.length >= 65536) {
      yield chunk;
      chunk = '';
    }
  }
  if (chunk.length > 0) yield chunk;
}

/**
 * Writes `text` (or its pieces, never joined into one string) to `path` through an OutputFile:
 * renamed into place, or removed on failure.
 */
export function writeWholeFile(path: string, text: string | Iterable<string>): void {
  const out = new OutputFile(path);
  try {
    for (const chunk of typeof text === 'string' ? [text] : chunked(text)) out.write(chunk);
    out.commit();
  } catch (error) {
    out.discard();
    throw error;
  }
}

/** Writes a command's output (whole, or in pieces) to the `--out` file when one was given, otherwise to stdout. */
export function writeOutput(io: Pick<CommandIO, 'stdout'>, outPath: string | undefined, text: string | Iterable<string>): void {
  if (outPath !== undefined) writeWholeFile(outPath, text);
  else if (typeof text === 'string') io.stdout(text);
  else for (const chunk of chunked(text)) io.stdout(chunk);
}
