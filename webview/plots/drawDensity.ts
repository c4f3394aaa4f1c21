/**
 * Draws a density scene: each class's density curve (line plus a light fill) in the upper part and,
 * when the scene asks for it, the points themselves as one strip per class underneath, with a
 * small deterministic vertical jitter so coincident values stay visible.
 */
import { Projection, type PlotArea } from './axes';
import { drawAxes } from './drawAxes';
import { markerStyle, type DensityScene } from './scene';
import type { PlotTheme } from './theme';
import type { ViewRange } from '../state';
import { blendPoints, coverageMask, hexColour, type PointLayer } from './pointRaster';

export interface DensityLayout {
  /** Maps x and density values to pixels in the curve area. */
  curves: Projection;
  stripTop: number;
  rowHeight: number;
}

export function densityLayout(scene: DensityScene, view: ViewRange, area: PlotArea): DensityLayout {
  const rows = scene.strip ? scene.classes.length : 0;
  const rowHeight = rows > 0 ? Math.max(8, Math.min(22, ((area.bottom - area.top) * 0.45) / rows)) : 0;
  const stripHeight = rowHeight * rows;
  const curveArea: PlotArea = { ...area, bottom: area.bottom - stripHeight - (rows > 0 ? 6 : 0) };
  const curves = new Projection({ x0: view.x0, x1: view.x1, y0: 0, y1: scene.peak * 1.08 }, curveArea);
  return { curves, stripTop: curveArea.bottom + 6, rowHeight };
}

/** A fixed pseudo-random offset in [−1, 1] per point (an integer hash of its index). */
export function jitter(index: number): number {
  let h = Math.imul(index ^ 0x9e3779b9, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return ((h >>> 0) / 0xffffffff) * 2 - 1;
}

/** Pixel position of a sample point in the strip. */
export function stripPosition(scene: DensityScene, layout: DensityLayout, index: number): { x: number; y: number } | null {
  const value = scene.values[index];
  const c = scene.classIndex[index];
  if (!Number.isFinite(value) || c < 0 || !scene.strip) return null;
  return { x: layout.curves.x(value), y: layout.stripTop + layout.rowHeight * (c + 0.5) + jitter(index) * layout.rowHeight * 0.3 };
}

export function drawDensity(context: CanvasRenderingContext2D, scene: DensityScene, view: ViewRange, area: PlotArea, theme: PlotTheme): DensityLayout {
  const layout = densityLayout(scene, view, area);
  const { curves } = layout;
  context.fillStyle = theme.background;
  context.fillRect(0, 0, area.width, area.height);
  // The full-height frame and x grid; y ticks only beside the curves.
  const frame = new Projection({ x0: view.x0, x1: view.x1, y0: 0, y1: 1 }, area);
  drawAxes(context, frame, theme, { xTitle: scene.xTitle, yTitle: '', showYTicks: false });
  drawAxes(context, curves, theme, { xTitle: '', yTitle: 'density', yTop: curves.area.top, yBottom: curves.area.bottom, showXTicks: false });

  context.save();
  context.beginPath();
  context.rect(area.left + 1, area.top + 1, area.right - area.left - 2, area.bottom - area.top - 2);
  context.clip();
  scene.curves.forEach((curve, c) => {
    if (curve.count === 0) return;
    context.beginPath();
    for (let g = 0; g < curve.x.length; g++) {
      const px = curves.x(curve.x[g]);
      const py = curves.y(curve.y[g]);
      if (g === 0) context.moveTo(px, py);
      else context.lineTo(px, py);
    }
    context.strokeStyle = scene.classes[c].colour;
    context.lineWidth = 2;
    context.setLineDash(c % 2 === 1 ? [6, 3] : []);
    context.stroke();
    context.setLineDash([]);
    context.lineTo(curves.x(curve.x[curve.x.length - 1]), curves.y(0));
    context.lineTo(curves.x(curve.x[0]), curves.y(0));
    context.closePath();
    context.globalAlpha = 0.15;
    context.fillStyle = scene.classes[c].colour;
    context.fill();
    context.globalAlpha = 1;
  });

  context.restore();
  if (scene.strip) drawStrip(context, scene, layout, area);
  return layout;
}

/** The points as one strip per class under the curves, blended into the pixels like the scatter's. */
function drawStrip(context: CanvasRenderingContext2D, scene: DensityScene, layout: DensityLayout, area: PlotArea): void {
  const transform = context.getTransform();
  const { radius, alpha } = markerStyle(scene.values.length);
  const markerRadius = Math.min(radius, layout.rowHeight * 0.3);
  const layers: PointLayer[] = scene.members.map((members, c) => {
    const positions = new Float32Array(2 * members.length);
    let count = 0;
    for (let k = 0; k < members.length; k++) {
      const point = stripPosition(scene, layout, members[k]);
      if (!point || point.x < area.left - markerRadius || point.x > area.right + markerRadius) continue;
      positions[2 * count] = transform.a * point.x + transform.e;
      positions[2 * count + 1] = transform.d * point.y + transform.f;
      count++;
    }
    return { colour: hexColour(scene.classes[c].colour), mask: coverageMask(scene.classes[c].shape, markerRadius * transform.a), positions, count };
  });
  const top = layout.stripTop - layout.rowHeight * 0.1;
  const rect = { left: transform.a * (area.left + 1) + transform.e, top: transform.d * top + transform.f, width: transform.a * (area.right - area.left - 2), height: transform.d * (area.bottom - 1 - top) };
  blendPoints(context, rect, layers, alpha);
}
