/**
 * Duplicate-row detection with bounded memory: each used row (its label and the bits of every
 * feature value) is hashed to 53 bits and looked up in a set of the hashes seen so far. The set
 * holds at most `capacity` rows; rows after that are not checked, and the finding says how many were.
 *
 * Two different rows collide with probability about m²/2⁵⁴ over m rows checked (≈ 3.5·10⁻⁶ at the
 * default 250 000), so a reported duplicate is very nearly certain; the check never misses one.
 */

/** Rows whose hashes are kept: an open-addressing table of at most 2¹⁹ slots (6 MB) at 250 000. */
export const DUPLICATE_CHECK_CAPACITY = 250_000;

export interface DuplicateExample {
  row: number;
  line?: number;
  firstRow: number;
  firstLine?: number;
}

const EXAMPLES_KEPT = 20;

/**
 * A set of 53-bit hashes with a value per entry: open addressing with linear probing over typed
 * arrays, kept at most half full. (A Map with keys beyond 2³¹ boxes every key: slow, and garbage.)
 */
class HashSlots {
  private keys = new Float64Array(1024);
  private slots = new Int32Array(1024).fill(-1);
  size = 0;

  private static position(key: number, mask: number): number {
    return (key % 4294967296 ^ Math.floor(key / 4294967296)) & mask;
  }

  /** The value stored for `key`, or -1. */
  get(key: number): number {
    const mask = this.keys.length - 1;
    for (let i = HashSlots.position(key, mask); ; i = (i + 1) & mask) {
      const slot = this.slots[i]!;
      if (slot < 0) return -1;
      if (this.keys[i] === key) return slot;
    }
  }

  set(key: number, value: number): void {
    if (2 * (this.size + 1) > this.keys.length) this.grow();
    const mask = this.keys.length - 1;
    let i = HashSlots.position(key, mask);
    while (this.slots[i]! >= 0) i = (i + 1) & mask;
    this.keys[i] = key;
    this.slots[i] = value;
    this.size++;
  }

  private grow(): void {
    const keys = this.keys;
    const slots = this.slots;
    this.keys = new Float64Array(2 * keys.length);
    this.slots = new Int32Array(2 * keys.length).fill(-1);
    this.size = 0;
    for (let i = 0; i < keys.length; i++) if (slots[i]! >= 0) this.set(keys[i]!, slots[i]!);
  }
}

const bits = new Float64Array(1);
const words = new Uint32Array(bits.buffer);

/**
 * Two independent 32-bit FNV-1a-style mixes over the 32-bit words of a row's values, into
 * `out[0]`, `out[1]`; the label joins in rowKey, so a parallel scan can hash before it knows
 * the label's number in the whole file.
 */
export function rowValueHash(values: Float64Array, offset: number, d: number, out: Uint32Array): void {
  let h1 = 0x811c9dc5;
  let h2 = 0x01000193;
  for (let j = 0; j < d; j++) {
    bits[0] = values[offset + j]! + 0;
    for (let w = 0; w < 2; w++) {
      const word = words[w]!;
      h1 = Math.imul(h1 ^ word, 0x01000193) >>> 0;
      h2 = Math.imul(h2 ^ word, 0x5bd1e995) >>> 0;
      h2 ^= h2 >>> 15;
    }
  }
  out[0] = h1;
  out[1] = h2;
}

/** The 53-bit key of a row: its value hash with its label id mixed in. */
export function rowKey(valueHash1: number, valueHash2: number, label: number): number {
  let h1 = Math.imul(valueHash1 ^ label, 0x01000193) >>> 0;
  let h2 = Math.imul(valueHash2 ^ Math.imul(label, 0x9e3779b1), 0x5bd1e995) >>> 0;
  h2 ^= h2 >>> 15;
  h1 ^= h1 >>> 16;
  h1 = Math.imul(h1, 0x85ebca6b) >>> 0;
  h1 ^= h1 >>> 13;
  return (h1 >>> 0) * 2 ** 21 + (h2 >>> 11);
}

export class DuplicateRows {
  private readonly seen = new HashSlots();
  private firstRows = new Int32Array(1024);
  private firstLines = new Int32Array(1024);
  count = 0;
  checked = 0;
  readonly examples: DuplicateExample[] = [];
  private readonly hash = new Uint32Array(2);

  constructor(private readonly capacity = DUPLICATE_CHECK_CAPACITY) {}

  /** Whether more rows are being checked. */
  get open(): boolean {
    return this.checked < this.capacity;
  }

  /**
   * One used row: `values[offset .. offset + d)` and its label id. Call in file order.
   * −0 and +0 hash alike (they compare equal and print alike).
   */
  add(label: number, values: Float64Array, offset: number, d: number, row: number, line: number | undefined): void {
    if (!this.open) return;
    rowValueHash(values, offset, d, this.hash);
    this.addKey(rowKey(this.hash[0]!, this.hash[1]!, label), row, line);
  }

  /** One used row by its key (rowKey), e.g. replayed from a parallel scan's record. Call in file order. */
  addKey(key: number, row: number, line: number | undefined): void {
    if (!this.open) return;
    const slot = this.seen.get(key);
    if (slot >= 0) {
      this.count++;
      if (this.examples.length < EXAMPLES_KEPT) {
        const example: DuplicateExample = { row, firstRow: this.firstRows[slot]! };
        if (line !== undefined) {
          example.line = line;
          example.firstLine = this.firstLines[slot]!;
        }
        this.examples.push(example);
      }
    } else {
      const next = this.seen.size;
      if (next === this.firstRows.length) {
        const rows = new Int32Array(2 * next);
        rows.set(this.firstRows);
        this.firstRows = rows;
        const lines = new Int32Array(2 * next);
        lines.set(this.firstLines);
        this.firstLines = lines;
      }
      this.seen.set(key, next);
      this.firstRows[next] = row;
      this.firstLines[next] = line ?? 0;
    }
    this.checked++;
  }
}
