/** The class legend: on the page as HTML (swatch + label text), and on an exported canvas. */
import { element, svgElement } from '../dom';
import { formatCount } from '../format';
import { markerPathData } from '../palette';
import { traceMarker } from './markers';
import type { ClassStyle } from './scene';
import type { PlotTheme } from './theme';
import { font } from './drawAxes';

/** A small SVG of the class's marker in its colour. */
export function markerSwatch(style: ClassStyle, size = 14): SVGSVGElement {
  return svgElement('svg', { width: size, height: size, viewBox: `0 0 ${size} ${size}`, 'aria-hidden': 'true', class: 'marker-swatch' }, [
    svgElement('path', { d: markerPathData(style.shape, size / 2, size / 2, size * 0.32), fill: style.colour }),
  ]);
}

export function legendList(classes: readonly ClassStyle[], counts?: readonly number[]): HTMLElement {
  return element(
    'ul',
    { className: 'legend', attributes: { 'aria-label': 'Classes' } },
    classes.map((style, c) =>
      element('li', { className: 'legend-item' }, [
        markerSwatch(style),
        element('span', { className: 'legend-label', text: style.label }),
        counts ? element('span', { className: 'legend-count', text: ` (${formatCount(counts[c])})` }) : null,
      ]),
    ),
  );
}

/** Lays the legend out in rows across `width`; returns the height used (draws only when `draw`). */
export function drawLegend(context: CanvasRenderingContext2D, classes: readonly ClassStyle[], left: number, top: number, width: number, theme: PlotTheme, draw = true): number {
  context.save();
  context.font = font(theme, 0.9);
  context.textBaseline = 'middle';
  context.textAlign = 'left';
  const rowHeight = theme.fontSize * 1.6;
  let x = left;
  let y = top + rowHeight / 2;
  for (const style of classes) {
    const itemWidth = 18 + context.measureText(style.label).width + 16;
    if (x > left && x + itemWidth > left + width) {
      x = left;
      y += rowHeight;
    }
    if (draw) {
      context.beginPath();
      traceMarker(context, style.shape, x + 6, y, 5);
      context.fillStyle = style.colour;
      context.fill();
      context.fillStyle = theme.foreground;
      context.fillText(style.label, x + 16, y);
    }
    x += itemWidth;
  }
  context.restore();
  return y + rowHeight / 2 - top;
}
