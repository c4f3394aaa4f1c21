/**
 * Per-class figures (rows, prior, precision, recall), the Mahalanobis distances between class
 * centroids as a heat grid, and the misclassified rows with a way to open each in the file.
 */
import type { FitReport } from '../../src/core/types';
import { button, element, section } from '../dom';
import { formatCount, formatFixed, formatNumber, formatPercent } from '../format';
import { markerSwatch } from '../plots/legend';
import { classStyles } from '../plots/scene';
import { shadeCell } from './heat';
import { dataTable } from './table';

export function perClassSection(report: FitReport): HTMLElement {
  const styles = classStyles(report.classes.map((c) => c.label));
  const byLabel = new Map(report.perClass.map((p) => [p.label, p]));
  const rows = report.classes.map((c, i) => ({ ...c, style: styles[i], quality: byLabel.get(c.label) }));
  const table = dataTable(
    'Per class: rows, prior, and how often it is predicted right',
    [
      { header: 'Class', cell: (r) => [markerSwatch(r.style), ' ', r.label] },
      { header: 'Rows', cell: (r) => formatCount(r.count), numeric: true },
      { header: 'Prior', cell: (r) => formatNumber(r.prior, 3), numeric: true },
      { header: 'Precision', cell: (r) => (r.quality ? formatPercent(r.quality.precision) : '—'), numeric: true, title: 'Of the rows predicted as this class, the share that are (training)' },
      { header: 'Recall', cell: (r) => (r.quality ? formatPercent(r.quality.recall) : '—'), numeric: true, title: 'Of this class’s rows, the share predicted right (training)' },
      { header: 'CV recall', cell: (r) => (r.quality?.cvRecall == null ? '—' : formatPercent(r.quality.cvRecall)), numeric: true, title: 'Recall under cross-validation' },
    ],
    rows,
    { className: 'per-class-table' },
  );
  return section('per-class', 'Classes', [element('div', { className: 'table-scroll' }, [table])]);
}

export function distanceSection(report: FitReport): HTMLElement {
  const { labels, matrix } = report.centroidDistances;
  let largest = 0;
  for (const row of matrix) for (const value of row) if (Number.isFinite(value)) largest = Math.max(largest, value);
  const head = element('thead', {}, [element('tr', {}, [element('td', { className: 'corner' }), ...labels.map((label) => element('th', { text: label, attributes: { scope: 'col' } }))])]);
  const body = element(
    'tbody',
    {},
    labels.map((label, i) =>
      element('tr', {}, [
        element('th', { text: label, attributes: { scope: 'row' } }),
        ...labels.map((_, j) => {
          const value = matrix[i]?.[j] ?? NaN;
          const cell = element('td', { className: 'heat-cell', text: i === j ? '·' : formatFixed(value, 2) });
          if (i !== j && largest > 0) shadeCell(cell, 1 - value / largest, 'agree');
          return cell;
        }),
      ]),
    ),
  );
  const table = element('table', { className: 'data-table heat-grid distance-grid' }, [
    element('caption', { text: 'Mahalanobis distance between class centroids (pooled within-class covariance); darker = closer' }),
    head,
    body,
  ]);
  return section('distances', 'Centroid distances', [element('div', { className: 'table-scroll' }, [table])]);
}

export function misclassifiedSection(report: FitReport, reveal: (row: number, line: number | undefined) => void): HTMLElement {
  const shown = report.misclassified;
  const source = report.accuracy.crossValidated ? 'under cross-validation' : 'in training';
  const note = element('p', {
    className: 'note',
    text:
      report.misclassifiedTotal === 0
        ? `No row is misclassified ${source}.`
        : `${formatCount(report.misclassifiedTotal)} rows misclassified ${source}${shown.length < report.misclassifiedTotal ? `; the first ${formatCount(shown.length)} are listed` : ''}.`,
  });
  if (shown.length === 0) return section('misclassified', 'Misclassified rows', [note]);
  const table = dataTable(
    'Misclassified rows',
    [
      { header: 'Row', cell: (m) => formatCount(m.row + 1), numeric: true, title: 'Data row, counting from 1 (header excluded)' },
      { header: 'Line', cell: (m) => (m.line === undefined ? '—' : formatCount(m.line)), numeric: true },
      { header: 'True class', cell: (m) => m.label },
      { header: 'Predicted', cell: (m) => m.predicted },
      { header: 'Posterior', cell: (m) => formatFixed(m.posterior, 3), numeric: true, title: 'Posterior probability of the predicted class' },
      { header: '', cell: (m) => button('Show in file', () => reveal(m.row, m.line), { className: 'link-button', attributes: { 'aria-label': `Show row ${m.row + 1} in the file` } }) },
    ],
    shown,
    { className: 'misclassified-table' },
  );
  return section('misclassified', 'Misclassified rows', [note, element('div', { className: 'table-scroll table-tall' }, [table])]);
}
