/**
 * The features: ranked by univariate F (one-way ANOVA of the feature on the class), with the
 * standardized discriminant coefficients and the structure correlations of a chosen discriminant
 * as bars, and the features removed before solving with their reasons.
 */
import type { FitReport } from '../../src/core/types';
import { element, section, uniqueId } from '../dom';
import { formatFixed, formatNumber, formatPValue } from '../format';
import type { ColumnMarks } from '../render/marks';
import { dataTable, magnitudeBar, signedBar } from './table';

interface FeatureRow {
  feature: string;
  F: number;
  p: number;
  etaSquared: number;
  /** Index into report.features, or −1 when the feature was removed before solving. */
  solved: number;
}

function featureRows(report: FitReport): FeatureRow[] {
  const solvedIndex = new Map(report.features.map((name, i) => [name, i]));
  return [...report.univariate]
    .sort((a, b) => (b.F === a.F ? 0 : Number.isNaN(a.F) ? 1 : Number.isNaN(b.F) ? -1 : b.F - a.F))
    .map((u) => ({ ...u, solved: solvedIndex.get(u.feature) ?? -1 }));
}

function largestMagnitude(matrix: number[][], column: number): number {
  let largest = 0;
  for (const row of matrix) if (Number.isFinite(row[column])) largest = Math.max(largest, Math.abs(row[column]));
  return largest || 1;
}

function featureTable(report: FitReport, rows: FeatureRow[], discriminant: number, marks: ColumnMarks): HTMLTableElement {
  const { standardizedCoefficients, structure } = report.discriminant;
  const largestF = Math.max(...rows.map((r) => (Number.isFinite(r.F) ? r.F : 0)), 1e-300);
  const coefficientScale = largestMagnitude(standardizedCoefficients, discriminant);
  const name = `LD${discriminant + 1}`;
  return dataTable(
    `Features ranked by univariate F; coefficients and structure correlations on ${name}`,
    [
      { header: 'Feature', cell: (r) => r.feature },
      { header: 'F', cell: (r) => magnitudeBar(r.F / largestF, formatNumber(r.F)), title: 'One-way ANOVA F of the feature on the class' },
      { header: 'p', cell: (r) => formatPValue(r.p), numeric: true },
      { header: 'η²', cell: (r) => formatNumber(r.etaSquared, 3), numeric: true, title: 'Share of the feature’s variance between classes' },
      {
        header: `Std. coefficient ${name}`,
        cell: (r) => (r.solved < 0 ? 'removed' : signedBar(standardizedCoefficients[r.solved][discriminant] / coefficientScale, formatFixed(standardizedCoefficients[r.solved][discriminant], 3))),
        title: 'Raw coefficient times the pooled within-class standard deviation',
      },
      {
        header: `Structure r ${name}`,
        cell: (r) => (r.solved < 0 ? 'removed' : signedBar(structure[r.solved][discriminant], formatFixed(structure[r.solved][discriminant], 3))),
        title: 'Pooled within-class correlation of the feature with the discriminant score',
      },
    ],
    rows,
    {
      className: 'feature-table',
      decorateRow: (tr, row) => {
        tr.dataset.feature = row.feature;
        marks.register(row.feature, tr);
      },
    },
  );
}

export function featuresSection(report: FitReport, marks: ColumnMarks): HTMLElement {
  const rows = featureRows(report);
  const k = report.discriminant.eigenvalues.length;
  const holder = element('div', { className: 'table-scroll' });
  const show = (discriminant: number): void => {
    holder.replaceChildren(featureTable(report, rows, discriminant, marks));
  };
  const children: HTMLElement[] = [];
  if (k > 1) {
    const id = uniqueId('discriminant-choice');
    const select = element(
      'select',
      { attributes: { id } },
      report.discriminant.eigenvalues.map((_, j) => element('option', { text: `LD${j + 1}`, attributes: { value: j } })),
    );
    select.addEventListener('change', () => show(Number(select.value)));
    children.push(element('div', { className: 'control-row' }, [element('label', { text: 'Coefficients and structure of ', attributes: { for: id } }), select]));
  }
  show(0);
  children.push(holder);
  if (report.removedFeatures.length > 0) {
    const list = element(
      'ul',
      { className: 'removed-features' },
      report.removedFeatures.map((removed) => {
        const item = element('li', {}, [element('span', { className: 'feature-name', text: removed.feature }), ` — ${removed.reason}`]);
        item.dataset.feature = removed.feature;
        marks.register(removed.feature, item);
        return item;
      }),
    );
    children.push(element('h4', { text: 'Removed before solving' }), list);
  }
  return section('features', 'Features', children);
}
