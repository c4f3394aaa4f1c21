/**
 * Encoding checks for delimited text: we read UTF-8 (with or without a byte-order mark) and say so
 * clearly when a file is UTF-16/32, binary, or not valid UTF-8.
 */
import { DataError } from '../errors';

export const UTF8_BOM_LENGTH = 3;

export function hasUtf8Bom(head: Uint8Array): boolean {
  return head.length >= 3 && head[0] === 0xef && head[1] === 0xbb && head[2] === 0xbf;
}

/**
 * Length of the valid UTF-8 sequence starting at bytes[p] (a byte ≥ 0x80), 0 when it is invalid
 * (stray continuation byte, overlong form, surrogate, above U+10FFFF, or cut short by `end`).
 * Table 3-7 of The Unicode Standard, version 15, section 3.9 ("Well-Formed UTF-8 Byte Sequences").
 */
export function utf8SequenceLength(bytes: Uint8Array, p: number, end: number): number {
  const lead = bytes[p];
  if (lead < 0x80) return 1;
  let length: number;
  let low = 0x80;
  let high = 0xbf;
  if (lead >= 0xc2 && lead <= 0xdf) length = 2;
  else if (lead >= 0xe0 && lead <= 0xef) {
    length = 3;
    if (lead === 0xe0) low = 0xa0;
    else if (lead === 0xed) high = 0x9f;
  } else if (lead >= 0xf0 && lead <= 0xf4) {
    length = 4;
    if (lead === 0xf0) low = 0x90;
    else if (lead === 0xf4) high = 0x8f;
  } else return 0;
  if (p + length > end) return 0;
  const second = bytes[p + 1];
  if (second < low || second > high) return 0;
  for (let i = 2; i < length; i++) {
    const next = bytes[p + i];
    if (next < 0x80 || next > 0xbf) return 0;
  }
  return length;
}

/** Offset of the first byte of bytes[start, end) that starts an invalid UTF-8 sequence, or -1. */
export function firstInvalidUtf8(bytes: Uint8Array, start: number, end: number): number {
  let p = start;
  while (p < end) {
    if (bytes[p] < 0x80) {
      p++;
      continue;
    }
    const length = utf8SequenceLength(bytes, p, end);
    if (length === 0) return p;
    p += length;
  }
  return -1;
}

/** 1-based line of byte `offset` of bytes (counting line feeds before it). */
export function lineAt(bytes: Uint8Array, offset: number, firstLine = 1): number {
  let line = firstLine;
  for (let i = 0; i < offset && i < bytes.length; i++) if (bytes[i] === 0x0a) line++;
  return line;
}

export function invalidUtf8Error(file: string, byteOffset: number, line: number): DataError {
  return new DataError(
    'invalid-utf8',
    `${file}: the bytes at offset ${byteOffset} (line ${line}) are not valid UTF-8.`,
    { file, line, byteOffset },
    'Save the file as UTF-8 (most spreadsheet programs offer "CSV UTF-8") and open it again.',
  );
}

/**
 * Rejects heads that are not UTF-8 text: UTF-16/32 (by byte-order mark, or by the pattern of NUL
 * bytes that ASCII text takes in UTF-16), and binary files (NUL bytes, or many control bytes).
 * `head` is the start of the file (a few KiB to a few MiB).
 */
export function checkTextHead(file: string, head: Uint8Array): void {
  const utf16 = (endian: string): DataError =>
    new DataError(
      'utf16',
      `${file} is encoded as ${endian}; only UTF-8 text can be read.`,
      { file, byteOffset: 0, line: 1 },
      'Save the file as UTF-8 (for example "CSV UTF-8" in a spreadsheet program, or iconv -f UTF-16 -t UTF-8).',
    );
  if (head.length >= 4 && head[0] === 0xff && head[1] === 0xfe && head[2] === 0 && head[3] === 0) throw utf16('UTF-32 (little-endian)');
  if (head.length >= 4 && head[0] === 0 && head[1] === 0 && head[2] === 0xfe && head[3] === 0xff) throw utf16('UTF-32 (big-endian)');
  if (head.length >= 2 && head[0] === 0xff && head[1] === 0xfe) throw utf16('UTF-16 (little-endian)');
  if (head.length >= 2 && head[0] === 0xfe && head[1] === 0xff) throw utf16('UTF-16 (big-endian)');
  const sample = Math.min(head.length, 65536);
  let nulEven = 0;
  let nulOdd = 0;
  let control = 0;
  let firstNul = -1;
  for (let i = 0; i < sample; i++) {
    const c = head[i];
    if (c === 0) {
      if (firstNul < 0) firstNul = i;
      if (i % 2 === 0) nulEven++;
      else nulOdd++;
    } else if (c < 0x20 && c !== 0x09 && c !== 0x0a && c !== 0x0d && c !== 0x0c) control++;
  }
  const pairs = Math.floor(sample / 2);
  // ASCII text in UTF-16 has a NUL in (nearly) every other byte, on one side only.
  if (pairs >= 2 && nulOdd >= 0.4 * pairs && nulEven <= 0.05 * pairs) throw utf16('UTF-16 (little-endian, no byte-order mark)');
  if (pairs >= 2 && nulEven >= 0.4 * pairs && nulOdd <= 0.05 * pairs) throw utf16('UTF-16 (big-endian, no byte-order mark)');
  if (firstNul >= 0 || control > 0.1 * sample) {
    const at = firstNul >= 0 ? firstNul : 0;
    throw new DataError(
      'binary-file',
      `${file} does not look like delimited text: it holds binary bytes (first at offset ${at}, line ${lineAt(head, at)}).`,
      { file, byteOffset: at, line: lineAt(head, at) },
      'Open a CSV, TSV or Parquet file; if this is one, check that it is not compressed or damaged.',
    );
  }
}
