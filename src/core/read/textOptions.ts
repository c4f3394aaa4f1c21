/**
 * The options of a delimited-text read, checked once (a wrong combination fails early with what to
 * do), and the knobs of the streaming reader that tests and benchmarks may turn.
 */
import { DataError } from '../errors';
import { CellRules } from './cellValue';
import { MissingTokens } from './missingTokens';
import { numberSyntax } from './numberBytes';
import { DELIMITERS } from './sniffDialect';
import { DEFAULT_MISSING_TOKENS, type ReadOptions } from './types';

export interface TextTuning {
  /** Bytes read from the source at a time (MEASURED.md: 1–4 MiB chunks). */
  chunkBytes: number;
  /** A row longer than this is an error (a file without line breaks, or an unclosed quote). */
  maxRowBytes: number;
  /** Rows per batch handed to onBatch. */
  batchRows: number;
  /** Bytes of the head looked at by `inspect`. */
  headBytes: number;
  /** Rows of the head summarised by `inspect`… */
  sampleRows: number;
  /** …and at most about this many of its bytes (the whole head is still scanned for the row estimate). */
  sampleBytes: number;
}

export const DEFAULT_TEXT_TUNING: TextTuning = {
  chunkBytes: 1 * 1024 * 1024,
  maxRowBytes: 64 * 1024 * 1024,
  batchRows: 4096,
  headBytes: 1024 * 1024,
  sampleRows: 10_000,
  sampleBytes: 256 * 1024,
};

/** Characters that cannot separate thousands: digits, signs, exponent letters, quotes, line breaks. */
const RESERVED_IN_NUMBERS = /[0-9+\-eE"\r\n]/;

export function checkTextOptions(file: string, options: ReadOptions): void {
  const bad = (message: string, hint: string): DataError => new DataError('bad-option', `${file}: ${message}`, { file }, hint);
  if (options.delimiter !== undefined && !(DELIMITERS as readonly string[]).includes(options.delimiter)) {
    throw bad(`the delimiter ${JSON.stringify(options.delimiter)} is not supported.`, 'Use one of "," "\\t" ";" "|".');
  }
  if (options.decimalComma && options.delimiter === ',') {
    throw bad('a decimal comma cannot be read when the comma also separates fields.', 'Give the delimiter ";" (or tab) with the decimal comma.');
  }
  const thousands = options.thousandsSeparator;
  if (thousands !== undefined) {
    const decimal = options.decimalComma ? ',' : '.';
    if (thousands.length !== 1 || thousands.charCodeAt(0) > 0x7f || RESERVED_IN_NUMBERS.test(thousands)) {
      throw bad(`the thousands separator ${JSON.stringify(thousands)} is not supported.`, 'Use one ASCII character such as "_", " ", "\'" or ".".');
    }
    if (thousands === decimal) throw bad('the thousands separator equals the decimal separator.', 'Use a different thousands separator.');
    if (thousands === options.delimiter) throw bad('the thousands separator equals the delimiter.', 'Use a different thousands separator.');
  }
  if (options.comment !== undefined && (options.comment.length === 0 || /[\r\n"]/.test(options.comment))) {
    throw bad(`the comment marker ${JSON.stringify(options.comment)} is not usable.`, 'Give a non-empty marker such as "#".');
  }
}

export function cellRulesFor(options: ReadOptions): CellRules {
  return new CellRules(new MissingTokens(options.missingTokens ?? DEFAULT_MISSING_TOKENS), numberSyntax(options.decimalComma, options.thousandsSeparator));
}
