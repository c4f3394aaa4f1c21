/**
 * What a plot shows, independent of how it is drawn: the canvas renderer, the SVG export and the
 * text alternative all read the same scene, so they cannot disagree.
 */
import type { ViewRange } from '../state';
import { paddedView } from './axes';
import { classSpreads, coverageEllipse, type ClassSpread, type Ellipse } from './ellipse';
import { classDensities, type DensityCurve } from './density';
import { classColour, classShape, type MarkerShape } from '../palette';

export interface ClassStyle {
  label: string;
  colour: string;
  shape: MarkerShape;
}

export function classStyles(labels: readonly string[]): ClassStyle[] {
  return labels.map((label, i) => ({ label, colour: classColour(i), shape: classShape(i) }));
}

/** Sample indices of each class, so drawing can batch by class. */
function membersByClass(classIndex: Int32Array, classCount: number): Int32Array[] {
  const counts = new Int32Array(classCount);
  for (let i = 0; i < classIndex.length; i++) if (classIndex[i] >= 0 && classIndex[i] < classCount) counts[classIndex[i]]++;
  const members = Array.from(counts, (count) => new Int32Array(count));
  const filled = new Int32Array(classCount);
  for (let i = 0; i < classIndex.length; i++) {
    const c = classIndex[i];
    if (c >= 0 && c < classCount) members[c][filled[c]++] = i;
  }
  return members;
}

export interface ScatterScene {
  kind: 'scatter';
  /** Stable id: names the export files and keys the stored zoom. */
  id: string;
  title: string;
  xTitle: string;
  yTitle: string;
  x: Float64Array;
  y: Float64Array;
  classIndex: Int32Array;
  classes: ClassStyle[];
  members: Int32Array[];
  /** Per class, the coordinates of its members in member order: drawing reads them sequentially. */
  classX: Float32Array[];
  classY: Float32Array[];
  /** Per class: a marked centre (the class centroid), or null when the class has no points here. */
  centroids: ({ x: number; y: number } | null)[];
  /** What the centroids are, for the legend and the text alternative. */
  centroidNote: string;
  spreads: ClassSpread[];
  ellipses: (Ellipse | null)[];
  fullView: ViewRange;
}

export function scatterScene(options: {
  id: string;
  title: string;
  xTitle: string;
  yTitle: string;
  x: Float64Array;
  y: Float64Array;
  classIndex: Int32Array;
  classes: ClassStyle[];
  /** Centroids over all rows when known (the discriminant's); else the means of the plotted points. */
  centroids?: ({ x: number; y: number } | null)[];
}): ScatterScene {
  const { x, y, classIndex, classes } = options;
  const spreads = classSpreads(x, y, classIndex, classes.length);
  const ellipses = spreads.map((spread) => coverageEllipse(spread));
  const centroids = options.centroids ?? spreads.map((s) => (s.count > 0 ? { x: s.meanX, y: s.meanY } : null));
  let xLow = Infinity;
  let xHigh = -Infinity;
  let yLow = Infinity;
  let yHigh = -Infinity;
  for (let i = 0; i < x.length; i++) {
    if (!Number.isFinite(x[i]) || !Number.isFinite(y[i])) continue;
    if (x[i] < xLow) xLow = x[i];
    if (x[i] > xHigh) xHigh = x[i];
    if (y[i] < yLow) yLow = y[i];
    if (y[i] > yHigh) yHigh = y[i];
  }
  const members = membersByClass(classIndex, classes.length);
  return {
    kind: 'scatter',
    id: options.id,
    title: options.title,
    xTitle: options.xTitle,
    yTitle: options.yTitle,
    x,
    y,
    classIndex,
    classes,
    members,
    classX: members.map((list) => Float32Array.from(list, (i) => x[i])),
    classY: members.map((list) => Float32Array.from(list, (i) => y[i])),
    centroids,
    centroidNote: options.centroids ? 'class centroids over all rows used' : 'class means of the plotted rows',
    spreads,
    ellipses,
    fullView: paddedView(xLow, xHigh, yLow, yHigh),
  };
}

export interface DensityScene {
  kind: 'density';
  id: string;
  title: string;
  xTitle: string;
  values: Float64Array;
  classIndex: Int32Array;
  classes: ClassStyle[];
  members: Int32Array[];
  curves: DensityCurve[];
  /** Whether the points are drawn as a strip per class under the curves. */
  strip: boolean;
  /** The largest density value, for the y scale. */
  peak: number;
  /** x range in x0/x1; y0/y1 are unused (the density axis always shows 0 to the peak). */
  fullView: ViewRange;
}

export function densityScene(options: {
  id: string;
  title: string;
  xTitle: string;
  values: Float64Array;
  classIndex: Int32Array;
  classes: ClassStyle[];
  strip: boolean;
}): DensityScene {
  const { values, classIndex, classes } = options;
  const curves = classDensities(values, classIndex, classes.length);
  let peak = 0;
  let low = Infinity;
  let high = -Infinity;
  for (const curve of curves) {
    for (let g = 0; g < curve.y.length; g++) peak = Math.max(peak, curve.y[g]);
    if (curve.x.length > 0) {
      low = Math.min(low, curve.x[0]);
      high = Math.max(high, curve.x[curve.x.length - 1]);
    }
  }
  const view = paddedView(low, high, 0, 1);
  return {
    kind: 'density',
    id: options.id,
    title: options.title,
    xTitle: options.xTitle,
    values,
    classIndex,
    classes,
    members: membersByClass(classIndex, classes.length),
    curves,
    strip: options.strip,
    peak: peak > 0 ? peak : 1,
    fullView: { x0: view.x0, x1: view.x1, y0: 0, y1: 1 },
  };
}

export type PlotScene = ScatterScene | DensityScene;

/** Marker radius and opacity by number of points: large, opaque markers for few points, small translucent ones for many. */
export function markerStyle(points: number): { radius: number; alpha: number } {
  if (points <= 2_000) return { radius: 3.2, alpha: 1 };
  if (points <= 20_000) return { radius: 2.4, alpha: 0.8 };
  if (points <= 100_000) return { radius: 1.8, alpha: 0.6 };
  return { radius: 1.2, alpha: 0.45 };
}
