/**
 * The label dictionary of a scan: label text → id, ids in order of first appearance. Looked up by
 * the label's UTF-8 bytes (FNV-1a hash, open addressing), so reading a row creates no string; a
 * string is decoded only when a label is seen for the first time.
 */
const FNV_OFFSET = 0x811c9dc5;
const FNV_PRIME = 0x01000193;

export class LabelDictionary {
  /** Label texts, index = id. */
  readonly labels: string[] = [];
  private keyBytes = new Uint8Array(1024);
  private keyBytesUsed = 0;
  private keyStart: number[] = [];
  private keyEnd: number[] = [];
  /** Open-addressing table of id + 1 (0 = empty slot); size a power of two. */
  private slots = new Int32Array(64);
  private slotHashes = new Int32Array(64);
  private readonly decoder = new TextDecoder('utf-8');

  get size(): number {
    return this.labels.length;
  }

  /** The id of bytes[start, end), or -1 when the label has not been seen. */
  find(bytes: Uint8Array, start: number, end: number): number {
    const hash = hashBytes(bytes, start, end);
    const mask = this.slots.length - 1;
    for (let slot = hash & mask; ; slot = (slot + 1) & mask) {
      const entry = this.slots[slot];
      if (entry === 0) return -1;
      if (this.slotHashes[slot] === hash && this.sameKey(entry - 1, bytes, start, end)) return entry - 1;
    }
  }

  /** The id of bytes[start, end), adding the label when it is new. */
  intern(bytes: Uint8Array, start: number, end: number): number {
    const found = this.find(bytes, start, end);
    if (found >= 0) return found;
    const id = this.labels.length;
    this.labels.push(this.decoder.decode(bytes.subarray(start, end)));
    const length = end - start;
    if (this.keyBytesUsed + length > this.keyBytes.length) {
      const grown = new Uint8Array(Math.max(this.keyBytes.length * 2, this.keyBytesUsed + length));
      grown.set(this.keyBytes.subarray(0, this.keyBytesUsed));
      this.keyBytes = grown;
    }
    this.keyBytes.set(bytes.subarray(start, end), this.keyBytesUsed);
    this.keyStart.push(this.keyBytesUsed);
    this.keyEnd.push(this.keyBytesUsed + length);
    this.keyBytesUsed += length;
    if ((id + 1) * 2 > this.slots.length) this.rehash(this.slots.length * 2);
    this.place(id, hashBytes(bytes, start, end));
    return id;
  }

  private sameKey(id: number, bytes: Uint8Array, start: number, end: number): boolean {
    const keyStart = this.keyStart[id];
    const length = this.keyEnd[id] - keyStart;
    if (length !== end - start) return false;
    const key = this.keyBytes;
    for (let i = 0; i < length; i++) if (key[keyStart + i] !== bytes[start + i]) return false;
    return true;
  }

  private place(id: number, hash: number): void {
    const mask = this.slots.length - 1;
    let slot = hash & mask;
    while (this.slots[slot] !== 0) slot = (slot + 1) & mask;
    this.slots[slot] = id + 1;
    this.slotHashes[slot] = hash;
  }

  private rehash(size: number): void {
    this.slots = new Int32Array(size);
    this.slotHashes = new Int32Array(size);
    for (let id = 0; id < this.labels.length - 1; id++) {
      this.place(id, hashBytes(this.keyBytes, this.keyStart[id], this.keyEnd[id]));
    }
  }
}

/** FNV-1a over bytes[start, end), as a signed 32-bit integer. */
export function hashBytes(bytes: Uint8Array, start: number, end: number): number {
  let hash = FNV_OFFSET;
  for (let i = start; i < end; i++) hash = Math.imul(hash ^ bytes[i], FNV_PRIME);
  return hash | 0;
}
