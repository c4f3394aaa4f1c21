/**
 * A data source named as the user wrote its path (`data/pump-faults.csv`), so reports and messages
 * show that rather than the absolute path the file was opened with.
 */
import type { ByteSource } from '../core/source';

export function asGiven(source: ByteSource, name: string): ByteSource {
  return { name, size: source.size, read: (offset, length) => source.read(offset, length) };
}
