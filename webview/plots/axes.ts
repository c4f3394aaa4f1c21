/**
 * Axis ticks at "nice" values (1, 2 or 5 times a power of ten), after Heckbert, "Nice numbers for
 * graph labels", Graphics Gems (1990), and the mapping between data values and plot pixels.
 */
import type { ViewRange } from '../state';

export interface Ticks {
  values: number[];
  /** Decimals needed to print the values distinctly. */
  decimals: number;
}

function niceStep(roughStep: number): number {
  const exponent = Math.floor(Math.log10(roughStep));
  const fraction = roughStep / 10 ** exponent;
  const nice = fraction < 1.5 ? 1 : fraction < 3 ? 2 : fraction < 7 ? 5 : 10;
  return nice * 10 ** exponent;
}

/** About `count` ticks covering [low, high]. */
export function niceTicks(low: number, high: number, count: number): Ticks {
  if (!(high > low) || !Number.isFinite(low) || !Number.isFinite(high)) return { values: [], decimals: 0 };
  const step = niceStep((high - low) / Math.max(1, count));
  const first = Math.ceil(low / step) * step;
  const values: number[] = [];
  for (let value = first; value <= high + step * 1e-9; value += step) values.push(Math.abs(value) < step * 1e-9 ? 0 : value);
  return { values, decimals: Math.max(0, -Math.floor(Math.log10(step) + 1e-9)) };
}

export function tickLabel(value: number, decimals: number): string {
  return value.toFixed(decimals).replace(/^-/, '−');
}

/** Where the plot area sits inside the canvas, in CSS pixels. */
export interface PlotArea {
  width: number;
  height: number;
  left: number;
  top: number;
  right: number;
  bottom: number;
}

export function plotArea(width: number, height: number, fontSize: number): PlotArea {
  const left = Math.round(fontSize * 4.2);
  const bottom = Math.round(fontSize * 3.4);
  return { width, height, left, top: 10, right: width - 12, bottom: height - bottom };
}

/** Maps data values to CSS pixels for a view and a plot area. */
export class Projection {
  readonly scaleX: number;
  readonly scaleY: number;

  constructor(readonly view: ViewRange, readonly area: PlotArea) {
    this.scaleX = (area.right - area.left) / (view.x1 - view.x0);
    this.scaleY = (area.bottom - area.top) / (view.y1 - view.y0);
  }

  x(value: number): number {
    return this.area.left + (value - this.view.x0) * this.scaleX;
  }

  y(value: number): number {
    return this.area.bottom - (value - this.view.y0) * this.scaleY;
  }

  dataX(pixel: number): number {
    return this.view.x0 + (pixel - this.area.left) / this.scaleX;
  }

  dataY(pixel: number): number {
    return this.view.y0 + (this.area.bottom - pixel) / this.scaleY;
  }

  inside(pixelX: number, pixelY: number): boolean {
    const { left, right, top, bottom } = this.area;
    return pixelX >= left && pixelX <= right && pixelY >= top && pixelY <= bottom;
  }
}

/** The view that shows [low, high] on both axes with a margin of 5% on every side. */
export function paddedView(xLow: number, xHigh: number, yLow: number, yHigh: number): ViewRange {
  const [x0, x1] = padded(xLow, xHigh);
  const [y0, y1] = padded(yLow, yHigh);
  return { x0, x1, y0, y1 };
}

function padded(low: number, high: number): [number, number] {
  if (!Number.isFinite(low) || !Number.isFinite(high)) return [-1, 1];
  if (high - low <= Math.max(Math.abs(low), Math.abs(high)) * 1e-12) return [low - 1, high + 1];
  const margin = (high - low) * 0.05;
  return [low - margin, high + margin];
}

/** Zooms a view by `factor` (< 1 zooms in) around a data point. */
export function zoomView(view: ViewRange, factor: number, centreX: number, centreY: number, xOnly = false): ViewRange {
  return {
    x0: centreX + (view.x0 - centreX) * factor,
    x1: centreX + (view.x1 - centreX) * factor,
    y0: xOnly ? view.y0 : centreY + (view.y0 - centreY) * factor,
    y1: xOnly ? view.y1 : centreY + (view.y1 - centreY) * factor,
  };
}

/** Shifts a view by a distance in data units. */
export function panView(view: ViewRange, dx: number, dy: number): ViewRange {
  return { x0: view.x0 + dx, x1: view.x1 + dx, y0: view.y0 + dy, y1: view.y1 + dy };
}
