/**
 * The report's plots as standalone SVG documents: the discriminant scores (LD1 × LD2, or per-class
 * densities along LD1 when there is one discriminant), the principal components of the same rows,
 * and the confusion matrix as a heat grid. Drawn from the report's plot sample, thinned to at most
 * `maxPoints` evenly spaced sample points so a file stays small (the caption says how many).
 */
import type { FitReport } from '../types';
import { formatCount, formatPercent } from './numbers';
import { axes, classColour, escapeXml, legend, marker, px, strokedMarker, svgDocument, sx, sy, type Frame } from './svgParts';

export interface PlotOptions {
  width?: number;
  height?: number;
  /** Most sample points drawn (evenly spaced over the stratified sample). Default 4000. */
  maxPoints?: number;
  /** Multiply each axis by this sign (−1 flips it), e.g. to align a head's axes with its base's. */
  signs?: readonly number[];
  /** Fixed axis ranges, e.g. shared by two plots drawn side by side. */
  xRange?: { low: number; high: number };
  yRange?: { low: number; high: number };
  /** Prefix of the ids inside the SVG, unique per plot when several share one HTML page. Default `plot`. */
  idPrefix?: string;
}

export interface ReportPlot {
  /** File name suffix: `discriminants`, `components`, `confusion`. */
  id: string;
  title: string;
  svg: string;
}

const DEFAULT_MAX_POINTS = 4000;

/** Indices of the sample points drawn: all, or `limit` evenly spaced ones. */
export function thinnedSample(count: number, limit: number): number[] {
  if (count <= limit) return Array.from({ length: count }, (_, i) => i);
  const step = count / limit;
  return Array.from({ length: limit }, (_, j) => Math.floor(j * step));
}

function range(values: readonly number[]): { low: number; high: number } {
  let low = Infinity;
  let high = -Infinity;
  for (const v of values) {
    if (!Number.isFinite(v)) continue;
    if (v < low) low = v;
    if (v > high) high = v;
  }
  if (low === Infinity) return { low: -1, high: 1 };
  if (low === high) return { low: low - 0.5, high: high + 0.5 };
  const pad = (high - low) * 0.05;
  return { low: low - pad, high: high + pad };
}

function shownNote(report: FitReport, drawn: number): string {
  return `${formatCount(drawn)} of ${formatCount(report.sample.total)} rows shown`;
}

function frameFor(width: number, height: number, x: { low: number; high: number }, y: { low: number; high: number }, legendWidth: number): Frame {
  return { width, height, left: 58, right: width - legendWidth - 12, top: 30, bottom: height - 42, xLow: x.low, xHigh: x.high, yLow: y.low, yHigh: y.high };
}

function legendWidth(report: FitReport): number {
  const longest = Math.max(4, ...report.classes.map((c) => Math.min(24, [...c.label].length)));
  return 26 + longest * 6.5;
}

/** A scatter of two score columns with a marker per class, centroids (when given) as large outlined markers. */
function scatter(report: FitReport, title: string, xTitle: string, yTitle: string, xs: number[], ys: number[], centroids: ([number, number] | null)[], options: PlotOptions): string {
  const width = options.width ?? 640;
  const height = options.height ?? 440;
  const lw = legendWidth(report);
  const frame = frameFor(width, height, options.xRange ?? range(xs), options.yRange ?? range(ys), lw);
  const byClass: string[][] = report.classes.map(() => []);
  const radius = xs.length > 2000 ? 1.8 : 2.8;
  xs.forEach((x, i) => {
    const c = report.sample.classIndex[i] ?? -1;
    const y = ys[i]!;
    if (!Number.isFinite(x) || !Number.isFinite(y) || c < 0 || c >= byClass.length) return;
    if (x < frame.xLow || x > frame.xHigh || y < frame.yLow || y > frame.yHigh) return;
    byClass[c]!.push(marker(c, sx(frame, x), sy(frame, y), radius));
  });
  const groups = byClass
    .map((markers, c) => (markers.length === 0 ? '' : `<g fill="${classColour(c)}"${strokedMarker(c) ? ` stroke="${classColour(c)}"` : ''} fill-opacity="0.75">${markers.join('')}</g>`))
    .join('');
  const centres = centroids
    .map((point, c) => (point && Number.isFinite(point[0]) && Number.isFinite(point[1]) ? `<g fill="${classColour(c)}" stroke="#000" stroke-width="1.5">${marker(c, sx(frame, point[0]), sy(frame, point[1]), 7)}</g>` : ''))
    .join('');
  const clipId = `${options.idPrefix ?? 'plot'}-area`;
  const clip = `<clipPath id="${escapeXml(clipId)}"><rect x="${px(frame.left)}" y="${px(frame.top)}" width="${px(frame.right - frame.left)}" height="${px(frame.bottom - frame.top)}"/></clipPath>`;
  const heading = `<text x="${px(frame.left)}" y="18" font-size="13" font-weight="bold">${escapeXml(title)}</text><text x="${px(frame.right)}" y="18" text-anchor="end">${escapeXml(shownNote(report, xs.length))}</text>`;
  return svgDocument(
    width,
    height,
    `${title}: ${xTitle} against ${yTitle}, ${shownNote(report, xs.length)}`,
    `<defs>${clip}</defs>${heading}${axes(frame, xTitle, yTitle)}<g clip-path="url(#${escapeXml(clipId)})">${groups}${centres}</g>${legend(report.classes.map((c) => c.label), frame.right + 12, frame.top + 10)}`,
  );
}

/** Gaussian kernel density of `values` on `grid`, bandwidth by Silverman's rule of thumb (Silverman 1986, eq. 3.31). */
function density(values: number[], grid: number[]): number[] {
  const n = values.length;
  if (n === 0) return grid.map(() => 0);
  const sorted = [...values].sort((a, b) => a - b);
  const mean = sorted.reduce((a, b) => a + b, 0) / n;
  const sd = n > 1 ? Math.sqrt(sorted.reduce((a, b) => a + (b - mean) ** 2, 0) / (n - 1)) : 0;
  const quantile = (q: number): number => {
    const at = (n - 1) * q;
    return sorted[Math.floor(at)]! + (sorted[Math.ceil(at)]! - sorted[Math.floor(at)]!) * (at - Math.floor(at));
  };
  const iqr = quantile(0.75) - quantile(0.25);
  const spread = iqr > 0 ? Math.min(sd, iqr / 1.34) : sd;
  const span = grid[grid.length - 1]! - grid[0]!;
  const h = 0.9 * spread * n ** -0.2 || span / 50 || 1;
  const norm = 1 / (n * h * Math.sqrt(2 * Math.PI));
  return grid.map((g) => {
    let sum = 0;
    for (const v of sorted) sum += Math.exp(-0.5 * ((g - v) / h) ** 2);
    return sum * norm;
  });
}

/** Per-class densities along one score column, with a strip of the points under the curves. */
function densityPlot(report: FitReport, title: string, xTitle: string, xs: number[], options: PlotOptions): string {
  const width = options.width ?? 640;
  const height = options.height ?? 340;
  const lw = legendWidth(report);
  const xRange = options.xRange ?? range(xs);
  const grid = Array.from({ length: 160 }, (_, g) => xRange.low + ((xRange.high - xRange.low) * g) / 159);
  const perClass: number[][] = report.classes.map(() => []);
  xs.forEach((x, i) => {
    const c = report.sample.classIndex[i] ?? -1;
    if (Number.isFinite(x) && c >= 0 && c < perClass.length) perClass[c]!.push(x);
  });
  const curves = perClass.map((values) => density(values, grid));
  const peak = Math.max(1e-300, ...curves.flat());
  const stripHeight = Math.min(14, 60 / Math.max(1, report.classes.length));
  const frame = frameFor(width, height, xRange, { low: 0, high: peak * 1.08 }, lw);
  const curveBottom = frame.bottom - stripHeight * report.classes.length - 6;
  const curveFrame: Frame = { ...frame, bottom: curveBottom };
  const paths = curves
    .map((curve, c) => {
      if (perClass[c]!.length === 0) return '';
      const d = curve.map((y, g) => `${g === 0 ? 'M' : 'L'}${px(sx(curveFrame, grid[g]!))},${px(sy(curveFrame, y))}`).join('');
      return `<path d="${d}" fill="none" stroke="${classColour(c)}" stroke-width="2"/>`;
    })
    .join('');
  const strips = perClass
    .map((values, c) => {
      const y = curveBottom + 6 + stripHeight * (c + 0.5);
      return `<g fill="${classColour(c)}"${strokedMarker(c) ? ` stroke="${classColour(c)}"` : ''} fill-opacity="0.6">${values.map((x) => marker(c, sx(frame, x), y, 2)).join('')}</g>`;
    })
    .join('');
  const heading = `<text x="${px(frame.left)}" y="18" font-size="13" font-weight="bold">${escapeXml(title)}</text><text x="${px(frame.right)}" y="18" text-anchor="end">${escapeXml(shownNote(report, xs.length))}</text>`;
  return svgDocument(width, height, `${title}: class densities along ${xTitle}, ${shownNote(report, xs.length)}`, `${heading}${axes(frame, xTitle, 'density', false)}${paths}${strips}${legend(report.classes.map((c) => c.label), frame.right + 12, frame.top + 10)}`);
}

function axisTitle(prefix: 'LD' | 'PC', j: number, ratio: number | undefined, flipped: boolean): string {
  return `${flipped ? '−' : ''}${prefix}${j + 1} (${ratio === undefined ? '—' : formatPercent(ratio)} of the ${prefix === 'LD' ? 'separation' : 'variance'})`;
}

/** The discriminant scores of the sample: a scatter of LD1 × LD2, or densities along LD1 when k = 1; null when k = 0. */
export function discriminantPlot(report: FitReport, options: PlotOptions = {}): ReportPlot | null {
  const k = Math.min(report.discriminant.eigenvalues.length, report.sample.ld[0]?.length ?? 0);
  if (k === 0) return null;
  const drawn = thinnedSample(report.sample.rows.length, options.maxPoints ?? DEFAULT_MAX_POINTS);
  const sign = (j: number): number => options.signs?.[j] ?? 1;
  const column = (j: number): number[] => drawn.map((i) => (report.sample.ld[i]?.[j] ?? NaN) * sign(j));
  const subset = { ...report, sample: { ...report.sample, classIndex: drawn.map((i) => report.sample.classIndex[i]!) } };
  const ratios = report.discriminant.explainedRatio;
  const title = 'Discriminant scores';
  if (k === 1) return { id: 'discriminants', title, svg: densityPlot(subset, title, axisTitle('LD', 0, ratios[0], sign(0) < 0), column(0), options) };
  const centroids = report.discriminant.centroids.map((c): [number, number] | null => (c.length >= 2 ? [c[0]! * sign(0), c[1]! * sign(1)] : null));
  return {
    id: 'discriminants',
    title,
    svg: scatter(subset, title, axisTitle('LD', 0, ratios[0], sign(0) < 0), axisTitle('LD', 1, ratios[1], sign(1) < 0), column(0), column(1), centroids, options),
  };
}

/** The first two principal components of the same sample rows (one component: its densities). */
export function principalPlot(report: FitReport, options: PlotOptions = {}): ReportPlot | null {
  const p = Math.min(report.sample.pc[0]?.length ?? 0, report.pca.explainedRatio.length);
  if (p === 0) return null;
  const drawn = thinnedSample(report.sample.rows.length, options.maxPoints ?? DEFAULT_MAX_POINTS);
  const sign = (j: number): number => options.signs?.[j] ?? 1;
  const column = (j: number): number[] => drawn.map((i) => (report.sample.pc[i]?.[j] ?? NaN) * sign(j));
  const subset = { ...report, sample: { ...report.sample, classIndex: drawn.map((i) => report.sample.classIndex[i]!) } };
  const ratios = report.pca.explainedRatio;
  const title = 'Principal components of the same rows';
  if (p === 1) return { id: 'components', title, svg: densityPlot(subset, title, axisTitle('PC', 0, ratios[0], sign(0) < 0), column(0), options) };
  return { id: 'components', title, svg: scatter(subset, title, axisTitle('PC', 0, ratios[0], sign(0) < 0), axisTitle('PC', 1, ratios[1], sign(1) < 0), column(0), column(1), [], options) };
}

/** The confusion matrix (cross-validated when available) as a grid shaded by each true class's share. */
export function confusionPlot(report: FitReport): ReportPlot {
  const confusion = report.crossValidatedConfusion ?? report.confusion;
  const kind = report.crossValidatedConfusion ? 'cross-validated' : 'training';
  const n = confusion.labels.length;
  const cell = Math.max(28, Math.min(64, Math.floor(360 / Math.max(1, n))));
  const labelWidth = 20 + 6.5 * Math.max(4, ...confusion.labels.map((l) => Math.min(24, [...l].length)));
  const left = labelWidth + 24;
  const top = 64;
  const width = Math.ceil(left + n * cell + 20);
  const height = Math.ceil(top + n * cell + labelWidth + 20);
  const short = (label: string): string => (label.length > 24 ? `${label.slice(0, 23)}…` : label);
  const parts: string[] = [];
  parts.push(`<text x="10" y="18" font-size="13" font-weight="bold">${escapeXml(`Confusion matrix (${kind})`)}</text>`);
  parts.push(`<text x="10" y="36">rows: true class; columns: predicted; shade: share of the true class</text>`);
  confusion.matrix.forEach((row, i) => {
    const total = row.reduce((a, b) => a + b, 0);
    parts.push(`<text x="${px(left - 6)}" y="${px(top + i * cell + cell / 2 + 4)}" text-anchor="end">${escapeXml(short(confusion.labels[i]!))}</text>`);
    row.forEach((count, j) => {
      const share = total > 0 ? count / total : 0;
      const fill = i === j ? `rgba(0,114,178,${px(0.1 + 0.9 * share)})` : `rgba(213,94,0,${px(share > 0 ? 0.1 + 0.9 * share : 0)})`;
      const x = left + j * cell;
      const y = top + i * cell;
      parts.push(`<rect x="${px(x)}" y="${px(y)}" width="${cell}" height="${cell}" fill="${fill}" stroke="#888"/>`);
      parts.push(`<text x="${px(x + cell / 2)}" y="${px(y + cell / 2 + 4)}" text-anchor="middle" fill="${share > 0.6 ? '#fff' : '#222'}">${escapeXml(formatCount(count))}</text>`);
    });
  });
  confusion.labels.forEach((label, j) => {
    const x = left + j * cell + cell / 2;
    const y = top + n * cell + 8;
    parts.push(`<text transform="translate(${px(x + 4)} ${px(y)}) rotate(90)">${escapeXml(short(label))}</text>`);
  });
  return { id: 'confusion', title: `Confusion matrix (${kind})`, svg: svgDocument(width, height, `Confusion matrix (${kind}) of ${n} classes`, parts.join('')) };
}

/** Every plot of a report, in the order the report shows them. */
export function reportPlots(report: FitReport, options: PlotOptions = {}): ReportPlot[] {
  const prefix = options.idPrefix ?? 'plot';
  return [discriminantPlot(report, { ...options, idPrefix: `${prefix}-ld` }), principalPlot(report, { ...options, idPrefix: `${prefix}-pc` }), confusionPlot(report)].filter(
    (p): p is ReportPlot => p !== null,
  );
}
