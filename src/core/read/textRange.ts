/**
 * Where a byte-range scan of splittable text starts: the first row start at or after the range's
 * start, with its 1-based line and 0-based data row. Counting needs the bytes before the range,
 * read once here at newline-search speed (no field parsing); valid only for splittable text, where
 * every line feed ends a line of the table (no quoted line breaks).
 */
import type { ByteSource, RunControl } from '../source';
import { throwIfAborted } from '../errors';
import { hasUtf8Bom, UTF8_BOM_LENGTH } from './textEncoding';
import { isCommentLine } from './textLines';
import type { TableInspection } from './types';

const LINE_FEED = 0x0a;
const CARRIAGE_RETURN = 0x0d;
const CHUNK = 4 * 1024 * 1024;

export interface RangeStart {
  offset: number;
  line: number;
  row: number;
}

export async function rowsBefore(
  source: ByteSource,
  start: number,
  inspection: TableInspection,
  comment: Uint8Array | undefined,
  control?: RunControl,
): Promise<RangeStart> {
  const offset = await alignToRowStart(source, start);
  const lookahead = Math.max(2, comment?.length ?? 0);
  let headerPending = inspection.header;
  let line = 1;
  let row = 0;
  let base = 0;
  let atLineStart = true;
  while (base < offset) {
    throwIfAborted(control?.signal);
    const length = Math.min(CHUNK, offset - base);
    const chunk = (await source.read(base, length)).subarray(0, length);
    const last = base + chunk.length >= offset;
    let p = 0;
    if (base === 0 && hasUtf8Bom(chunk)) p = UTF8_BOM_LENGTH;
    let next = base + chunk.length;
    while (p < chunk.length) {
      if (atLineStart) {
        if (!last && p + lookahead > chunk.length) {
          next = base + p; // classify this line with the next chunk
          break;
        }
        const blank = chunk[p] === LINE_FEED || (chunk[p] === CARRIAGE_RETURN && chunk[p + 1] === LINE_FEED);
        const commented = comment !== undefined && isCommentLine(chunk, p, comment);
        if (!blank && !commented) {
          if (headerPending) headerPending = false;
          else row++;
        }
      }
      const lineFeed = chunk.indexOf(LINE_FEED, p);
      if (lineFeed < 0) {
        atLineStart = false;
        break;
      }
      line++;
      atLineStart = true;
      p = lineFeed + 1;
    }
    if (chunk.length === 0) break;
    base = next;
  }
  return { offset, line, row };
}

/** The first row start at or after `start`: `start` itself when a line feed precedes it. */
export async function alignToRowStart(source: ByteSource, start: number): Promise<number> {
  if (start <= 0) return 0;
  let base = start - 1;
  while (base < source.size) {
    const chunk = await source.read(base, Math.min(64 * 1024, source.size - base));
    if (chunk.length === 0) break;
    const lineFeed = chunk.indexOf(LINE_FEED);
    if (lineFeed >= 0) return base + lineFeed + 1;
    base += chunk.length;
  }
  return source.size;
}
