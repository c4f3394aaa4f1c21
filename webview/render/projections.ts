/**
 * The projections tab: the discriminant scores (a scatter of a chosen pair of discriminants, or a
 * density with a strip per class when there is only one) beside the principal components of the
 * same sampled rows, linked point for point; for two classes also the densities along PC1. Under
 * the plots: how many rows are shown, the selected point's details, and the plots as a table.
 */
import type { FitReport } from '../../src/core/types';
import { button, element, section, uniqueId } from '../dom';
import { formatCount, formatFixed, formatNumber, formatPercent } from '../format';
import type { HighlightHub } from '../plots/highlight';
import { legendList } from '../plots/legend';
import { PlotView, type PointDescription } from '../plots/plotView';
import { classStyles, densityScene, scatterScene, type ClassStyle, type PlotScene, type ScatterScene } from '../plots/scene';
import type { StateStore } from '../state';
import { dataTable } from '../tables/table';
import type { SampleColumns } from '../sample';

export interface ProjectionActions {
  hub: HighlightHub;
  store: StateStore;
  onExport: (kind: 'png' | 'svg', fileName: string, data: string) => void;
  reveal: (row: number, line: number | undefined) => void;
}

function axisTitle(prefix: string, index: number, ratio: number | undefined): string {
  return `${prefix}${index + 1} (${ratio === undefined ? '—' : formatPercent(ratio)} of ${prefix === 'LD' ? 'separation' : 'variance'})`;
}

function describer(report: FitReport, columns: SampleColumns): (index: number) => PointDescription {
  const misclassified = new Map(report.misclassified.map((m) => [m.row, m]));
  const { sample } = report;
  return (index) => {
    const row = sample.rows[index];
    const line = sample.lines?.[index];
    const label = report.classes[sample.classIndex[index]]?.label ?? '?';
    const lines = [`class ${label}`];
    const wrong = misclassified.get(row);
    if (wrong) lines.push(`predicted ${wrong.predicted} (posterior ${formatFixed(wrong.posterior, 3)})`);
    lines.push(columns.discriminant.map((values, j) => `LD${j + 1} ${formatFixed(values[index], 3)}`).join(', '));
    if (columns.principal.length) lines.push(columns.principal.map((values, j) => `PC${j + 1} ${formatFixed(values[index], 3)}`).join(', '));
    sample.topFeatures.names.forEach((name, f) => lines.push(`${name} = ${formatNumber(sample.topFeatures.values[index]?.[f] ?? NaN)}`));
    return { heading: `Row ${formatCount(row + 1)}${line !== undefined ? ` · line ${formatCount(line)}` : ''}`, lines };
  };
}

function summary(scene: PlotScene, classes: readonly ClassStyle[]): string {
  if (scene.kind === 'density') {
    return `${scene.title}: densities of ${scene.xTitle} for ${classes.length} classes, ${formatCount(scene.values.length)} points${scene.strip ? ' also drawn as a strip per class' : ''}. The table below the plots lists the class centres.`;
  }
  const centres = scene.centroids
    .map((c, i) => (c ? `${classes[i].label} at ${formatFixed(c.x, 2)}, ${formatFixed(c.y, 2)}` : null))
    .filter((text): text is string => text !== null)
    .join('; ');
  return `${scene.title}: ${formatCount(scene.x.length)} points in ${classes.length} classes, ${scene.xTitle} across, ${scene.yTitle} up; ${scene.centroidNote}: ${centres}.`;
}

function discriminantScene(report: FitReport, columns: SampleColumns, classes: ClassStyle[], axes: [number, number]): PlotScene {
  const ratios = report.discriminant.explainedRatio;
  if (columns.discriminant.length < 2) {
    return densityScene({
      id: 'ld1-density',
      title: 'Discriminant scores by class',
      xTitle: axisTitle('LD', 0, ratios[0]),
      values: columns.discriminant[0] ?? new Float64Array(columns.count).fill(NaN),
      classIndex: columns.classIndex,
      classes,
      strip: true,
    });
  }
  const [ax, ay] = axes;
  const centroids = report.discriminant.centroids.map((c) => (Number.isFinite(c[ax]) && Number.isFinite(c[ay]) ? { x: c[ax], y: c[ay] } : null));
  return scatterScene({
    id: `ld-scatter-${ax + 1}-${ay + 1}`,
    title: 'Discriminant scores',
    xTitle: axisTitle('LD', ax, ratios[ax]),
    yTitle: axisTitle('LD', ay, ratios[ay]),
    x: columns.discriminant[ax],
    y: columns.discriminant[ay],
    classIndex: columns.classIndex,
    classes,
    centroids,
  });
}

function principalScenes(report: FitReport, columns: SampleColumns, classes: ClassStyle[]): PlotScene[] {
  const ratios = report.pca.explainedRatio;
  const scenes: PlotScene[] = [];
  if (columns.principal.length >= 2) {
    scenes.push(
      scatterScene({
        id: 'pc-scatter',
        title: 'Principal components of the same rows',
        xTitle: axisTitle('PC', 0, ratios[0]),
        yTitle: axisTitle('PC', 1, ratios[1]),
        x: columns.principal[0],
        y: columns.principal[1],
        classIndex: columns.classIndex,
        classes,
      }),
    );
  }
  if (columns.principal.length >= 1 && (report.classes.length === 2 || columns.principal.length < 2)) {
    scenes.push(
      densityScene({
        id: 'pc1-density',
        title: 'First principal component by class',
        xTitle: axisTitle('PC', 0, ratios[0]),
        values: columns.principal[0],
        classIndex: columns.classIndex,
        classes,
        strip: columns.principal.length < 2,
      }),
    );
  }
  return scenes;
}

/** The class centres of every plot as a table: the plots' text alternative. */
function centresTable(report: FitReport, columns: SampleColumns, classes: ClassStyle[]): HTMLTableElement {
  const plotted = new Float64Array(classes.length);
  const pcSums = columns.principal.map(() => new Float64Array(classes.length));
  for (let i = 0; i < columns.count; i++) {
    const c = columns.classIndex[i];
    if (c < 0 || c >= classes.length) continue;
    plotted[c]++;
    columns.principal.forEach((values, j) => (pcSums[j][c] += values[i]));
  }
  const ldShown = Math.min(report.discriminant.eigenvalues.length, 3);
  return dataTable(
    'Class centres in the plots',
    [
      { header: 'Class', cell: (_, c) => classes[c].label },
      { header: 'Rows plotted', cell: (_, c) => formatCount(plotted[c]), numeric: true },
      ...Array.from({ length: ldShown }, (_, j) => ({ header: `LD${j + 1} centroid`, cell: (_: unknown, c: number) => formatFixed(report.discriminant.centroids[c]?.[j] ?? NaN, 3), numeric: true })),
      ...pcSums.map((sums, j) => ({ header: `PC${j + 1} mean (plotted)`, cell: (_: unknown, c: number) => formatFixed(plotted[c] > 0 ? sums[c] / plotted[c] : NaN, 3), numeric: true })),
    ],
    classes,
    { className: 'centres-table' },
  );
}

function axesChooser(count: number, axes: [number, number], onChange: (axes: [number, number]) => void): HTMLElement {
  const current: [number, number] = [...axes];
  const choosers: HTMLSelectElement[] = [];
  const make = (which: 0 | 1, text: string): HTMLElement => {
    const id = uniqueId('axis');
    const chooser = element(
      'select',
      { attributes: { id } },
      Array.from({ length: count }, (_, j) => element('option', { text: `LD${j + 1}`, attributes: { value: j, selected: current[which] === j } })),
    );
    choosers[which] = chooser;
    chooser.addEventListener('change', () => {
      const previous = current[which];
      current[which] = Number(chooser.value);
      // Choosing the other axis's discriminant swaps the two.
      if (current[0] === current[1]) {
        current[1 - which] = previous;
        choosers[1 - which].value = String(previous);
      }
      onChange([current[0], current[1]]);
    });
    return element('span', { className: 'form-field-inline' }, [element('label', { text, attributes: { for: id } }), chooser]);
  };
  return element('div', { className: 'control-row' }, [make(0, 'Across'), make(1, 'Up')]);
}

export function projectionsSection(report: FitReport, columns: SampleColumns, actions: ProjectionActions): { element: HTMLElement; dispose: () => void } {
  const { hub, store } = actions;
  const classes = classStyles(report.classes.map((c) => c.label));
  const describe = describer(report, columns);
  const views: PlotView[] = [];
  const makeView = (scene: PlotScene): PlotView => {
    const view = new PlotView({ scene, hub, store, describePoint: describe, summary: summary(scene, classes), onExport: actions.onExport });
    views.push(view);
    return view;
  };
  const grid = element('div', { className: 'plot-grid' });
  const ldCount = columns.discriminant.length;
  const validAxes = (axes: [number, number]): [number, number] => (axes[0] < ldCount && axes[1] < ldCount && axes[0] !== axes[1] ? axes : [0, 1]);
  let ldView: PlotView | null = null;
  const placeDiscriminant = (axes: [number, number]): void => {
    const scene = discriminantScene(report, columns, classes, validAxes(axes));
    const view = makeView(scene);
    if (ldView) {
      ldView.dispose();
      views.splice(views.indexOf(ldView), 1);
      ldView.element.replaceWith(view.element);
    } else grid.appendChild(view.element);
    ldView = view;
    view.schedule();
  };
  placeDiscriminant(store.value.discriminantAxes);
  for (const scene of principalScenes(report, columns, classes)) grid.appendChild(makeView(scene).element);

  const detail = element('div', { className: 'point-detail', attributes: { 'aria-live': 'polite' } });
  const showSelected = (index: number): void => {
    if (index < 0 || index >= columns.count) {
      detail.replaceChildren(element('p', { className: 'note', text: 'Click a point (or use the table of misclassified rows) to see its row here.' }));
      return;
    }
    const description = describe(index);
    const row = report.sample.rows[index];
    const line = report.sample.lines?.[index];
    detail.replaceChildren(
      element('strong', { text: description.heading }),
      element('ul', {}, description.lines.map((text) => element('li', { text }))),
      button('Show row in file', () => actions.reveal(row, line)),
    );
  };
  let lastSelected = -2;
  const unsubscribe = hub.subscribe((state) => {
    if (state.selected === lastSelected) return;
    lastSelected = state.selected;
    store.update({ selectedPoint: state.selected >= 0 ? report.sample.rows[state.selected] : null });
    showSelected(state.selected);
  });
  const restored = store.value.selectedPoint;
  hub.select(restored === null ? -1 : (columns.indexOfRow(restored) ?? -1));
  showSelected(hub.current.selected);

  const children: HTMLElement[] = [];
  if (ldCount >= 3) {
    children.push(
      axesChooser(ldCount, validAxes(store.value.discriminantAxes), (axes) => {
        store.update({ discriminantAxes: axes });
        placeDiscriminant(axes);
      }),
    );
  }
  const shown = `Showing ${formatCount(columns.count)} of ${formatCount(report.sample.total)} rows`;
  children.push(
    legendList(classes),
    grid,
    element('p', { className: 'sample-note', text: columns.count < report.sample.total ? `${shown} (a stratified sample within the plot budget of ${formatCount(report.options.plotBudget)}).` : `${shown}.` }),
    detail,
    element('details', { className: 'text-alternative' }, [element('summary', { text: 'The plots as a table' }), element('div', { className: 'table-scroll' }, [centresTable(report, columns, classes)])]),
  );
  return {
    element: section('projections', 'Projections', children),
    dispose: () => {
      unsubscribe();
      for (const view of views) view.dispose();
    },
  };
}
