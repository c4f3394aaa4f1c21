/**
 * Runs our pipeline on a fixture file, for the reference suites, and a few readers of the report
 * that the suites share.
 */
import * as assert from 'node:assert/strict';
import { analyze } from '../../src/core/analyze';
import type { FitOptions, FitReport } from '../../src/core/types';
import { openFileSource } from '../../src/node/fileSource';
import { assertClose, loadReference, repoPath, type Figure, type Reference } from './compare';

/** analyze() on `test/fixtures/<file>` through the Node file source, as the CLI does. */
export async function fitFixture(file: string, options: Partial<FitOptions>): Promise<FitReport> {
  const source = await openFileSource(repoPath('test', 'fixtures', file));
  try {
    return (await analyze(source, options)).report;
  } finally {
    await source.close();
  }
}

/**
 * The rows of a per-row reference figure (rows × k) in the order of the report's plot sample, after
 * checking the sample holds every used row (small tables fit the plot budget entirely).
 */
export function sampledRows(report: FitReport, perRow: number[][], columns: number): number[][] {
  assert.equal(report.sample.rows.length, report.rows.used, 'the plot sample should hold every row of this small table');
  return report.sample.rows.map((row) => perRow[row].slice(0, columns));
}

/** Pooled within-class covariance (divisor n − K) of per-row scores, classes given per row. */
export function pooledWithinCovariance(scores: number[][], classOf: number[], K: number): number[][] {
  const n = scores.length;
  const k = scores[0].length;
  const sums = Array.from({ length: K }, () => new Array<number>(k).fill(0));
  const counts = new Array<number>(K).fill(0);
  scores.forEach((s, i) => {
    counts[classOf[i]]++;
    s.forEach((v, j) => (sums[classOf[i]][j] += v));
  });
  const means = sums.map((row, c) => row.map((v) => v / counts[c]));
  const cov = Array.from({ length: k }, () => new Array<number>(k).fill(0));
  scores.forEach((s, i) => {
    const m = means[classOf[i]];
    for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) cov[a][b] += (s[a] - m[a]) * (s[b] - m[b]);
  });
  return cov.map((row) => row.map((v) => v / (n - K)));
}

/**
 * Our misclassified rows against the rows a reference misclassifies (those whose largest
 * posterior is not their true class), and the posterior of the class it predicts for each.
 */
export function checkMisclassified(report: FitReport, posterior: Figure<number[][]>, truth: number[], what: string): void {
  const expected: { row: number; predicted: number; posterior: number }[] = [];
  posterior.value.forEach((p, row) => {
    const predicted = p.indexOf(Math.max(...p));
    if (predicted !== truth[row]) expected.push({ row, predicted, posterior: p[predicted] });
  });
  assert.equal(report.misclassifiedTotal, expected.length, `${what}: misclassified count (${posterior.source})`);
  const ours = [...report.misclassified].sort((a, b) => a.row - b.row);
  assert.deepEqual(ours.map((m) => m.row), expected.map((m) => m.row), `${what}: misclassified rows (${posterior.source})`);
  ours.forEach((m, i) => {
    assert.equal(m.predicted, report.classes[expected[i].predicted].label, `${what}: row ${m.row} predicted class`);
    assertClose(m.posterior, { source: posterior.source, value: expected[i].posterior }, `${what}: row ${m.row} posterior of the predicted class`);
  });
}

/** A reference table's two outside references, its rows' true classes and our fit of it. */
export interface ReferenceCase {
  py: Reference;
  rr: Reference;
  /** Class (index into the sorted labels) of every row, file order, as the references read it. */
  truth: number[];
  report: FitReport;
}

/** Loads `<name>.python` and `<name>.r` and fits `test/fixtures/<file>` with `options`. */
export async function loadReferenceCase(name: string, file: string, options: Partial<FitOptions>): Promise<ReferenceCase> {
  const py = loadReference(`${name}.python`);
  const rr = loadReference(`${name}.r`);
  const report = await fitFixture(file, options);
  return { py, rr, truth: (py.data as { classOfRow: number[] }).classOfRow, report };
}
