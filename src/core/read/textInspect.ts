/**
 * Inspecting delimited text: read the head of the file, check its encoding, settle the dialect
 * (delimiter, header) and summarise the columns of the sampled rows.
 */
import { DataError } from '../errors';
import type { ByteSource, RunControl } from '../source';
import { CELL_MISSING, CELL_NUMBER, type CellRules } from './cellValue';
import { ColumnSample } from './columnSample';
import { parseCsvRecords, type CsvDialect } from './csvRecords';
import { headerNames } from './headerNames';
import { PassProgress } from './progress';
import { readCopy } from './readBytes';
import { findRecordEnd } from './recordBoundary';
import { detectHeader, sniffDelimiter } from './sniffDialect';
import { checkTextHead, firstInvalidUtf8, hasUtf8Bom, invalidUtf8Error, lineAt, UTF8_BOM_LENGTH } from './textEncoding';
import { cellRulesFor, checkTextOptions, DEFAULT_TEXT_TUNING, type TextTuning } from './textOptions';
import { isBlankLine, isCommentLine, rowTooLongError } from './textLines';
import { DEFAULT_MISSING_TOKENS, type ReadOptions, type SourceFormat, type TableInspection } from './types';

/** Where the records of the head end. */
interface HeadRecords {
  /** Offset after each record's line feed (or the end of the file for a last record without one). */
  ends: number[];
  /** 1-based line where each record starts. */
  lines: number[];
  /** Offset where each record starts. */
  starts: number[];
  /** Whether a quoted field of the head holds a line break. */
  quotedLineBreak: boolean;
  /** Offset where the unfinished record at the end of the head starts (= head length when none). */
  unfinishedStart: number;
  unfinishedInsideQuotes: boolean;
}

function headRecords(head: Uint8Array, start: number, wholeFile: boolean, comment: Uint8Array | undefined): HeadRecords {
  const ends: number[] = [];
  const lines: number[] = [];
  const starts: number[] = [];
  let quotedLineBreak = false;
  let line = 1;
  let p = start;
  while (p < head.length) {
    const blank = isBlankLine(head, p, head.length);
    if (blank > 0 || (comment !== undefined && isCommentLine(head, p, comment))) {
      const lineFeed = blank > 0 ? p + blank - 1 : head.indexOf(0x0a, p);
      if (lineFeed < 0) break;
      p = lineFeed + 1;
      line++;
      continue;
    }
    const end = findRecordEnd(head, p, head.length);
    if (end.lineFeed < 0) {
      if (wholeFile) {
        ends.push(head.length);
        lines.push(line);
        starts.push(p);
        if (end.quotedLineFeeds > 0) quotedLineBreak = true;
        p = head.length;
        break;
      }
      return { ends, lines, starts, quotedLineBreak, unfinishedStart: p, unfinishedInsideQuotes: end.insideQuotes };
    }
    if (end.quotedLineFeeds > 0) quotedLineBreak = true;
    ends.push(end.lineFeed + 1);
    lines.push(line);
    starts.push(p);
    line += end.quotedLineFeeds + 1;
    p = end.lineFeed + 1;
  }
  return { ends, lines, starts, quotedLineBreak, unfinishedStart: p, unfinishedInsideQuotes: false };
}

export async function inspectDelimitedText(
  source: ByteSource,
  format: SourceFormat,
  options: ReadOptions,
  control?: RunControl,
  tuning: TextTuning = DEFAULT_TEXT_TUNING,
): Promise<TableInspection> {
  const file = source.name;
  checkTextOptions(file, options);
  const progress = new PassProgress(control, 'inspect', source.size);
  if (source.size === 0) throw emptyFile(file);
  const comment = options.comment === undefined ? undefined : new TextEncoder().encode(options.comment);

  // Read a head holding at least two whole records (header and a row), or the whole file.
  let headLength = Math.min(source.size, tuning.headBytes);
  let head: Uint8Array;
  let start: number;
  let records: HeadRecords;
  for (let first = true; ; first = false) {
    head = await readCopy(source, 0, headLength);
    progress.update(head.length);
    if (first) {
      checkTextHead(file, head);
      checkLineEnds(file, head);
    }
    start = hasUtf8Bom(head) ? UTF8_BOM_LENGTH : 0;
    const wholeFile = head.length >= source.size;
    records = headRecords(head, start, wholeFile, comment);
    if (records.ends.length >= 2 || wholeFile) break;
    if (head.length - records.unfinishedStart > tuning.maxRowBytes) {
      throw rowTooLongError(file, lineAt(head, records.unfinishedStart), tuning.maxRowBytes, records.unfinishedInsideQuotes);
    }
    headLength = Math.min(source.size, headLength * 2, records.unfinishedStart + tuning.maxRowBytes + 1);
  }
  const wholeFile = head.length >= source.size;
  const cut = wholeFile ? head.length : records.ends[records.ends.length - 1];
  const invalid = firstInvalidUtf8(head, start, cut);
  if (invalid >= 0) throw invalidUtf8Error(file, invalid, lineAt(head, invalid));
  // The records parsed for the summaries: up to sampleRows rows or sampleBytes bytes (the byte
  // scan above already counted every record of the head, for the row estimate).
  let parsedRecords = records.ends.length;
  for (let i = 0; i < records.ends.length; i++) {
    if (i > tuning.sampleRows || records.ends[i] - start >= tuning.sampleBytes) {
      parsedRecords = i + 1;
      break;
    }
  }
  const parsedEnd = parsedRecords === records.ends.length ? cut : records.ends[parsedRecords - 1];
  // The parsed records as bytes (what a TextDecoder would give: one more leading BOM is dropped).
  const text = head.subarray(start + (hasUtf8Bom(head.subarray(start, parsedEnd)) ? UTF8_BOM_LENGTH : 0), parsedEnd);

  // Dialect.
  const delimiter = options.delimiter ?? (format === 'tsv' ? '\t' : sniffDelimiter(head, records.starts, records.ends, ',', options.decimalComma === true));
  const resolvedFormat: SourceFormat = delimiter === '\t' ? 'tsv' : 'csv';
  const resolved: ReadOptions = { ...options, format: resolvedFormat, delimiter };
  checkTextOptions(file, resolved);
  const rules = cellRulesFor(resolved);
  const parsed = parseHead(text, head, start, records, { delimiter, comment: options.comment }, file, options.header);
  if (parsed.length === 0) throw emptyFile(file);
  const header = options.header ?? detectHeader(parsed, rules);
  const body = header ? parsed.slice(1) : parsed;
  const headRows = records.ends.length - (header ? 1 : 0);
  if (headRows === 0 && wholeFile) {
    throw new DataError('no-data-rows', `${file} has a header row but no data rows.`, { file, line: (records.lines[0] ?? 1) + 1 }, 'Check that the file was written completely.');
  }
  const named = headerNames(parsed[0], header);

  // Column summaries of the sampled rows.
  const sampled = body.slice(0, tuning.sampleRows);
  const columns = named.names.map((name, index) => summarizeColumn(name, index, sampled, rules));

  // Rows: exact when the head is the whole file, else estimated from the bytes per sampled row.
  const headerEnd = header ? records.ends[0] : start;
  const estimatedRows = wholeFile ? headRows : Math.max(headRows, Math.round((headRows * (source.size - headerEnd)) / Math.max(1, cut - headerEnd)));
  progress.finish();
  return {
    source: file,
    format: resolvedFormat,
    delimiter,
    header,
    columns,
    sampledRows: sampled.length,
    estimatedRows,
    splittable: !records.quotedLineBreak,
    options: { ...resolved, header, missingTokens: options.missingTokens ?? DEFAULT_MISSING_TOKENS },
    notes: named.notes,
  };
}

/**
 * The head's records. When csv-parse rejects a later record, the error is raised again with the
 * first record's cells as column names (unless the caller said there is no header).
 */
function parseHead(text: Uint8Array, head: Uint8Array, start: number, records: HeadRecords, dialect: CsvDialect, file: string, header: boolean | undefined): string[][] {
  try {
    return parseCsvRecords(text, dialect, file, records.lines);
  } catch (error) {
    if (!(error instanceof DataError) || header === false || records.ends.length < 2 || (error.where.line ?? 0) <= records.lines[0]) throw error;
    let names: string[];
    try {
      names = parseCsvRecords(new TextDecoder().decode(head.subarray(start, records.ends[0])), dialect, file, records.lines)[0];
    } catch {
      throw error;
    }
    return parseCsvRecords(text, dialect, file, records.lines, names);
  }
}

function summarizeColumn(name: string, index: number, rows: readonly string[][], rules: CellRules) {
  const sample = new ColumnSample(name, index);
  for (const row of rows) {
    if (index >= row.length) continue;
    const value = rules.numberOf(row[index]);
    if (rules.lastKind === CELL_MISSING) sample.addMissing();
    else if (rules.lastKind === CELL_NUMBER) sample.addNumber(value);
    else sample.addText(row[index].replace(/^ +| +$/g, ''));
  }
  return sample.summary();
}

/** Lines ended by a carriage return alone (classic Mac OS) would make the whole file one row. */
function checkLineEnds(file: string, head: Uint8Array): void {
  const carriageReturn = head.indexOf(0x0d);
  if (carriageReturn < 0 || head.indexOf(0x0a) >= 0) return;
  if (carriageReturn === head.length - 1) return; // one line ending in CR: nothing is lost
  throw new DataError(
    'carriage-return-lines',
    `${file}: lines end with a carriage return alone (classic Mac OS line ends), which is not supported.`,
    { file, line: 1, byteOffset: carriageReturn },
    'Convert the line ends to LF or CR LF (most editors can do this when saving).',
  );
}

function emptyFile(file: string): DataError {
  return new DataError('empty-file', `${file} is empty: it holds no rows.`, { file, line: 1 }, 'Check that the file was written completely.');
}
