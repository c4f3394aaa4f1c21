/**
 * A comparison as the reports and the panel show it: for each data file, the two fits (or only one
 * when the file was added or removed), the deltas, the notable changes in words and the gates.
 */
import { formatCount } from '../format/numbers';
import type { FitReport } from '../types';
import { compareReports, type ReportDeltas } from './deltas';
import type { GateRules } from './gateRules';
import { checkGates, checkNewFileGates, checkRemovedFileGates, type GateVerdict } from './gates';
import { notableChanges, type NotableChange } from './reasons';

export interface SideSummary {
  /** How the side is named: a path, or `REF:path`. */
  name: string;
  /** The commit a git side was read from, when known. */
  commit?: string;
}

export type FileComparison =
  | {
      status: 'compared';
      base: SideSummary;
      head: SideSummary;
      baseReport: FitReport;
      headReport: FitReport;
      deltas: ReportDeltas;
      changes: NotableChange[];
      gates: GateVerdict;
    }
  | { status: 'added'; head: SideSummary; headReport: FitReport; changes: NotableChange[]; gates: GateVerdict }
  | { status: 'removed'; base: SideSummary; baseReport: FitReport; changes: NotableChange[]; gates: GateVerdict };

export interface ComparisonSet {
  files: FileComparison[];
  passed: boolean;
}

export interface CompareInput {
  base: SideSummary;
  head: SideSummary;
  baseReport: FitReport;
  headReport: FitReport;
  /** Full column lists of the two tables, when known. */
  columns?: { base: readonly string[]; head: readonly string[] };
  /** Rule sets in order of precedence (command line, then the config); the defaults apply when none has a rule. */
  rules: (GateRules | undefined)[];
}

export function compareFile(input: CompareInput): FileComparison {
  const deltas = compareReports(input.baseReport, input.headReport, input.columns);
  return {
    status: 'compared',
    base: input.base,
    head: input.head,
    baseReport: input.baseReport,
    headReport: input.headReport,
    deltas,
    changes: notableChanges(deltas),
    gates: checkGates(deltas, ...input.rules),
  };
}

/** A file that exists only in the head: nothing can be lost or drop, so only min-accuracy and new findings apply. */
export function addedFile(head: SideSummary, headReport: FitReport, rules: (GateRules | undefined)[]): FileComparison {
  return {
    status: 'added',
    head,
    headReport,
    changes: [{ topic: 'file-added', importance: 100, text: `${head.name} is a new data file: ${headReport.classes.length} classes, ${formatCount(headReport.rows.used)} rows used.` }],
    gates: checkNewFileGates(headReport, ...rules),
  };
}

/** A file the head no longer has: every class of it is lost, which the class-lost gate reports. */
export function removedFile(base: SideSummary, baseReport: FitReport, rules: (GateRules | undefined)[]): FileComparison {
  return {
    status: 'removed',
    base,
    baseReport,
    changes: [{ topic: 'file-removed', importance: 100, text: `${base.name} was removed (it had ${baseReport.classes.length} classes, ${formatCount(baseReport.rows.used)} rows used).` }],
    gates: checkRemovedFileGates(baseReport, ...rules),
  };
}

export function comparisonSet(files: FileComparison[]): ComparisonSet {
  return { files, passed: files.every((f) => f.gates.passed) };
}
