/**
 * The verdict in plain words (the same sentence as the text and Markdown reports) with the
 * provisional mark when the report is a quick first answer, and the figures the verdict rests on.
 */
import { verdict } from '../../src/core/format/verdict';
import type { FitReport } from '../../src/core/types';
import { element } from '../dom';
import { formatCount, formatMegabytes, formatNumber } from '../format';
import { legendList } from '../plots/legend';
import { classStyles } from '../plots/scene';

function fact(term: string, ...details: (string | Node)[]): HTMLElement[] {
  return [element('dt', { text: term }), element('dd', {}, details)];
}

function droppedDetail(report: FitReport): string {
  const { rows } = report;
  if (rows.dropped === 0) return 'none dropped';
  const reasons: string[] = [];
  if (rows.droppedMissing) reasons.push(`${formatCount(rows.droppedMissing)} with missing values`);
  if (rows.droppedNonFinite) reasons.push(`${formatCount(rows.droppedNonFinite)} with infinite values`);
  if (rows.droppedRagged) reasons.push(`${formatCount(rows.droppedRagged)} ragged`);
  return `${formatCount(rows.dropped)} dropped${reasons.length ? `: ${reasons.join(', ')}` : ''}`;
}

/** "Provisional — from the first 8.4 MB of 310 MB …", or the rows read when the byte count is unknown. */
export function provisionalText(report: FitReport): string {
  const { bytesRead, bytes } = report.source;
  const part = bytesRead !== undefined ? `the first ${formatMegabytes(bytesRead)} of ${formatMegabytes(bytes)}` : `the first ${formatCount(report.rows.total)} rows of ${formatMegabytes(bytes)}`;
  return `Provisional — from ${part}. The result for the whole file follows.`;
}

export function verdictBlock(report: FitReport): HTMLElement {
  const block = element('section', { className: 'verdict', attributes: { 'aria-label': 'Verdict' } });
  if (report.provisional) block.appendChild(element('p', { className: 'provisional-mark', text: provisionalText(report), attributes: { role: 'note' } }));
  block.appendChild(element('p', { className: 'verdict-sentence', text: verdict(report) }));
  const solver = report.solver === 'shrinkage' ? `shrinkage (Ledoit–Wolf intensity ${formatNumber(report.shrinkage, 3)})` : 'exact';
  const removed = report.removedFeatures.length;
  block.appendChild(
    element('dl', { className: 'facts' }, [
      ...fact('Rows', `${formatCount(report.rows.used)} used of ${formatCount(report.rows.total)} (${droppedDetail(report)})`),
      ...fact('Label', report.label),
      ...fact('Classes', legendList(classStyles(report.classes.map((c) => c.label)), report.classes.map((c) => c.count))),
      ...fact('Features', `${report.features.length} used${removed ? `, ${removed} removed before solving` : ''}`),
      ...fact('Solver', `${solver}; condition number ${formatNumber(report.conditionNumber, 3)}`),
      ...fact('Priors', report.options.priors),
    ]),
  );
  return block;
}
