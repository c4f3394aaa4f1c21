/** A comparison of two reports: what changed in words, then the key figures side by side. */
import { verdict } from '../../src/core/format/verdict';
import type { FitReport } from '../../src/core/types';
import type { ComparisonMessage } from '../../src/shared/messages';
import { element, section } from '../dom';
import { formatCount, formatNumber, formatPercent, formatPValue } from '../format';
import { dataTable } from '../tables/table';

function keyFigures(report: FitReport): string[] {
  const cv = report.accuracy.crossValidated;
  return [
    formatCount(report.rows.used),
    String(report.classes.length),
    String(report.features.length),
    formatPercent(report.accuracy.training),
    cv ? formatPercent(cv.value) : 'not run',
    formatNumber(report.tests.wilks.statistic),
    formatPValue(report.tests.wilks.p),
    report.discriminant.explainedRatio.map((r) => formatPercent(r)).join(', '),
    formatCount(report.findings.length),
  ];
}

const FIGURE_NAMES = ['Rows used', 'Classes', 'Features', 'Training accuracy', 'Cross-validated accuracy', 'Wilks’ lambda', 'Wilks p', 'Explained by LD1, LD2, …', 'Findings'];

export function comparisonSection(message: ComparisonMessage): HTMLElement {
  const base = keyFigures(message.base);
  const head = keyFigures(message.head);
  const rows = FIGURE_NAMES.map((name, i) => ({ name, base: base[i], head: head[i] }));
  return section('comparison', `Compared with ${message.baseName}`, [
    message.changes.length > 0
      ? element('ul', { className: 'changes' }, message.changes.map((change) => element('li', { text: change })))
      : element('p', { className: 'note', text: 'No notable change.' }),
    element('p', {}, [element('strong', { text: 'Before: ' }), verdict(message.base)]),
    element('div', { className: 'table-scroll' }, [
      dataTable(
        'Key figures before and after',
        [
          { header: 'Figure', cell: (r) => r.name },
          { header: message.baseName, cell: (r) => r.base, numeric: true },
          { header: 'Now', cell: (r) => r.head, numeric: true },
        ],
        rows.map((r) => ({ ...r, changed: r.base !== r.head })),
        { className: 'comparison-table', decorateRow: (tr, row) => tr.classList.toggle('is-changed', row.changed) },
      ),
    ]),
  ], 'section comparison');
}
