/** Reading a range of a ByteSource into memory the caller owns. */
import type { ByteSource } from '../source';

/**
 * A copy of bytes [offset, offset + length) of the source (shorter only at its end). ByteSources
 * may return fewer bytes than asked and may reuse their buffer, so this loops and copies.
 */
export async function readCopy(source: ByteSource, offset: number, length: number): Promise<Uint8Array> {
  const wanted = Math.max(0, Math.min(length, source.size - offset));
  const copy = new Uint8Array(wanted);
  let filled = 0;
  while (filled < wanted) {
    const chunk = await source.read(offset + filled, wanted - filled);
    if (chunk.length === 0) break;
    copy.set(chunk.subarray(0, wanted - filled), filled);
    filled += Math.min(chunk.length, wanted - filled);
  }
  return filled === wanted ? copy : copy.subarray(0, filled);
}
