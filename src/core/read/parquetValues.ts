/**
 * Parquet's decoded values (numbers, BigInts, booleans, strings, Dates, nulls, as hyparquet gives
 * them) turned into our features and labels, plus the ByteSource → hyparquet AsyncBuffer adapter.
 */
import type { AsyncBuffer } from 'hyparquet';
import type { ByteSource } from '../source';
import { CELL_MISSING, CELL_NUMBER, CELL_TEXT, type CellKind, type CellRules } from './cellValue';
import { readCopy } from './readBytes';

const TWO_TO_53 = 2 ** 53;

/**
 * hyparquet reads through `slice`, several at once (it prefetches the byte ranges of a read in
 * parallel). A ByteSource may reuse its buffer on the next call, so the slices are queued one
 * after another and each is copied (readCopy allocates a fresh array of exactly its length)
 * before the next read starts.
 */
export function asyncBufferOf(source: ByteSource): AsyncBuffer {
  let queue: Promise<unknown> = Promise.resolve();
  return {
    byteLength: source.size,
    slice(start: number, end?: number): Promise<ArrayBuffer> {
      const stop = Math.min(end ?? source.size, source.size);
      const read = queue.then(async () => {
        const bytes = await readCopy(source, start, Math.max(0, stop - start));
        return bytes.byteLength === bytes.buffer.byteLength ? (bytes.buffer as ArrayBuffer) : (bytes.slice().buffer as ArrayBuffer);
      });
      queue = read.catch(() => undefined);
      return read;
    },
  };
}

/** A decoded value read as a feature; the kind of the last call is in `lastKind`, BigInt precision loss in `lostPrecision`. */
export class ParquetFeatureReader {
  lastKind: CellKind = CELL_NUMBER;
  lostPrecision = false;

  constructor(private readonly rules: CellRules) {}

  valueOf(value: unknown): number {
    this.lostPrecision = false;
    if (typeof value === 'number') {
      // A NaN stored in a FLOAT/DOUBLE column carries no value: read it as missing.
      this.lastKind = value === value ? CELL_NUMBER : CELL_MISSING;
      return value;
    }
    if (value === null || value === undefined) {
      this.lastKind = CELL_MISSING;
      return NaN;
    }
    if (typeof value === 'bigint') {
      this.lastKind = CELL_NUMBER;
      const number = Number(value);
      this.lostPrecision = number > TWO_TO_53 || number < -TWO_TO_53;
      return number;
    }
    if (typeof value === 'boolean') {
      this.lastKind = CELL_NUMBER;
      return value ? 1 : 0;
    }
    if (typeof value === 'string') {
      const number = this.rules.numberOf(value);
      this.lastKind = this.rules.lastKind;
      return number;
    }
    this.lastKind = CELL_TEXT;
    return NaN;
  }
}

/** Text of a decoded value for labels and examples; undefined = missing. */
export function textOf(value: unknown, rules: CellRules): string | undefined {
  if (value === null || value === undefined) return undefined;
  if (typeof value === 'string') return rules.isMissingText(value) ? undefined : value.replace(/^ +| +$/g, '');
  if (typeof value === 'number') return value === value ? String(value) : undefined;
  if (value instanceof Date) return Number.isNaN(value.getTime()) ? undefined : value.toISOString();
  if (value instanceof Uint8Array) return Array.from(value, (b) => b.toString(16).padStart(2, '0')).join('');
  if (typeof value === 'object') return JSON.stringify(value, (_key, v: unknown) => (typeof v === 'bigint' ? v.toString() : v));
  return String(value);
}
