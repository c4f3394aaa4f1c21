/** Frame, grid, ticks and axis titles on a canvas, shared by the scatter and density plots. */
import { niceTicks, tickLabel, type Projection } from './axes';
import type { PlotTheme } from './theme';

export function font(theme: PlotTheme, scale = 1): string {
  return `${Math.round(theme.fontSize * scale)}px ${theme.fontFamily}`;
}

export interface AxesOptions {
  xTitle: string;
  yTitle: string;
  /** Vertical extent of the y ticks (the density plot keeps them to the curve area). */
  yTop?: number;
  yBottom?: number;
  showYTicks?: boolean;
  /** The density plot draws its curve area's axes a second time, without the x ticks and frame. */
  showXTicks?: boolean;
}

export function drawAxes(context: CanvasRenderingContext2D, projection: Projection, theme: PlotTheme, options: AxesOptions): void {
  const { area, view } = projection;
  const yTop = options.yTop ?? area.top;
  const yBottom = options.yBottom ?? area.bottom;
  context.save();
  context.lineWidth = 1;
  context.font = font(theme, 0.85);
  context.fillStyle = theme.muted;
  context.strokeStyle = theme.grid;

  const xTicks = niceTicks(view.x0, view.x1, Math.max(2, Math.floor((area.right - area.left) / 80)));
  context.textAlign = 'center';
  context.textBaseline = 'top';
  context.beginPath();
  for (const value of xTicks.values) {
    const px = Math.round(projection.x(value)) + 0.5;
    context.moveTo(px, area.top);
    context.lineTo(px, area.bottom);
  }
  context.stroke();
  if (options.showXTicks !== false) {
    for (const value of xTicks.values) context.fillText(tickLabel(value, xTicks.decimals), projection.x(value), area.bottom + 4);
  }

  if (options.showYTicks !== false) {
    const yTicks = niceTicks(view.y0, view.y1, Math.max(2, Math.floor((yBottom - yTop) / 50)));
    context.textAlign = 'right';
    context.textBaseline = 'middle';
    context.beginPath();
    for (const value of yTicks.values) {
      const py = Math.round(projection.y(value)) + 0.5;
      if (py < yTop - 1 || py > yBottom + 1) continue;
      context.moveTo(area.left, py);
      context.lineTo(area.right, py);
    }
    context.stroke();
    for (const value of yTicks.values) {
      const py = projection.y(value);
      if (py < yTop - 1 || py > yBottom + 1) continue;
      context.fillText(tickLabel(value, yTicks.decimals), area.left - 5, py);
    }
  }

  context.strokeStyle = theme.muted;
  if (options.showXTicks !== false) context.strokeRect(area.left + 0.5, area.top + 0.5, area.right - area.left - 1, area.bottom - area.top - 1);
  else {
    context.beginPath();
    context.moveTo(area.left, Math.round(area.bottom) + 0.5);
    context.lineTo(area.right, Math.round(area.bottom) + 0.5);
    context.stroke();
  }

  context.fillStyle = theme.foreground;
  context.font = font(theme, 0.95);
  context.textAlign = 'center';
  context.textBaseline = 'bottom';
  context.fillText(options.xTitle, (area.left + area.right) / 2, area.height - 4);
  context.translate(theme.fontSize * 0.2 + 2, (yTop + yBottom) / 2);
  context.rotate(-Math.PI / 2);
  context.textBaseline = 'top';
  context.fillText(options.yTitle, 0, 0);
  context.restore();
}
