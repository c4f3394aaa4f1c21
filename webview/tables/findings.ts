/**
 * The findings, errors first. Selecting one marks the columns it names (feature table) and the
 * rows it names (plots, when they are in the plotted sample); selecting it again clears the marks.
 */
import type { Finding, FitReport, Severity } from '../../src/core/types';
import { button, element, section } from '../dom';
import { formatCount } from '../format';

const ORDER: Severity[] = ['error', 'warning', 'info'];
const SEVERITY_WORD: Record<Severity, string> = { error: 'Error', warning: 'Warning', info: 'Note' };

export interface FindingActions {
  selected: number | null;
  select: (index: number | null) => void;
  /** Sample indices of the given data rows (those that were plotted). */
  plottedRows: (rows: readonly number[]) => number[];
  showInPlots: () => void;
  reveal: (row: number) => void;
}

function detail(finding: Finding, actions: FindingActions): HTMLElement {
  const parts: HTMLElement[] = [];
  if (finding.columns?.length) {
    parts.push(element('p', {}, [`Columns (marked in the feature table): `, ...finding.columns.flatMap((c, i) => [i > 0 ? ', ' : '', element('code', { text: c })])]));
  }
  if (finding.rows?.length) {
    const plotted = actions.plottedRows(finding.rows);
    parts.push(
      element('p', { text: `${formatCount(finding.rows.length)} rows named; ${formatCount(plotted.length)} of them are in the plotted sample and ringed in the plots.` }),
      element('div', { className: 'control-row' }, [
        plotted.length > 0 ? button('Show in the plots', actions.showInPlots) : null,
        button(`Show row ${formatCount(finding.rows[0] + 1)} in the file`, () => actions.reveal(finding.rows![0])),
      ]),
    );
  }
  return element('div', { className: 'finding-detail' }, parts);
}

export function findingsSection(report: FitReport, actions: FindingActions): HTMLElement {
  const indexed = report.findings.map((finding, index) => ({ finding, index }));
  indexed.sort((a, b) => ORDER.indexOf(a.finding.severity) - ORDER.indexOf(b.finding.severity) || a.index - b.index);
  if (indexed.length === 0) return section('findings', 'Findings', [element('p', { className: 'note', text: 'No data-quality findings.' })]);
  const counts = ORDER.map((severity) => [severity, report.findings.filter((f) => f.severity === severity).length] as const).filter(([, n]) => n > 0);
  const summary = element('p', { className: 'note', text: counts.map(([severity, n]) => `${n} ${SEVERITY_WORD[severity].toLowerCase()}${n === 1 ? '' : 's'}`).join(', ') });
  const list = element(
    'ul',
    { className: 'findings-list' },
    indexed.map(({ finding, index }) => {
      const selected = actions.selected === index;
      const toggle = element('button', {
        className: `finding finding-${finding.severity}`,
        attributes: { type: 'button', 'aria-pressed': String(selected), 'data-code': finding.code, 'data-index': index },
      }, [
        element('span', { className: `severity severity-${finding.severity}`, text: SEVERITY_WORD[finding.severity] }),
        element('span', { className: 'finding-code', text: finding.code }),
        element('span', { className: 'finding-message', text: finding.message }),
      ]);
      toggle.addEventListener('click', () => actions.select(selected ? null : index));
      return element('li', {}, [toggle, selected ? detail(finding, actions) : null]);
    }),
  );
  return section('findings', 'Findings', [summary, list]);
}
