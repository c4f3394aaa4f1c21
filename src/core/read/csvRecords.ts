/**
 * The reference parser, csv-parse, on a piece of text: used for the head of a file (inspection)
 * and for the rows the fast path leaves to it (doubled quotes, quoted line breaks, stray quotes).
 * Its errors become DataErrors naming the file, line and column.
 */
import { CsvError, parse } from 'csv-parse/browser/esm/sync';
import { DataError } from '../errors';

export interface CsvDialect {
  delimiter: string;
  /** Lines starting with this are skipped; undefined = no comments. */
  comment?: string;
}

/**
 * Parses `text` with csv-parse: a string, or UTF-8 bytes, which it reads as they are (given a
 * string, its browser build encodes it to bytes first with a JavaScript Buffer, three to four times
 * the time of the parse itself). Empty lines are skipped (they are not rows); records may have any
 * number of fields (the caller checks). `recordLines` are the 1-based lines where the records
 * start, found by the caller's own scan (csv-parse's line count is not used: it counts a CR LF
 * inside quotes as two lines); they place errors. `columnNames` name the columns in errors.
 */
export function parseCsvRecords(text: string | Uint8Array, dialect: CsvDialect, file: string, recordLines: readonly number[], columnNames?: readonly string[]): string[][] {
  return simpleCsvRecords(text, dialect) ?? csvParseRecords(text, dialect, file, recordLines, columnNames);
}

/** The records as csv-parse gives them, always through csv-parse (parseCsvRecords's reference). */
export function csvParseRecords(text: string | Uint8Array, dialect: CsvDialect, file: string, recordLines: readonly number[], columnNames?: readonly string[]): string[][] {
  try {
    return parse(text, {
      delimiter: dialect.delimiter,
      quote: '"',
      escape: '"',
      record_delimiter: ['\r\n', '\n'],
      relax_column_count: true,
      skip_empty_lines: true,
      comment: dialect.comment,
      comment_no_infix: dialect.comment !== undefined ? true : undefined,
    }) as string[][];
  } catch (error) {
    throw csvErrorToDataError(error, file, recordLines, columnNames);
  }
}

function csvErrorToDataError(error: unknown, file: string, recordLines: readonly number[], columnNames?: readonly string[]): unknown {
  if (!(error instanceof CsvError)) return error;
  const context = error as unknown as { records?: number; index?: number };
  const line = recordLines[Math.min(context.records ?? 0, recordLines.length - 1)] ?? 1;
  const fieldIndex = context.index;
  const column = fieldIndex === undefined ? undefined : (columnNames?.[fieldIndex] ?? `column_${fieldIndex + 1}`);
  const where = `${file}, line ${line}${column !== undefined ? `, column ${column}` : ''}`;
  switch (error.code) {
    case 'CSV_QUOTE_NOT_CLOSED':
      return new DataError('unterminated-quote', `${where}: a quoted field is opened and never closed.`, { file, line, column },
        'Close the quote, or double any quote character inside a quoted field ("").');
    case 'INVALID_OPENING_QUOTE':
      return new DataError('misplaced-quote', `${where}: a quote character appears inside an unquoted field.`, { file, line, column },
        'Quote the whole field and double the quote inside it ("5"" pipe"), or remove the quote.');
    case 'CSV_INVALID_CLOSING_QUOTE':
      return new DataError('misplaced-quote', `${where}: a quoted field is followed by other characters before the next delimiter.`, { file, line, column },
        'Put the whole field inside the quotes and double any quote inside it.');
    default:
      return new DataError('malformed-text', `${where}: ${error.message}`, { file, line, column });
  }
}

/** Keeps a leading byte-order mark, as csv-parse does without its `bom` option. */
const utf8 = new TextDecoder('utf-8', { ignoreBOM: true });

/**
 * The records of plain text without csv-parse, or undefined when the text holds anything but
 * line-feed-ended lines of unquoted fields and of whole quoted fields with no quote, line break
 * or carriage return inside (then csv-parse reads it, and reports what is wrong). For that text
 * the records are exactly csv-parse's (property-tested): empty lines skipped, any number of fields,
 * no trimming. A cold csv-parse took ~0.1 s of CPU for the 256 KiB an inspection parses; splitting
 * takes a tenth of that, and the inspection is on the way to the editor's first look.
 */
export function simpleCsvRecords(text: string | Uint8Array, dialect: CsvDialect): string[][] | undefined {
  if (dialect.comment !== undefined || dialect.delimiter.length !== 1) return undefined;
  const content = typeof text === 'string' ? text : utf8.decode(text);
  if (content.includes('\r')) return undefined;
  const delimiter = dialect.delimiter;
  const records: string[][] = [];
  let start = 0;
  while (start < content.length) {
    let end = content.indexOf('\n', start);
    if (end < 0) end = content.length;
    if (end > start) {
      const line = content.slice(start, end);
      const record = line.includes('"') ? quotedFields(line, delimiter) : line.split(delimiter);
      if (!record) return undefined;
      records.push(record);
    }
    start = end + 1;
  }
  return records;
}

/** The fields of one line whose quoted fields are whole and hold no quote; undefined otherwise. */
function quotedFields(line: string, delimiter: string): string[] | undefined {
  const fields: string[] = [];
  let p = 0;
  for (;;) {
    let next: number;
    if (line.charCodeAt(p) === 0x22) {
      const close = line.indexOf('"', p + 1);
      if (close < 0) return undefined;
      next = close + 1;
      if (next < line.length && line[next] !== delimiter) return undefined;
      fields.push(line.slice(p + 1, close));
    } else {
      next = line.indexOf(delimiter, p);
      if (next < 0) next = line.length;
      const field = line.slice(p, next);
      if (field.includes('"')) return undefined;
      fields.push(field);
    }
    if (next >= line.length) return fields;
    p = next + 1;
  }
}
