/**
 * The cells read as "missing", compared byte for byte with a (space-trimmed) cell. Tokens are
 * grouped by byte length so that the common case — a cell whose length matches no token — costs
 * one array lookup.
 */
const encoder = new TextEncoder();

export class MissingTokens {
  private readonly byLength: (Uint8Array[] | undefined)[];
  readonly tokens: readonly string[];

  constructor(tokens: readonly string[]) {
    this.tokens = tokens;
    const encoded = tokens.map((token) => encoder.encode(token));
    const longest = encoded.reduce((most, bytes) => Math.max(most, bytes.length), -1);
    this.byLength = Array.from({ length: longest + 1 }, () => undefined);
    for (const bytes of encoded) (this.byLength[bytes.length] ??= []).push(bytes);
  }

  /** Whether bytes[start, end) is one of the tokens. */
  matches(bytes: Uint8Array, start: number, end: number): boolean {
    const length = end - start;
    // Bounds first: reading past an array's end is a slow path in V8 (it searches the prototype chain).
    if (length >= this.byLength.length) return false;
    const candidates = this.byLength[length];
    if (candidates === undefined) return false;
    for (const token of candidates) {
      let i = 0;
      while (i < length && token[i] === bytes[start + i]) i++;
      if (i === length) return true;
    }
    return false;
  }
}

const SPACE = 0x20;

/** First byte of bytes[start, end) that is not a space (0x20). */
export function trimStart(bytes: Uint8Array, start: number, end: number): number {
  while (start < end && bytes[start] === SPACE) start++;
  return start;
}

/** One past the last byte of bytes[start, end) that is not a space (0x20). */
export function trimEnd(bytes: Uint8Array, start: number, end: number): number {
  while (end > start && bytes[end - 1] === SPACE) end--;
  return end;
}
