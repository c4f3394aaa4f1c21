/**
 * The two fits of a comparison drawn side by side on the same axis scale: the discriminant scores
 * (LD1 × LD2, or densities along LD1 when there is one discriminant) and the principal components,
 * base on the left and head on the right. The two fits' axes are signed alike first (a
 * discriminant's sign is arbitrary, so the head's is flipped where it points against the base's),
 * and each class keeps its colour and marker on both sides, also when it exists on one side only.
 */
import { alignedAxisSigns, sharedRange } from '../../src/core/compare/index';
import type { FitReport } from '../../src/core/types';
import type { FromPanel } from '../../src/shared/messages';
import { element } from '../dom';
import { formatCount, formatFixed, formatPercent } from '../format';
import { HighlightHub } from '../plots/highlight';
import { legendList } from '../plots/legend';
import { PlotView, type PointDescription } from '../plots/plotView';
import { classStyles, densityScene, scatterScene, type ClassStyle, type PlotScene } from '../plots/scene';
import type { StateStore } from '../state';

export interface ComparisonPlotContext {
  store: StateStore;
  post: (message: FromPanel) => void;
  fileStem: string;
}

interface Side {
  key: 'base' | 'head';
  title: string;
  report: FitReport;
  /** Sample class index → index in the union of both sides' classes. */
  classIndex: Int32Array;
  signs: { discriminant: number[]; principal: number[] };
}

/** Columns `j` of rows × m scores, times `sign`. */
function column(rows: readonly (readonly number[])[], j: number, sign: number): Float64Array {
  return Float64Array.from(rows, (row) => (row[j] ?? NaN) * sign);
}

function axisTitle(prefix: 'LD' | 'PC', j: number, ratio: number | undefined): string {
  return `${prefix}${j + 1} (${ratio === undefined ? '—' : formatPercent(ratio)} of ${prefix === 'LD' ? 'separation' : 'variance'})`;
}

function describer(side: Side, union: readonly ClassStyle[]): (index: number) => PointDescription {
  const { sample } = side.report;
  return (index) => ({
    heading: `${side.key === 'base' ? 'Base' : 'Head'} row ${formatCount((sample.rows[index] ?? 0) + 1)}`,
    lines: [
      `class ${union[side.classIndex[index] ?? -1]?.label ?? '?'}`,
      (sample.ld[index] ?? []).map((v, j) => `LD${j + 1} ${formatFixed(v * (side.signs.discriminant[j] ?? 1), 3)}`).join(', '),
    ],
  });
}

/** A pair of scenes (base, head) sharing their view. */
function discriminantPair(sides: readonly [Side, Side], union: ClassStyle[]): [PlotScene, PlotScene] | null {
  const k = Math.min(...sides.map((s) => Math.min(s.report.discriminant.eigenvalues.length, s.report.sample.ld[0]?.length ?? 0)));
  if (k === 0) return null;
  if (k === 1) {
    const values = sides.map((s) => column(s.report.sample.ld, 0, s.signs.discriminant[0] ?? 1));
    const x = sharedRange(...values.map((v) => Array.from(v)));
    return sides.map((s, i) => {
      const scene = densityScene({ id: `compare-${s.key}-ld1`, title: s.title, xTitle: axisTitle('LD', 0, s.report.discriminant.explainedRatio[0]), values: values[i]!, classIndex: s.classIndex, classes: union, strip: true });
      return { ...scene, fullView: { x0: x.low, x1: x.high, y0: 0, y1: 1 } };
    }) as [PlotScene, PlotScene];
  }
  const xs = sides.map((s) => column(s.report.sample.ld, 0, s.signs.discriminant[0] ?? 1));
  const ys = sides.map((s) => column(s.report.sample.ld, 1, s.signs.discriminant[1] ?? 1));
  const x = sharedRange(...xs.map((v) => Array.from(v)));
  const y = sharedRange(...ys.map((v) => Array.from(v)));
  return sides.map((s, i) => {
    const centroids = union.map((style) => {
      const c = s.report.classes.findIndex((cl) => cl.label === style.label);
      const centre = c < 0 ? undefined : s.report.discriminant.centroids[c];
      return centre && centre.length >= 2 ? { x: centre[0]! * (s.signs.discriminant[0] ?? 1), y: centre[1]! * (s.signs.discriminant[1] ?? 1) } : null;
    });
    const ratios = s.report.discriminant.explainedRatio;
    const scene = scatterScene({ id: `compare-${s.key}-ld`, title: s.title, xTitle: axisTitle('LD', 0, ratios[0]), yTitle: axisTitle('LD', 1, ratios[1]), x: xs[i]!, y: ys[i]!, classIndex: s.classIndex, classes: union, centroids });
    return { ...scene, fullView: { x0: x.low, x1: x.high, y0: y.low, y1: y.high } };
  }) as [PlotScene, PlotScene];
}

function principalPair(sides: readonly [Side, Side], union: ClassStyle[]): [PlotScene, PlotScene] | null {
  if (sides.some((s) => (s.report.sample.pc[0]?.length ?? 0) < 2)) return null;
  const xs = sides.map((s) => column(s.report.sample.pc, 0, s.signs.principal[0] ?? 1));
  const ys = sides.map((s) => column(s.report.sample.pc, 1, s.signs.principal[1] ?? 1));
  const x = sharedRange(...xs.map((v) => Array.from(v)));
  const y = sharedRange(...ys.map((v) => Array.from(v)));
  return sides.map((s, i) => {
    const ratios = s.report.pca.explainedRatio;
    const scene = scatterScene({ id: `compare-${s.key}-pc`, title: s.title, xTitle: axisTitle('PC', 0, ratios[0]), yTitle: axisTitle('PC', 1, ratios[1]), x: xs[i]!, y: ys[i]!, classIndex: s.classIndex, classes: union });
    return { ...scene, fullView: { x0: x.low, x1: x.high, y0: y.low, y1: y.high } };
  }) as [PlotScene, PlotScene];
}

function flippedNote(signs: { discriminant: number[]; principal: number[] }): string | null {
  const flipped = [
    ...signs.discriminant.map((s, j) => (s < 0 ? `LD${j + 1}` : '')),
    ...signs.principal.slice(0, 2).map((s, j) => (s < 0 ? `PC${j + 1}` : '')),
  ].filter(Boolean);
  return flipped.length === 0 ? null : `The head's ${flipped.join(', ')} ${flipped.length > 1 ? 'are' : 'is'} drawn with the sign reversed to match the base (the sign of an axis is arbitrary).`;
}

/** Both fits' projections side by side, each pair on one scale. */
export function comparisonProjections(base: FitReport, head: FitReport, baseName: string, context: ComparisonPlotContext): { element: HTMLElement; dispose: () => void } {
  const labels = [...head.classes.map((c) => c.label), ...base.classes.map((c) => c.label).filter((l) => !head.classes.some((c) => c.label === l))];
  const union = classStyles(labels);
  const indexOf = new Map(labels.map((label, i) => [label, i]));
  const remap = (report: FitReport): Int32Array => Int32Array.from(report.sample.classIndex, (c) => indexOf.get(report.classes[c]?.label ?? '') ?? -1);
  const signs = alignedAxisSigns(base, head);
  const sides: [Side, Side] = [
    { key: 'base', title: `Base: ${baseName}`, report: base, classIndex: remap(base), signs: { discriminant: base.discriminant.eigenvalues.map(() => 1), principal: base.pca.explainedRatio.map(() => 1) } },
    { key: 'head', title: 'Head: the file now', report: head, classIndex: remap(head), signs },
  ];
  const views: PlotView[] = [];
  const rows: HTMLElement[] = [];
  const onExport = (kind: 'png' | 'svg', fileName: string, data: string): void => context.post({ type: 'export', kind, fileName: `${context.fileStem}-${fileName}`, data });
  for (const [heading, pair] of [
    ['Discriminant scores, same scale', discriminantPair(sides, union)],
    ['Principal components, same scale', principalPair(sides, union)],
  ] as const) {
    if (!pair) continue;
    const grid = element('div', { className: 'plot-grid comparison-plots' });
    pair.forEach((scene, i) => {
      const side = sides[i]!;
      const summary = `${scene.title}: ${formatCount(side.report.sample.rows.length)} points of ${side.report.classes.length} classes, drawn on the same scale as the ${i === 0 ? 'head' : 'base'} beside it.`;
      const view = new PlotView({ scene, hub: new HighlightHub(), store: context.store, describePoint: describer(side, union), summary, onExport });
      views.push(view);
      grid.appendChild(view.element);
      view.schedule();
    });
    rows.push(element('h4', { className: 'comparison-plots-title', text: heading }), grid);
  }
  const note = flippedNote(signs);
  return {
    element: element('div', { className: 'comparison-projections' }, [legendList(union), ...rows, note ? element('p', { className: 'note', text: note }) : null]),
    dispose: () => {
      for (const view of views) view.dispose();
    },
  };
}
