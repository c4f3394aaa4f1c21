/**
 * Draws a scatter scene on a canvas: grid and axes, each class's 95% ellipse, the points blended
 * into the pixels by class (pointRaster.ts; chunks of the classes alternate so no class is always
 * painted last), then the centroids. The overlay (hover, selection, marked rows) is
 * a second canvas on top, so moving the pointer never repaints the points.
 */
import type { HighlightState } from './highlight';
import type { Projection } from './axes';
import { drawAxes } from './drawAxes';
import { ellipseOutline } from './ellipse';
import { markerStyle, type ScatterScene } from './scene';
import type { PlotTheme } from './theme';
import { traceMarker } from './markers';
import { blendPoints, coverageMask, hexColour, type PointLayer } from './pointRaster';

const CHUNK = 4096;

/** Device-pixel positions of the points of the frame being drawn (see drawPoints). */
let positionBuffer = new Float32Array(0);

/** `pointLimit`: draw at most about this many points, an even subsample of each class (while the view moves). */
export function drawScatter(context: CanvasRenderingContext2D, scene: ScatterScene, projection: Projection, theme: PlotTheme, pointLimit = Infinity): void {
  const { area } = projection;
  context.fillStyle = theme.background;
  context.fillRect(0, 0, area.width, area.height);
  drawAxes(context, projection, theme, { xTitle: scene.xTitle, yTitle: scene.yTitle });

  context.save();
  context.beginPath();
  context.rect(area.left + 1, area.top + 1, area.right - area.left - 2, area.bottom - area.top - 2);
  context.clip();

  context.lineWidth = 1.5;
  context.setLineDash([5, 3]);
  scene.ellipses.forEach((ellipse, c) => {
    if (!ellipse) return;
    context.strokeStyle = scene.classes[c].colour;
    context.beginPath();
    ellipseOutline(ellipse).forEach((point, i) => {
      if (i === 0) context.moveTo(projection.x(point.x), projection.y(point.y));
      else context.lineTo(projection.x(point.x), projection.y(point.y));
    });
    context.stroke();
  });
  context.setLineDash([]);

  drawPoints(context, scene, projection, pointLimit);

  for (let c = 0; c < scene.classes.length; c++) {
    const centroid = scene.centroids[c];
    if (!centroid) continue;
    context.beginPath();
    traceMarker(context, scene.classes[c].shape, projection.x(centroid.x), projection.y(centroid.y), 7);
    context.fillStyle = scene.classes[c].colour;
    context.fill();
    context.lineWidth = 2;
    context.strokeStyle = theme.foreground;
    context.stroke();
  }
  context.restore();
}

function drawPoints(context: CanvasRenderingContext2D, scene: ScatterScene, projection: Projection, pointLimit: number): void {
  const { radius, alpha } = markerStyle(scene.x.length);
  const step = Math.max(1, Math.ceil(scene.x.length / pointLimit));
  // Pixels are written in device units: map the plot's CSS pixels through the canvas transform.
  const transform = context.getTransform();
  const scale = transform.a;
  const { area, view } = projection;
  const marginX = radius / projection.scaleX;
  const marginY = radius / projection.scaleY;
  const x0 = view.x0 - marginX;
  const x1 = view.x1 + marginX;
  const y0 = view.y0 - marginY;
  const y1 = view.y1 + marginY;
  // Data → device pixels as one multiply-add per coordinate.
  const kx = transform.a * projection.scaleX;
  const bx = transform.a * (area.left - view.x0 * projection.scaleX) + transform.e;
  const ky = -transform.d * projection.scaleY;
  const by = transform.d * (area.bottom + view.y0 * projection.scaleY) + transform.f;
  const layers: PointLayer[] = [];
  const longest = Math.max(0, ...scene.members.map((m) => m.length));
  // One buffer for the positions of every layer, kept from frame to frame: a new array per chunk
  // and frame was megabytes of garbage per frame at a million points (collector pauses).
  let needed = 0;
  for (const members of scene.members) needed += 2 * (Math.ceil(members.length / step) + Math.ceil(members.length / CHUNK));
  if (positionBuffer.length < needed) positionBuffer = new Float32Array(needed);
  let used = 0;
  for (let start = 0; start < longest; start += CHUNK) {
    for (let c = 0; c < scene.members.length; c++) {
      const members = scene.members[c];
      if (start >= members.length) continue;
      const end = Math.min(members.length, start + CHUNK);
      const positions = positionBuffer.subarray(used, used + 2 * Math.ceil((end - start) / step));
      let count = 0;
      const classX = scene.classX[c];
      const classY = scene.classY[c];
      for (let k = start; k < end; k += step) {
        const x = classX[k];
        const y = classY[k];
        if (!(x >= x0 && x <= x1 && y >= y0 && y <= y1)) continue;
        positions[2 * count] = kx * x + bx;
        positions[2 * count + 1] = ky * y + by;
        count++;
      }
      used += 2 * count;
      const style = scene.classes[c];
      layers.push({ colour: hexColour(style.colour), mask: coverageMask(style.shape, radius * scale), positions, count });
    }
  }
  const rect = { left: transform.a * (area.left + 1) + transform.e, top: transform.d * (area.top + 1) + transform.f, width: scale * (area.right - area.left - 2), height: scale * (area.bottom - area.top - 2) };
  blendPoints(context, rect, layers, alpha);
}

/** Rings around the marked, selected and hovered points. */
export function drawHighlights(
  context: CanvasRenderingContext2D,
  position: (index: number) => { x: number; y: number } | null,
  highlight: HighlightState,
  theme: PlotTheme,
): void {
  context.clearRect(0, 0, context.canvas.width, context.canvas.height);
  context.lineWidth = 1.5;
  context.strokeStyle = theme.foreground;
  context.beginPath();
  for (const index of highlight.marked) {
    const point = position(index);
    if (!point) continue;
    context.moveTo(point.x + 6, point.y);
    context.arc(point.x, point.y, 6, 0, 2 * Math.PI);
  }
  context.stroke();
  for (const [index, radius, width] of [[highlight.selected, 9, 3], [highlight.hovered, 7, 2]] as const) {
    if (index < 0) continue;
    const point = position(index);
    if (!point) continue;
    context.lineWidth = width + 2;
    context.strokeStyle = theme.background;
    context.beginPath();
    context.arc(point.x, point.y, radius, 0, 2 * Math.PI);
    context.stroke();
    context.lineWidth = width;
    context.strokeStyle = theme.focus;
    context.stroke();
  }
}
