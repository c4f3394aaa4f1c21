/**
 * Comparing two reports of the same table: the counts, rows, labels and texts exactly, every other
 * number to rounding (timing left out). For the parallel analysis, which must equal one thread's.
 */
import { strict as assert } from 'node:assert';
import type { FitReport } from '../../src/core/types';

/** Reports compared: these keys must match exactly (counts, rows, labels, texts). */
export function exactParts(report: FitReport): unknown {
  return {
    rows: report.rows,
    classes: report.classes.map((c) => [c.label, c.count]),
    confusion: report.confusion,
    crossValidatedConfusion: report.crossValidatedConfusion,
    accuracy: report.accuracy,
    misclassified: report.misclassified.map((m) => [m.row, m.line, m.label, m.predicted]),
    misclassifiedTotal: report.misclassifiedTotal,
    sample: { total: report.sample.total, rows: report.sample.rows, lines: report.sample.lines, classIndex: report.sample.classIndex, top: report.sample.topFeatures },
    findings: report.findings.map((f) => [f.code, f.severity, f.message]),
    removed: report.removedFeatures,
    solver: report.solver,
    provisional: report.provisional,
  };
}

/** Every number of the two reports equal to within `relative` of the larger magnitude (timing left out). */
export function assertClose(a: unknown, b: unknown, path: string, relative = 1e-9): void {
  if (typeof a === 'number' && typeof b === 'number') {
    if (Number.isNaN(a) || Number.isNaN(b) || !Number.isFinite(a) || !Number.isFinite(b)) {
      assert.ok(Object.is(a, b) || a === b, `${path}: ${a} vs ${b}`);
      return;
    }
    assert.ok(Math.abs(a - b) <= relative * Math.max(1, Math.abs(a), Math.abs(b)), `${path}: ${a} vs ${b}`);
    return;
  }
  if (a === null || b === null || typeof a !== 'object' || typeof b !== 'object') {
    assert.deepEqual(a, b, path);
    return;
  }
  const keysA = Object.keys(a).filter((k) => k !== 'timing');
  assert.deepEqual(keysA.sort(), Object.keys(b).filter((k) => k !== 'timing').sort(), `${path}: keys`);
  for (const key of keysA) assertClose((a as Record<string, unknown>)[key], (b as Record<string, unknown>)[key], `${path}.${key}`, relative);
}

export function assertSameReport(single: FitReport, parallel: FitReport): void {
  assert.deepEqual(exactParts(parallel), exactParts(single));
  assertClose(parallel, single, 'report');
}

