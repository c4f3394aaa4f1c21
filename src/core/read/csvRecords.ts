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
