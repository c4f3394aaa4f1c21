/**
 * A comparison of two fits of the open file (e.g. the file now against HEAD): the gates, what
 * changed in words, both verdicts, the key figures side by side with their change, the classes
 * with their rows and recall, and both fits' projections on the same axis scale. The figures come
 * from the same core functions as the CLI's comparison, so the panel and a CI comment agree.
 */
import { classRows, compareReports, figureRows } from '../../src/core/compare/index';
import { verdict } from '../../src/core/format/verdict';
import type { ShownComparison } from './app';
import { element, section } from '../dom';
import { dataTable } from '../tables/table';
import { comparisonProjections, type ComparisonPlotContext } from './comparisonPlots';

export type ComparisonContext = ComparisonPlotContext;

function gatesBlock(message: ShownComparison): HTMLElement | null {
  if (!message.gates || message.gates.length === 0) return null;
  const failed = message.gates.filter((g) => !g.passed);
  return element('div', { className: failed.length > 0 ? 'comparison-gates gates-failed' : 'comparison-gates gates-passed' }, [
    element('p', { className: 'comparison-gates-summary', text: failed.length > 0 ? `Gates fail: ${failed.length} of ${message.gates.length}` : `Gates pass (${message.gates.length})` }),
    element(
      'ul',
      {},
      message.gates.map((g) => element('li', {}, [element('strong', { text: g.passed ? 'pass ' : 'FAIL ' }), element('code', { text: g.rule }), `: ${g.detail}`])),
    ),
  ]);
}

/** The comparison, with a `dispose` that stops its plots; without a context, the plots are left out. */
export function renderComparison(message: ShownComparison, context?: ComparisonContext): { element: HTMLElement; dispose: () => void } {
  const deltas = compareReports(message.base, message.head);
  const figures = figureRows(message.base, message.head, deltas);
  const classes = classRows(deltas);
  const recallKind = deltas.perClassRecall[0]?.kind === 'cross-validated' ? 'CV recall' : 'Recall';
  const projections = context ? comparisonProjections(message.base, message.head, message.baseName, context) : { element: null, dispose: () => undefined };
  const body = section(
    'comparison',
    `Compared with ${message.baseName}`,
    [
      gatesBlock(message),
      message.changes.length > 0
        ? element('ul', { className: 'changes' }, message.changes.map((change) => element('li', { text: change })))
        : element('p', { className: 'note', text: 'No notable change: the two fits agree.' }),
      element('p', {}, [element('strong', { text: 'Before: ' }), verdict(message.base)]),
      element('p', {}, [element('strong', { text: 'Now: ' }), verdict(message.head)]),
      element('div', { className: 'table-scroll' }, [
        dataTable(
          'Key figures before and now',
          [
            { header: 'Figure', cell: (r) => r.name },
            { header: message.baseName, cell: (r) => r.base, numeric: true },
            { header: 'Now', cell: (r) => r.head, numeric: true },
            { header: 'Change', cell: (r) => r.change, numeric: true },
          ],
          figures,
          { className: 'comparison-table', decorateRow: (tr, row) => tr.classList.toggle('is-changed', row.base !== row.head) },
        ),
      ]),
      element('div', { className: 'table-scroll' }, [
        dataTable(
          'Classes before and now',
          [
            { header: 'Class', cell: (r) => r.label },
            { header: 'Rows before', cell: (r) => r.baseRows, numeric: true },
            { header: 'Rows now', cell: (r) => r.headRows, numeric: true },
            { header: 'Change', cell: (r) => r.rowChange, numeric: true },
            { header: `${recallKind} before`, cell: (r) => r.baseRecall, numeric: true },
            { header: `${recallKind} now`, cell: (r) => r.headRecall, numeric: true },
            { header: 'Change', cell: (r) => r.recallChange, numeric: true },
          ],
          classes,
          { className: 'comparison-table', decorateRow: (tr, row) => tr.classList.toggle('is-changed', row.rowChange !== '' || row.recallChange !== '') },
        ),
      ]),
      projections.element,
    ],
    'section comparison',
  );
  return { element: body, dispose: projections.dispose };
}

/** The comparison as an element only (no plots without a context); prefer `renderComparison`, whose `dispose` stops the plots. */
export function comparisonSection(message: ShownComparison, context?: ComparisonContext): HTMLElement {
  return renderComparison(message, context).element;
}
