/**
 * The script of the "generate fit script" command, written in the fit worker from its finished
 * fit (src/extension/commands/generateScript.ts asks for it with FitRequest.script), so that the
 * host never reads the data file: a Python or R script that refits the file and checks the figures,
 * or the SQL query of its per-class moments. No `vscode` here: it runs in the worker thread.
 */
import { basename } from 'node:path';
import { inspectTable } from '../core/read/index';
import { momentsQueryForTable, reproductionScript, screenedFeatures, shiftsFromMoments } from '../core/scripts/index';
import type { ByteSource } from '../core/source';
import { tableMoments } from '../core/tableMoments';
import type { FitReport } from '../core/types';
import type { ScriptChoice } from './workerProtocol';

/** Bytes read to estimate the means the SQL query shifts by (any value near the mean will do). */
const SHIFT_ESTIMATE_BYTES = 4 * 1024 * 1024;

/** The script for `report`, the finished fit of `path` (with its SHA-256), read from `source`. */
export async function fitScript(source: ByteSource, path: string, report: FitReport, choice: ScriptChoice): Promise<string> {
  // The inspection reads the head of the file only (sniffed delimiter, header, column order).
  const inspection = await inspectTable(source, report.options.read);
  if (choice.language !== 'sql') return reproductionScript(choice.language, report, inspection, choice.generator, path);
  const features = screenedFeatures(report, inspection.columns.map((c) => c.name));
  const head = await tableMoments(source, { ...report.options, features, label: report.label }, undefined, SHIFT_ESTIMATE_BYTES);
  return momentsQueryForTable(report.label, features, shiftsFromMoments(head.moments, features), {
    dialect: choice.dialect ?? 'ansi',
    table: basename(path).replace(/\.[^.]*$/, ''),
    generator: choice.generator,
    fileDescription: `${report.source.name} (SHA-256 ${report.source.sha256 ?? 'not computed'})`,
  });
}
