/**
 * SVG documents of the plots, built as text from the same scene and view the canvas shows: points
 * as one path per class (each marker a sub-path in the class's shape), ellipses, centroids, density
 * curves, axes and a legend. Every data string is escaped for XML.
 */
import { niceTicks, plotArea, Projection, tickLabel } from './axes';
import { densityLayout, stripPosition } from './drawDensity';
import { ellipseOutline } from './ellipse';
import { markerStyle, type ClassStyle, type DensityScene, type PlotScene, type ScatterScene } from './scene';
import type { PlotTheme } from './theme';
import type { ViewRange } from '../state';
import { markerPathData } from '../palette';
import { escapeXml } from './xml';


const r2 = (value: number): string => (Math.round(value * 100) / 100).toString();

class SvgWriter {
  readonly parts: string[] = [];

  add(text: string): void {
    this.parts.push(text);
  }

  text(x: number, y: number, content: string, attributes: string): void {
    this.parts.push(`<text x="${r2(x)}" y="${r2(y)}" ${attributes}>${escapeXml(content)}</text>`);
  }
}

function axes(svg: SvgWriter, projection: Projection, theme: PlotTheme, xTitle: string, yTitle: string, yTicks: boolean, yTop = projection.area.top, yBottom = projection.area.bottom, xTicks = true): void {
  const { area, view } = projection;
  const small = Math.round(theme.fontSize * 0.85);
  const xTickSet = xTicks ? niceTicks(view.x0, view.x1, Math.max(2, Math.floor((area.right - area.left) / 80))) : { values: [], decimals: 0 };
  let grid = '';
  for (const value of xTickSet.values) grid += `M${r2(projection.x(value))} ${area.top}V${area.bottom}`;
  const yTickSet = yTicks ? niceTicks(view.y0, view.y1, Math.max(2, Math.floor((yBottom - yTop) / 50))) : { values: [], decimals: 0 };
  const yValues = yTickSet.values.filter((v) => projection.y(v) >= yTop - 1 && projection.y(v) <= yBottom + 1);
  for (const value of yValues) grid += `M${area.left} ${r2(projection.y(value))}H${area.right}`;
  svg.add(`<path d="${grid}" stroke="${escapeXml(theme.grid)}" stroke-width="1" fill="none"/>`);
  svg.add(`<g font-size="${small}" fill="${escapeXml(theme.muted)}">`);
  for (const value of xTickSet.values) svg.text(projection.x(value), area.bottom + 4 + small, tickLabel(value, xTickSet.decimals), 'text-anchor="middle"');
  for (const value of yValues) svg.text(area.left - 5, projection.y(value) + small * 0.35, tickLabel(value, yTickSet.decimals), 'text-anchor="end"');
  svg.add('</g>');
  if (xTicks) svg.add(`<rect x="${area.left + 0.5}" y="${area.top + 0.5}" width="${area.right - area.left - 1}" height="${area.bottom - area.top - 1}" fill="none" stroke="${escapeXml(theme.muted)}"/>`);
  else svg.add(`<path d="M${area.left} ${r2(area.bottom)}H${area.right}" stroke="${escapeXml(theme.muted)}"/>`);
  if (xTitle) svg.text((area.left + area.right) / 2, area.height - 6, xTitle, `text-anchor="middle" fill="${escapeXml(theme.foreground)}"`);
  if (yTitle) {
    const y = (yTop + yBottom) / 2;
    const x = theme.fontSize + 2;
    svg.text(x, y, yTitle, `text-anchor="middle" transform="rotate(-90 ${r2(x)} ${r2(y)})" fill="${escapeXml(theme.foreground)}"`);
  }
}

function legend(svg: SvgWriter, classes: readonly ClassStyle[], top: number, width: number, theme: PlotTheme): number {
  // Without text metrics, items get a width from their label length (about 0.6 em per character).
  const rowHeight = theme.fontSize * 1.6;
  let x = 12;
  let y = top + rowHeight / 2;
  svg.add(`<g font-size="${Math.round(theme.fontSize * 0.9)}" fill="${escapeXml(theme.foreground)}">`);
  for (const style of classes) {
    const itemWidth = 34 + style.label.length * theme.fontSize * 0.6;
    if (x > 12 && x + itemWidth > width - 12) {
      x = 12;
      y += rowHeight;
    }
    svg.add(`<path d="${markerPathData(style.shape, x + 6, y, 5)}" fill="${style.colour}"/>`);
    svg.text(x + 16, y + theme.fontSize * 0.32, style.label, '');
    x += itemWidth;
  }
  svg.add('</g>');
  return y + rowHeight / 2 - top;
}

function svgDocument(scene: PlotScene, width: number, plotHeight: number, theme: PlotTheme, body: (svg: SvgWriter, top: number) => void): string {
  const titleHeight = theme.fontSize * 2;
  const probe = new SvgWriter();
  const legendHeight = legend(probe, scene.classes, 0, width, theme);
  const height = Math.ceil(titleHeight + plotHeight + legendHeight + 8);
  const svg = new SvgWriter();
  svg.add(`<?xml version="1.0" encoding="UTF-8"?>\n`);
  svg.add(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="${escapeXml(theme.fontFamily)}" font-size="${theme.fontSize}">`);
  svg.add(`<title>${escapeXml(scene.title)}</title>`);
  svg.add(`<rect width="100%" height="100%" fill="${escapeXml(theme.background)}"/>`);
  svg.text(12, titleHeight * 0.7, scene.title, `font-weight="bold" fill="${escapeXml(theme.foreground)}"`);
  svg.add(`<g transform="translate(0 ${r2(titleHeight)})">`);
  body(svg, titleHeight);
  svg.add('</g>');
  legend(svg, scene.classes, titleHeight + plotHeight + 4, width, theme);
  svg.add('</svg>\n');
  return svg.parts.join('');
}

function clip(svg: SvgWriter, projection: Projection, id: string): string {
  const { area } = projection;
  svg.add(`<defs><clipPath id="${id}"><rect x="${area.left}" y="${area.top}" width="${area.right - area.left}" height="${area.bottom - area.top}"/></clipPath></defs>`);
  return `clip-path="url(#${id})"`;
}

export function scatterSvg(scene: ScatterScene, view: ViewRange, width: number, height: number, theme: PlotTheme): string {
  return svgDocument(scene, width, height, theme, (svg) => {
    const projection = new Projection(view, plotArea(width, height, theme.fontSize));
    axes(svg, projection, theme, scene.xTitle, scene.yTitle, true);
    svg.add(`<g ${clip(svg, projection, `clip-${scene.id}`)}>`);
    scene.ellipses.forEach((ellipse, c) => {
      if (!ellipse) return;
      const d = ellipseOutline(ellipse).map((p, i) => `${i === 0 ? 'M' : 'L'}${r2(projection.x(p.x))} ${r2(projection.y(p.y))}`).join('');
      svg.add(`<path class="ellipse" d="${d}z" fill="none" stroke="${scene.classes[c].colour}" stroke-width="1.5" stroke-dasharray="5 3"/>`);
    });
    const { radius, alpha } = markerStyle(scene.x.length);
    scene.members.forEach((members, c) => {
      const style = scene.classes[c];
      let d = '';
      for (let k = 0; k < members.length; k++) {
        const i = members[k];
        const x = scene.x[i];
        const y = scene.y[i];
        if (!(x >= view.x0 && x <= view.x1 && y >= view.y0 && y <= view.y1)) continue;
        d += markerPathData(style.shape, projection.x(x), projection.y(y), radius);
      }
      svg.add(`<path class="points" data-class="${escapeXml(style.label)}" fill="${style.colour}" fill-opacity="${alpha}" d="${d}"/>`);
    });
    scene.centroids.forEach((centroid, c) => {
      if (!centroid) return;
      const d = markerPathData(scene.classes[c].shape, projection.x(centroid.x), projection.y(centroid.y), 7);
      svg.add(`<path class="centroid" d="${d}" fill="${scene.classes[c].colour}" stroke="${escapeXml(theme.foreground)}" stroke-width="2"/>`);
    });
    svg.add('</g>');
  });
}

export function densitySvg(scene: DensityScene, view: ViewRange, width: number, height: number, theme: PlotTheme): string {
  return svgDocument(scene, width, height, theme, (svg) => {
    const area = plotArea(width, height, theme.fontSize);
    const layout = densityLayout(scene, view, area);
    const { curves } = layout;
    axes(svg, new Projection({ x0: view.x0, x1: view.x1, y0: 0, y1: 1 }, area), theme, scene.xTitle, '', false);
    axes(svg, curves, theme, '', 'density', true, curves.area.top, curves.area.bottom, false);
    svg.add(`<g ${clip(svg, curves, `clip-${scene.id}`)}>`);
    scene.curves.forEach((curve, c) => {
      if (curve.count === 0) return;
      let d = '';
      for (let g = 0; g < curve.x.length; g++) d += `${g === 0 ? 'M' : 'L'}${r2(curves.x(curve.x[g]))} ${r2(curves.y(curve.y[g]))}`;
      const colour = scene.classes[c].colour;
      const base = `L${r2(curves.x(curve.x[curve.x.length - 1]))} ${r2(curves.y(0))}L${r2(curves.x(curve.x[0]))} ${r2(curves.y(0))}z`;
      svg.add(`<path d="${d}${base}" fill="${colour}" fill-opacity="0.15" stroke="none"/>`);
      svg.add(`<path class="curve" data-class="${escapeXml(scene.classes[c].label)}" d="${d}" fill="none" stroke="${colour}" stroke-width="2"${c % 2 === 1 ? ' stroke-dasharray="6 3"' : ''}/>`);
    });
    svg.add('</g>');
    if (scene.strip) {
      const { radius, alpha } = markerStyle(scene.values.length);
      const markerRadius = Math.min(radius, layout.rowHeight * 0.3);
      scene.members.forEach((members, c) => {
        let d = '';
        for (let k = 0; k < members.length; k++) {
          const point = stripPosition(scene, layout, members[k]);
          if (!point || point.x < area.left || point.x > area.right) continue;
          d += markerPathData(scene.classes[c].shape, point.x, point.y, markerRadius);
        }
        svg.add(`<path class="points" data-class="${escapeXml(scene.classes[c].label)}" fill="${scene.classes[c].colour}" fill-opacity="${alpha}" d="${d}"/>`);
      });
    }
  });
}

export function plotSvg(scene: PlotScene, view: ViewRange, width: number, height: number, theme: PlotTheme): string {
  return scene.kind === 'scatter' ? scatterSvg(scene, view, width, height, theme) : densitySvg(scene, view, width, height, theme);
}
