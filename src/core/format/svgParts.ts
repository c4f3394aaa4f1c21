/**
 * Pieces of the report's SVG plots: text escaping, the class colours and marker shapes, "nice"
 * axis ticks, and a frame with ticks and axis titles. Pure string building, so the CLI, the HTML
 * report and tests produce the same bytes on every machine.
 */
import { formatNumber } from './numbers';

/** Text safe inside SVG/HTML text and attribute values; control characters shown as `\uXXXX`. */
export function escapeXml(text: string): string {
  return text
    // eslint-disable-next-line no-control-regex
    .replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/g, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`)
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}

/**
 * Class colours: the Okabe–Ito palette (Okabe & Ito, "Color Universal Design", 2008), which stays
 * distinguishable with the common forms of colour blindness; each class also has its own marker
 * shape, so colour is never the only cue (class i: colour i mod 7, shape i mod 6).
 */
export const CLASS_COLOURS = ['#0072B2', '#E69F00', '#009E73', '#D55E00', '#56B4E9', '#CC79A7', '#F0E442'] as const;
const SHAPES = ['circle', 'square', 'triangle', 'diamond', 'triangle-down', 'cross'] as const;

export function classColour(i: number): string {
  return CLASS_COLOURS[i % CLASS_COLOURS.length]!;
}

/** Coordinates in SVG files: two decimals are far below a pixel. */
export function px(x: number): string {
  return (Math.round(x * 100) / 100).toString();
}

/** A marker of class `i` at (x, y) with radius r, as an SVG element. */
export function marker(i: number, x: number, y: number, r: number): string {
  const shape = SHAPES[i % SHAPES.length]!;
  const polygon = (points: [number, number][]): string => `<polygon points="${points.map(([a, b]) => `${px(x + a * r)},${px(y + b * r)}`).join(' ')}"/>`;
  switch (shape) {
    case 'circle':
      return `<circle cx="${px(x)}" cy="${px(y)}" r="${px(r)}"/>`;
    case 'square':
      return `<rect x="${px(x - 0.85 * r)}" y="${px(y - 0.85 * r)}" width="${px(1.7 * r)}" height="${px(1.7 * r)}"/>`;
    case 'triangle':
      return polygon([[0, -1.15], [1.05, 0.75], [-1.05, 0.75]]);
    case 'triangle-down':
      return polygon([[0, 1.15], [1.05, -0.75], [-1.05, -0.75]]);
    case 'diamond':
      return polygon([[0, -1.2], [1.05, 0], [0, 1.2], [-1.05, 0]]);
    case 'cross':
      return `<path d="M${px(x - r)},${px(y - r)}L${px(x + r)},${px(y + r)}M${px(x - r)},${px(y + r)}L${px(x + r)},${px(y - r)}" stroke-width="${px(r * 0.6)}" fill="none"/>`;
  }
}

/** Whether the class's marker is drawn by its outline only (so it is stroked in the class colour). */
export function strokedMarker(i: number): boolean {
  return SHAPES[i % SHAPES.length] === 'cross';
}

/**
 * About `count` round tick values covering [low, high]: steps of 1, 2 or 5 times a power of ten
 * (the usual "nice numbers" choice; common practice, no source).
 */
export function niceTicks(low: number, high: number, count = 5): number[] {
  if (!(high > low) || !Number.isFinite(low) || !Number.isFinite(high)) return Number.isFinite(low) ? [low] : [];
  const raw = (high - low) / Math.max(1, count);
  const power = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * power).find((s) => s >= raw) ?? 10 * power;
  const ticks: number[] = [];
  for (let t = Math.ceil(low / step) * step; t <= high + step * 1e-9; t += step) ticks.push(Math.abs(t) < step * 1e-9 ? 0 : t);
  return ticks;
}

export interface Frame {
  width: number;
  height: number;
  left: number;
  right: number;
  top: number;
  bottom: number;
  xLow: number;
  xHigh: number;
  yLow: number;
  yHigh: number;
}

export function sx(frame: Frame, x: number): number {
  return frame.left + ((x - frame.xLow) / (frame.xHigh - frame.xLow)) * (frame.right - frame.left);
}

export function sy(frame: Frame, y: number): number {
  return frame.bottom - ((y - frame.yLow) / (frame.yHigh - frame.yLow)) * (frame.bottom - frame.top);
}

/** The plot box, its ticks with labels, and the axis titles. `yTicks` false hides the y axis (densities). */
export function axes(frame: Frame, xTitle: string, yTitle: string, yTicks = true): string {
  const parts: string[] = [];
  parts.push(`<rect x="${px(frame.left)}" y="${px(frame.top)}" width="${px(frame.right - frame.left)}" height="${px(frame.bottom - frame.top)}" fill="none" stroke="#888" stroke-width="1"/>`);
  for (const t of niceTicks(frame.xLow, frame.xHigh)) {
    const x = sx(frame, t);
    parts.push(`<line x1="${px(x)}" y1="${px(frame.bottom)}" x2="${px(x)}" y2="${px(frame.bottom + 4)}" stroke="#888"/>`);
    parts.push(`<text x="${px(x)}" y="${px(frame.bottom + 16)}" text-anchor="middle">${escapeXml(formatNumber(t, 3))}</text>`);
  }
  if (yTicks) {
    for (const t of niceTicks(frame.yLow, frame.yHigh)) {
      const y = sy(frame, t);
      parts.push(`<line x1="${px(frame.left - 4)}" y1="${px(y)}" x2="${px(frame.left)}" y2="${px(y)}" stroke="#888"/>`);
      parts.push(`<text x="${px(frame.left - 7)}" y="${px(y + 4)}" text-anchor="end">${escapeXml(formatNumber(t, 3))}</text>`);
    }
  }
  parts.push(`<text x="${px((frame.left + frame.right) / 2)}" y="${px(frame.height - 6)}" text-anchor="middle">${escapeXml(xTitle)}</text>`);
  parts.push(`<text transform="translate(14 ${px((frame.top + frame.bottom) / 2)}) rotate(-90)" text-anchor="middle">${escapeXml(yTitle)}</text>`);
  return parts.join('');
}

/** A legend of class names with their marker, one line each, at the right of the frame. */
export function legend(labels: readonly string[], x: number, y: number): string {
  return labels
    .map((label, i) => {
      const line = y + i * 18;
      const stroke = strokedMarker(i) ? ` stroke="${classColour(i)}"` : '';
      const shown = label.length > 24 ? `${label.slice(0, 23)}…` : label;
      return `<g fill="${classColour(i)}"${stroke}>${marker(i, x + 6, line - 4, 4.5)}</g><text x="${px(x + 16)}" y="${px(line)}">${escapeXml(shown)}</text>`;
    })
    .join('');
}

/** The document around the parts: size, a title for screen readers, font and background. */
export function svgDocument(width: number, height: number, title: string, body: string): string {
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="${escapeXml(title)}" font-family="sans-serif" font-size="11">` +
    `<title>${escapeXml(title)}</title><rect width="100%" height="100%" fill="#fff"/><g fill="#222">${body}</g></svg>\n`
  );
}
