/**
 * The readers' public face: `inspectTable` describes a source's columns from its head (or Parquet
 * footer), `scanTable` streams the planned columns in one pass. Text (CSV/TSV) and Parquet are
 * told apart by the options, the source's name, or its first bytes.
 */
import type { ByteSource, RunControl } from '../source';
import { formatFromBytes, formatFromName } from './format';
import { inspectParquet, scanParquet } from './parquet';
export { parquetRowGroups } from './parquet';
import { readCopy } from './readBytes';
import { inspectDelimitedText } from './textInspect';
import { scanDelimitedText } from './textScan';
import type { ReadOptions, ScanRequest, ScanSummary, SourceFormat, TableInspection } from './types';

export { formatFromName };
export { DEFAULT_MISSING_TOKENS } from './types';
export type * from './types';

export async function inspectTable(source: ByteSource, options: ReadOptions = {}, control?: RunControl): Promise<TableInspection> {
  // The bytes outrank the name: a Parquet file saved as .csv is still read as Parquet.
  const sniffed = formatFromBytes(await readCopy(source, 0, 4));
  const format: SourceFormat = options.format ?? (sniffed === 'parquet' ? 'parquet' : (formatFromName(source.name) ?? sniffed));
  return format === 'parquet' ? inspectParquet(source, options, control) : inspectDelimitedText(source, format, options, control);
}

export async function scanTable(request: ScanRequest): Promise<ScanSummary> {
  return request.inspection.format === 'parquet' ? scanParquet(request) : scanDelimitedText(request);
}
