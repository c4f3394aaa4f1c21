/**
 * A whole report: the verdict and its figures, then the tabs (projections, features, classes,
 * statistics, findings, column roles). Owns the links between parts: selecting a finding marks its
 * columns and rows, "show in file" asks the host to reveal a row, exports go to the host.
 */
import { toMarkdown } from '../../src/core/format/markdown';
import type { FitReport } from '../../src/core/types';
import type { ColumnChoice, EditableOptions, FromPanel } from '../../src/shared/messages';
import { element, section } from '../dom';
import { HighlightHub } from '../plots/highlight';
import { roleForm } from '../roles';
import type { StateStore, TabId } from '../state';
import { distanceSection, misclassifiedSection, perClassSection } from '../tables/classes';
import { confusionSection } from '../tables/confusion';
import { featuresSection } from '../tables/features';
import { findingsSection } from '../tables/findings';
import { statisticsSection } from '../tables/statistics';
import { ColumnMarks } from './marks';
import { projectionsSection } from './projections';
import type { PackedSample } from '../../src/shared/packedSample';
import { sampleColumns } from '../sample';
import { tabs, type Tabs } from './tabs';
import { verdictBlock } from './verdict';

export interface ReportContext {
  store: StateStore;
  post: (message: FromPanel) => void;
  /** The data file's name without folders or extension, to prefix export file names. */
  fileStem: string;
  columns: readonly ColumnChoice[];
  options: EditableOptions;
  /** The sample as it arrived, in typed columns: the plots draw from these without copying. */
  packedSample?: PackedSample;
}

export interface RenderedReport {
  element: HTMLElement;
  dispose: () => void;
}

export function renderReport(report: FitReport, context: ReportContext): RenderedReport {
  const { store, post } = context;
  const hub = new HighlightHub();
  const marks = new ColumnMarks();
  const columns = sampleColumns(report, context.packedSample);
  const disposers: (() => void)[] = [];
  let tabControl: Tabs | null = null;

  const reveal = (row: number, line?: number): void => post(line === undefined ? { type: 'revealRow', row } : { type: 'revealRow', row, line });
  const lineOfRow = (row: number): number | undefined => {
    const index = columns.indexOfRow(row);
    return index === undefined ? report.misclassified.find((m) => m.row === row)?.line : report.sample.lines?.[index];
  };
  const onExport = (kind: 'png' | 'svg', fileName: string, data: string): void => post({ type: 'export', kind, fileName: `${context.fileStem}-${fileName}`, data });
  const plottedRows = (rows: readonly number[]): number[] => rows.map((row) => columns.indexOfRow(row)).filter((i): i is number => i !== undefined);

  const findingsHolder = element('div', { className: 'findings-holder' });
  const applyFinding = (index: number | null): void => {
    const finding = index === null ? undefined : report.findings[index];
    marks.mark(finding?.columns ?? []);
    hub.mark(finding?.rows ? plottedRows(finding.rows) : []);
  };
  const drawFindings = (): void => {
    findingsHolder.replaceChildren(
      findingsSection(report, {
        selected: store.value.selectedFinding,
        select: (index) => {
          store.update({ selectedFinding: index });
          applyFinding(index);
          drawFindings();
        },
        plottedRows,
        showInPlots: () => tabControl?.select('projections', true),
        reveal: (row) => reveal(row, lineOfRow(row)),
      }),
    );
  };
  const selected = store.value.selectedFinding;
  if (selected !== null && selected >= report.findings.length) store.update({ selectedFinding: null });
  drawFindings();
  applyFinding(store.value.selectedFinding);

  const findingCount = report.findings.length;
  const serious = report.findings.filter((f) => f.severity !== 'info').length;
  tabControl = tabs(
    [
      {
        id: 'projections',
        label: 'Projections',
        content: () => {
          const rendered = projectionsSection(report, columns, { hub, store, onExport, reveal });
          disposers.push(rendered.dispose);
          return rendered.element;
        },
      },
      { id: 'features', label: 'Features', content: () => featuresSection(report, marks) },
      {
        id: 'classes',
        label: 'Classes',
        content: () => element('div', {}, [confusionSection(report, store), perClassSection(report), distanceSection(report), misclassifiedSection(report, reveal)]),
      },
      {
        id: 'statistics',
        label: 'Statistics',
        content: () =>
          statisticsSection(report, () => post({ type: 'export', kind: 'markdown', fileName: `${context.fileStem}-statistics.md`, data: toMarkdown(report) })),
      },
      { id: 'findings', label: `Findings (${findingCount}${serious ? `, ${serious} to check` : ''})`, content: () => findingsHolder },
      {
        id: 'columns',
        label: 'Columns',
        content: () =>
          context.columns.length > 0
            ? section('columns', 'Column roles and fit options', [roleForm({
                columns: context.columns,
                current: context.options,
                edits: store.value.roleEdits,
                onEdit: (edits) => store.update({ roleEdits: edits }),
                onRefit: (options) => post({ type: 'refit', options }),
                onSaveRoles: () => post({ type: 'command', command: 'saveRoles' }),
              })])
            : element('p', { className: 'note', text: 'The column list is not available for this report.' }),
      },
    ],
    store.value.tab,
    (id: TabId) => store.update({ tab: id }),
  );

  return {
    element: element('div', { className: 'report' }, [verdictBlock(report), tabControl.element]),
    dispose: () => {
      for (const dispose of disposers) dispose();
    },
  };
}
