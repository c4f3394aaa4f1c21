/**
 * The tools the benchmark runs on each table, as command lines (each measured in its own child
 * process, measureChild.ts):
 *   floor              Node reads the file in 4 MiB chunks and counts line feeds: no reader of
 *                      every byte can be faster (bench.ts --child floor)
 *   scatterwise        `scatterwise fit FILE` (text report), one worker per core
 *   scatterwise, 1 w.  the same with --workers 1: the single-thread speed the parallel passes beat
 *   reader             (narrow table) our CSV reader alone, one thread, feeding per-class moments:
 *                      the fast path the floor and csv-parse are compared with (bench/reader.ts)
 *   csv-parse          (narrow table) csv-parse 7 streaming with cast: true, the reference parser
 *   pandas + sklearn   bench/alternatives/notebook.py with Debian's /usr/bin/python3
 *   data.table + MASS  bench/alternatives/lda.R with Rscript
 * Python and R run only when installed with their packages (checked once).
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { LABEL_COLUMN } from './pumpTable';
import type { TableShape } from './benchShapes';

export type ToolId = 'floor' | 'reader' | 'csv-parse' | 'scatterwise' | 'scatterwise-1' | 'notebook' | 'r';

export const TOOL_NAMES: Record<ToolId, string> = {
  floor: 'floor (read + count lines)',
  reader: 'scatterwise reader → moments',
  'csv-parse': 'csv-parse (cast: true)',
  scatterwise: 'scatterwise fit',
  'scatterwise-1': 'scatterwise fit --workers 1',
  notebook: 'pandas + scikit-learn',
  r: 'data.table + MASS',
};

export const PYTHON = '/usr/bin/python3';

export interface Availability {
  notebook: boolean;
  notebookParquet: boolean;
  r: boolean;
  versions: { python?: string; r?: string };
}

function runs(command: string, args: string[]): string | null {
  if (command.startsWith('/') && !existsSync(command)) return null;
  const run = spawnSync(command, args, { encoding: 'utf8' });
  return run.status === 0 ? `${run.stdout}${run.stderr}`.trim() : null;
}

export function checkAlternatives(): Availability {
  const python = runs(PYTHON, ['-c', 'import sys, numpy, pandas, sklearn; print("Python %s, pandas %s, scikit-learn %s, numpy %s" % (sys.version.split()[0], pandas.__version__, sklearn.__version__, numpy.__version__))']);
  const parquet = python ? runs(PYTHON, ['-c', 'import pyarrow']) !== null : false;
  const r = runs('Rscript', ['-e', 'suppressPackageStartupMessages({library(MASS); library(data.table)}); cat(R.version.string, ", MASS ", as.character(packageVersion("MASS")), ", data.table ", as.character(packageVersion("data.table")), sep = "")']);
  return { notebook: python !== null, notebookParquet: parquet, r: r !== null, versions: { ...(python ? { python } : {}), ...(r ? { r } : {}) } };
}

/** The tools run on a table, in the order of the table. */
export function toolsFor(shape: TableShape, available: Availability): ToolId[] {
  const tools: ToolId[] = ['floor', 'scatterwise'];
  if (shape.id === 'narrow') tools.push('scatterwise-1', 'reader', 'csv-parse');
  if (available.notebook && (shape.format === 'csv' || available.notebookParquet)) tools.push('notebook');
  if (available.r && shape.format === 'csv') tools.push('r');
  return tools;
}

export function commandFor(tool: ToolId, shape: TableShape, benchScript: string, repository: string): [string, string[]] {
  switch (tool) {
    case 'floor':
      return [process.execPath, [benchScript, '--child', 'floor', '--file', shape.file]];
    case 'reader':
      return [process.execPath, [join(repository, 'out/bench/reader.js'), '--child', 'scan', '--file', shape.file]];
    case 'csv-parse':
      return [process.execPath, [join(repository, 'out/bench/reader.js'), '--child', 'csv-parse', '--file', shape.file]];
    case 'scatterwise':
      return [process.execPath, [join(repository, 'dist/cli.js'), 'fit', shape.file, '--label', LABEL_COLUMN]];
    case 'scatterwise-1':
      return [process.execPath, [join(repository, 'dist/cli.js'), 'fit', shape.file, '--label', LABEL_COLUMN, '--workers', '1']];
    case 'notebook':
      return [PYTHON, [join(repository, 'bench/alternatives/notebook.py'), shape.file, LABEL_COLUMN]];
    case 'r':
      return ['Rscript', [join(repository, 'bench/alternatives/lda.R'), shape.file, LABEL_COLUMN]];
  }
}

/** Rows and cross-validated accuracy as each tool printed them, to show that all did the same job. */
export function answerOf(tool: ToolId, stdout: string): { rows?: number; crossValidated?: string } {
  if (tool === 'scatterwise' || tool === 'scatterwise-1') {
    const rows = /^Rows\s+([\d,]+) rows/m.exec(stdout)?.[1];
    const cv = /Cross-validated accuracy ([\d.]+%) \(([^)]*)\)/.exec(stdout);
    return { ...(rows ? { rows: Number(rows.replace(/,/g, '')) } : {}), ...(cv ? { crossValidated: `${cv[1]} (${cv[2]})` } : {}) };
  }
  if (tool === 'reader' || tool === 'csv-parse') {
    try {
      return { rows: (JSON.parse(stdout.trim().split('\n').pop() ?? '') as { rows: number }).rows };
    } catch {
      return {};
    }
  }
  if (tool === 'notebook' || tool === 'r') {
    const line = stdout.trim().split('\n').pop() ?? '';
    try {
      const answer = JSON.parse(line) as { rows: number; crossValidated: number };
      return { rows: answer.rows, crossValidated: `${(100 * answer.crossValidated).toFixed(1)}% (${tool === 'notebook' ? 'stratified 5-fold' : 'leave-one-out'})` };
    } catch {
      return {};
    }
  }
  return {};
}
