/**
 * The side-by-side figures of a comparison (base, head, change), as text cells shared by the
 * Markdown, text and HTML renderings and the panel, so they all show the same numbers.
 */
import { formatCount, formatNumber, formatPercent, formatPValue } from '../format/numbers';
import { significantDiscriminants } from '../format/verdict';
import type { FitReport } from '../types';
import type { ReportDeltas } from './deltas';

export interface FigureRow {
  name: string;
  base: string;
  head: string;
  change: string;
}

function signedCount(delta: number): string {
  return delta === 0 ? '' : `${delta > 0 ? '+' : '−'}${formatCount(Math.abs(delta))}`;
}

function signedPoints(delta: number | null): string {
  // A change that rounds to 0.0 points is shown as none (it is also how rounding noise looks).
  if (delta === null || !Number.isFinite(delta) || (Math.abs(delta) * 100).toFixed(1) === '0.0') return '';
  return `${delta > 0 ? '+' : '−'}${(Math.abs(delta) * 100).toFixed(1)} pt`;
}

/** A change of a statistic; one within rounding of the two values (64 ulps of the larger) is no change. */
function signedNumber(delta: number | null, base: number, head: number): string {
  if (delta === null || !Number.isFinite(delta) || Math.abs(delta) <= 64 * Number.EPSILON * Math.max(Math.abs(base), Math.abs(head))) return '';
  return `${delta > 0 ? '+' : '−'}${formatNumber(Math.abs(delta))}`;
}

function cvText(report: FitReport): string {
  const cv = report.accuracy.crossValidated;
  return cv ? formatPercent(cv.value) : 'not run';
}

/** The key figures of the two fits, in the order a reviewer reads them. */
export function figureRows(base: FitReport, head: FitReport, deltas: ReportDeltas): FigureRow[] {
  const rows: FigureRow[] = [
    { name: 'Rows used', base: formatCount(base.rows.used), head: formatCount(head.rows.used), change: signedCount(deltas.rows.used.delta) },
    { name: 'Rows dropped', base: formatCount(base.rows.dropped), head: formatCount(head.rows.dropped), change: signedCount(deltas.rows.dropped.delta) },
    { name: 'Classes', base: String(base.classes.length), head: String(head.classes.length), change: signedCount(head.classes.length - base.classes.length) },
    { name: 'Features used', base: String(base.features.length), head: String(head.features.length), change: signedCount(head.features.length - base.features.length) },
    { name: 'Cross-validated accuracy', base: cvText(base), head: cvText(head), change: signedPoints(deltas.accuracy.crossValidated?.delta ?? null) },
    { name: 'Training accuracy', base: formatPercent(base.accuracy.training), head: formatPercent(head.accuracy.training), change: signedPoints(deltas.accuracy.training.delta) },
    { name: "Wilks' lambda", base: formatNumber(base.tests.wilks.statistic), head: formatNumber(head.tests.wilks.statistic), change: signedNumber(deltas.wilks.statistic.delta, deltas.wilks.statistic.base, deltas.wilks.statistic.head) },
    { name: 'Wilks p', base: formatPValue(base.tests.wilks.p), head: formatPValue(head.tests.wilks.p), change: '' },
    {
      name: 'Discriminants that matter',
      base: `${significantDiscriminants(base)} of ${base.discriminant.eigenvalues.length}`,
      head: `${significantDiscriminants(head)} of ${head.discriminant.eigenvalues.length}`,
      change: signedCount(deltas.significantDiscriminants.delta),
    },
  ];
  for (const d of deltas.discriminants) {
    const cell = (value: number | null, ratio: number | null): string => (value === null ? '—' : `${formatNumber(value)} (${formatPercent(ratio ?? NaN)})`);
    rows.push({
      name: `LD${d.index + 1} eigenvalue (share)`,
      base: cell(d.eigenvalue.base, d.explainedRatio.base),
      head: cell(d.eigenvalue.head, d.explainedRatio.head),
      change: d.explainedRatio.delta === null ? '' : signedPoints(d.explainedRatio.delta),
    });
  }
  const pcShare = (report: FitReport): string => report.pca.explainedRatio.slice(0, 2).map((r) => formatPercent(r)).join(', ') || '—';
  rows.push({ name: 'PC1, PC2 variance share', base: pcShare(base), head: pcShare(head), change: '' });
  rows.push({ name: 'Findings (errors, warnings)', base: findingCounts(base), head: findingCounts(head), change: '' });
  return rows;
}

function findingCounts(report: FitReport): string {
  const errors = report.findings.filter((f) => f.severity === 'error').length;
  const warnings = report.findings.filter((f) => f.severity === 'warning').length;
  return `${report.findings.length} (${errors}, ${warnings})`;
}

export interface ClassRow {
  label: string;
  baseRows: string;
  headRows: string;
  rowChange: string;
  baseRecall: string;
  headRecall: string;
  recallChange: string;
}

/** One row per class of either side: counts and recall (cross-validated when both sides have it). */
export function classRows(deltas: ReportDeltas): ClassRow[] {
  const counts = new Map<string, { base: number; head: number }>();
  for (const c of [...deltas.classes.kept, ...deltas.classes.gained, ...deltas.classes.lost]) counts.set(c.label, { base: c.base, head: c.head });
  return deltas.perClassRecall.map((r) => {
    const n = counts.get(r.label) ?? { base: 0, head: 0 };
    const recall = (x: number | null): string => (x === null || !Number.isFinite(x) ? '—' : formatPercent(x));
    return {
      label: r.label,
      baseRows: n.base === 0 ? '—' : formatCount(n.base),
      headRows: n.head === 0 ? '—' : formatCount(n.head),
      rowChange: signedCount(n.head - n.base),
      baseRecall: recall(r.base),
      headRecall: recall(r.head),
      recallChange: signedPoints(r.delta),
    };
  });
}
