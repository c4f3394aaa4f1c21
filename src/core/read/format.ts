/** Which reader a source needs: from its name, else from its first bytes. */
import type { SourceFormat } from './types';

const EXTENSIONS: Record<string, SourceFormat> = {
  csv: 'csv',
  tsv: 'tsv',
  tab: 'tsv',
  parquet: 'parquet',
  pq: 'parquet',
};

/** The format a file name's extension implies (case-insensitive), or undefined. */
export function formatFromName(name: string): SourceFormat | undefined {
  const base = name.slice(Math.max(name.lastIndexOf('/'), name.lastIndexOf('\\')) + 1);
  const dot = base.lastIndexOf('.');
  if (dot < 0) return undefined;
  return EXTENSIONS[base.slice(dot + 1).toLowerCase()];
}

/** Parquet files start with the magic bytes `PAR1`; anything else is read as text. */
export function formatFromBytes(head: Uint8Array): SourceFormat {
  return isParquetMagic(head, 0) ? 'parquet' : 'csv';
}

export function isParquetMagic(bytes: Uint8Array, at: number): boolean {
  return bytes.length >= at + 4 && bytes[at] === 0x50 && bytes[at + 1] === 0x41 && bytes[at + 2] === 0x52 && bytes[at + 3] === 0x31;
}
