/**
 * The command line's main thread keeps its young generation at the size it has. A long pass
 * allocates steadily, and V8 would double the semi-spaces up to 16 MiB each: 20-30 MB of the
 * process's peak that hold garbage between scavenges (measured on the 1 GB table: CSV about
 * 175 -> 155 MB, Parquet about 205 -> 180 MB, times alike). The scan workers have a limit of their
 * own (parallelScan.ts, resourceLimits).
 *
 * V8 reads --semi-space-growth-factor each time it would grow the space (--max-semi-space-size it
 * reads only at start, so setting that now does nothing). A worker thread starting up sets V8's
 * flags afresh (measured: the factor set before a worker comes online is back to its default
 * after), so the scanner calls this again as each worker comes online (ParallelScanOptions).
 * The command line owns its process; the editor's worker, in VS Code's extension host, sets no flags.
 */
import { setFlagsFromString } from 'node:v8';

export function keepYoungGenerationSmall(): void {
  setFlagsFromString('--semi-space-growth-factor=1');
}
