/**
 * Draws a scatter scene on a canvas: grid and axes, each class's 95% ellipse, the points batched by
 * class (one path per chunk of points, no object per point; chunks of the classes alternate so no
 * class is always painted last), then the centroids. The overlay (hover, selection, marked rows) is
 * a second canvas on top, so moving the pointer never repaints the points.
 */
import type { HighlightState } from './highlight';
import type { Projection } from './axes';
import { drawAxes } from './drawAxes';
import { ellipseOutline } from './ellipse';
import { markerStyle, type ScatterScene } from './scene';
import type { PlotTheme } from './theme';
import { traceMarker } from './markers';

const CHUNK = 4096;

export function drawScatter(context: CanvasRenderingContext2D, scene: ScatterScene, projection: Projection, theme: PlotTheme, pixelRatio: number): void {
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

  drawPoints(context, scene, projection, pixelRatio);

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

function drawPoints(context: CanvasRenderingContext2D, scene: ScatterScene, projection: Projection, pixelRatio: number): void {
  const { radius, alpha } = markerStyle(scene.x.length);
  // Below about 2.5 device pixels a shape cannot be told apart; squares are then drawn (much faster).
  const tiny = radius * pixelRatio < 2.5;
  const { view } = projection;
  const marginX = radius / projection.scaleX;
  const marginY = radius / projection.scaleY;
  const x0 = view.x0 - marginX;
  const x1 = view.x1 + marginX;
  const y0 = view.y0 - marginY;
  const y1 = view.y1 + marginY;
  context.globalAlpha = alpha;
  const longest = Math.max(0, ...scene.members.map((m) => m.length));
  for (let start = 0; start < longest; start += CHUNK) {
    for (let c = 0; c < scene.members.length; c++) {
      const members = scene.members[c];
      if (start >= members.length) continue;
      const shape = scene.classes[c].shape;
      context.fillStyle = scene.classes[c].colour;
      context.beginPath();
      const end = Math.min(members.length, start + CHUNK);
      for (let k = start; k < end; k++) {
        const i = members[k];
        const x = scene.x[i];
        const y = scene.y[i];
        if (!(x >= x0 && x <= x1 && y >= y0 && y <= y1)) continue;
        const px = projection.x(x);
        const py = projection.y(y);
        if (tiny) context.rect(px - radius, py - radius, 2 * radius, 2 * radius);
        else traceMarker(context, shape, px, py, radius);
      }
      context.fill();
    }
  }
  context.globalAlpha = 1;
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
