/** Line-level facts of delimited text shared by inspection and scanning. */
import { DataError } from '../errors';

const LINE_FEED = 0x0a;
const CARRIAGE_RETURN = 0x0d;

/** Length of the blank line (LF or CR LF) starting at bytes[p], 0 when the line is not blank. */
export function isBlankLine(bytes: Uint8Array, p: number, end: number): number {
  if (p < end && bytes[p] === LINE_FEED) return 1;
  if (p + 1 < end && bytes[p] === CARRIAGE_RETURN && bytes[p + 1] === LINE_FEED) return 2;
  return 0;
}

/** Whether the line starting at bytes[p] starts with the comment marker. */
export function isCommentLine(bytes: Uint8Array, p: number, comment: Uint8Array): boolean {
  for (let i = 0; i < comment.length; i++) if (bytes[p + i] !== comment[i]) return false;
  return true;
}

export function rowTooLongError(file: string, line: number, limit: number, insideQuotes: boolean): DataError {
  const mebibytes = Math.round(limit / (1024 * 1024));
  return insideQuotes
    ? new DataError(
        'unterminated-quote',
        `${file}, line ${line}: a quoted field opened on this line is not closed within ${mebibytes} MiB.`,
        { file, line },
        'Close the quote, or double any quote character inside a quoted field ("").',
      )
    : new DataError(
        'row-too-long',
        `${file}, line ${line}: the row is longer than ${mebibytes} MiB without a line break.`,
        { file, line },
        'Check that this is a delimited text file with one row per line.',
      );
}
