/**
 * Confusion matrices as heat grids: rows are the true class, columns the predicted one. Each cell
 * is shaded by its share of the true class's rows — blue on the diagonal (right), vermillion off it
 * (wrong) — and carries the count as text. Training and cross-validated matrices switch in place.
 */
import type { FitReport } from '../../src/core/types';
import { element, section } from '../dom';
import { formatCount, formatPercent } from '../format';
import type { StateStore } from '../state';
import { shadeCell } from './heat';

export function confusionGrid(caption: string, confusion: { labels: string[]; matrix: number[][] }): HTMLTableElement {
  const { labels, matrix } = confusion;
  const head = element('thead', {}, [
    element('tr', {}, [
      element('td', { className: 'corner', text: 'true ↓ / predicted →' }),
      ...labels.map((label) => element('th', { text: label, attributes: { scope: 'col' } })),
      element('th', { className: 'numeric', text: 'rows', attributes: { scope: 'col' } }),
      element('th', { className: 'numeric', text: 'right', attributes: { scope: 'col' } }),
    ]),
  ]);
  const body = element(
    'tbody',
    {},
    labels.map((label, i) => {
      const row = matrix[i] ?? [];
      const total = row.reduce((sum, value) => sum + value, 0);
      return element('tr', {}, [
        element('th', { text: label, attributes: { scope: 'row' } }),
        ...labels.map((predicted, j) => {
          const count = row[j] ?? 0;
          const cell = element('td', { className: i === j ? 'heat-cell diagonal' : 'heat-cell', text: formatCount(count), attributes: { title: `${label} predicted as ${predicted}: ${formatCount(count)}` } });
          shadeCell(cell, total > 0 ? count / total : 0, i === j ? 'agree' : 'error');
          return cell;
        }),
        element('td', { className: 'numeric', text: formatCount(total) }),
        element('td', { className: 'numeric', text: total > 0 ? formatPercent((row[i] ?? 0) / total) : '—' }),
      ]);
    }),
  );
  return element('table', { className: 'data-table heat-grid confusion-grid' }, [element('caption', { text: caption }), head, body]);
}

/** The grid with a switch between the training and the cross-validated matrix (when CV ran). */
export function confusionSection(report: FitReport, store: StateStore): HTMLElement {
  const holder = element('div', { className: 'table-scroll' });
  const cv = report.crossValidatedConfusion;
  const method = report.accuracy.crossValidated?.method ?? '';
  const kinds = cv ? (['crossValidated', 'training'] as const) : (['training'] as const);
  const switches = element('div', { className: 'segmented', attributes: { role: 'group', 'aria-label': 'Which confusion matrix' } });
  const show = (kind: 'training' | 'crossValidated'): void => {
    const useCv = kind === 'crossValidated' && cv !== null;
    holder.replaceChildren(
      confusionGrid(
        useCv ? `Cross-validated confusion (${method}); accuracy ${formatPercent(report.accuracy.crossValidated?.value ?? NaN)}` : `Training confusion (resubstitution); accuracy ${formatPercent(report.accuracy.training)}`,
        useCv && cv ? cv : report.confusion,
      ),
    );
    for (const node of Array.from(switches.children)) node.setAttribute('aria-pressed', String((node as HTMLElement).dataset.kind === (useCv ? 'crossValidated' : 'training')));
  };
  for (const kind of kinds) {
    const node = element('button', { className: 'segment', text: kind === 'training' ? 'Training' : 'Cross-validated', attributes: { type: 'button', 'data-kind': kind } });
    node.addEventListener('click', () => {
      store.update({ confusion: kind });
      show(kind);
    });
    switches.appendChild(node);
  }
  show(cv ? store.value.confusion : 'training');
  return section('confusion', 'Confusion matrix', [switches, holder]);
}
