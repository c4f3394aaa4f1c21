/**
 * What one cell means, shared by the byte-level fast path and the csv-parse fallback so both read
 * a cell the same way. A cell's text is trimmed of surrounding spaces (0x20) first; then, in order:
 * a missing token → missing; the number grammar (numberBytes.ts) → that number; `inf`/`infinity`
 * with optional sign in any case → ±Infinity; anything else is text (for a feature: not a number).
 */
import { MissingTokens, trimEnd, trimStart } from './missingTokens';
import { infinityFromBytes, NumberSyntax, parseNumberBytes } from './numberBytes';

export const CELL_NUMBER = 0;
export const CELL_MISSING = 1;
export const CELL_TEXT = 2;
export type CellKind = typeof CELL_NUMBER | typeof CELL_MISSING | typeof CELL_TEXT;

/** The rules for reading cells of one file. */
export class CellRules {
  /** Kind of the cell last read by `numberAt` (a field rather than a tuple, to keep the hot loop allocation-free). */
  lastKind: CellKind = CELL_NUMBER;
  private scratch = new Uint8Array(256);
  private readonly encoder = new TextEncoder();

  constructor(
    readonly missing: MissingTokens,
    readonly syntax: NumberSyntax,
  ) {}

  /** The value of the feature cell bytes[start, end): a number, ±Infinity, or NaN (see `lastKind`). */
  numberAt(bytes: Uint8Array, start: number, end: number): number {
    start = trimStart(bytes, start, end);
    end = trimEnd(bytes, start, end);
    if (this.missing.matches(bytes, start, end)) {
      this.lastKind = CELL_MISSING;
      return NaN;
    }
    const value = parseNumberBytes(bytes, start, end, this.syntax);
    if (value === value) {
      this.lastKind = CELL_NUMBER;
      return value;
    }
    const infinity = infinityFromBytes(bytes, start, end);
    this.lastKind = infinity === 0 ? CELL_TEXT : CELL_NUMBER;
    return infinity === 0 ? NaN : infinity;
  }

  /** The value of a feature cell given as text (csv-parse output). */
  numberOf(text: string): number {
    const length = this.encode(text);
    return this.numberAt(this.scratch, 0, length);
  }

  /** Whether a label cell given as text is missing (after trimming). */
  isMissingText(text: string): boolean {
    const length = this.encode(text);
    const start = trimStart(this.scratch, 0, length);
    return this.missing.matches(this.scratch, start, trimEnd(this.scratch, start, length));
  }

  /** Encodes text into the scratch buffer (returned by `bytes`) and gives its length in bytes. */
  encode(text: string): number {
    if (text.length * 3 > this.scratch.length) this.scratch = new Uint8Array(text.length * 3);
    return this.encoder.encodeInto(text, this.scratch).written;
  }

  get bytes(): Uint8Array {
    return this.scratch;
  }
}
