/**
 * Cell shading for heat grids (confusion matrices, centroid distances). The shade is a translucent
 * colour over the theme's background; where it gets strong, the text colour is chosen from the
 * blended colour's luminance so the number stays readable in light, dark and high-contrast themes.
 */
import { readPlotTheme } from '../plots/theme';

/** Hues from the Okabe–Ito palette: blue for agreement, vermillion for errors. */
const HUES = { agree: [0, 114, 178], error: [213, 94, 0] } as const;
export type Hue = keyof typeof HUES;

/** Parses #rgb, #rrggbb, #rrggbbaa and rgb()/rgba() into 0–255 channels; null if not understood. */
export function parseColour(text: string): [number, number, number] | null {
  const value = text.trim();
  const hex = /^#([0-9a-f]{3,8})$/i.exec(value);
  if (hex) {
    const digits = hex[1];
    if (digits.length === 3) return [0, 1, 2].map((i) => parseInt(digits[i] + digits[i], 16)) as [number, number, number];
    if (digits.length === 6 || digits.length === 8) return [0, 2, 4].map((i) => parseInt(digits.slice(i, i + 2), 16)) as [number, number, number];
    return null;
  }
  const rgb = /^rgba?\(\s*([\d.]+)[\s,]+([\d.]+)[\s,]+([\d.]+)/i.exec(value);
  return rgb ? [Number(rgb[1]), Number(rgb[2]), Number(rgb[3])] : null;
}

/** Relative luminance (WCAG 2 definition) of 0–255 channels. */
export function luminance([r, g, b]: readonly number[]): number {
  const linear = (c: number): number => {
    const s = c / 255;
    return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  };
  return 0.2126 * linear(r) + 0.7152 * linear(g) + 0.0722 * linear(b);
}

/** Shades a cell for a value in [0, 1] of the grid's scale. */
export function shadeCell(cell: HTMLElement, fraction: number, hue: Hue): void {
  if (!(fraction > 0)) return;
  const alpha = 0.12 + 0.78 * Math.min(1, fraction);
  const [r, g, b] = HUES[hue];
  cell.style.backgroundColor = `rgba(${r}, ${g}, ${b}, ${alpha.toFixed(3)})`;
  const background = parseColour(readPlotTheme().background) ?? [255, 255, 255];
  const blended = [r, g, b].map((c, i) => alpha * c + (1 - alpha) * background[i]);
  // Contrast of black text is (L + 0.05) / 0.05 and of white 1.05 / (L + 0.05): pick the larger.
  const blendedLuminance = luminance(blended);
  cell.style.color = (blendedLuminance + 0.05) / 0.05 >= 1.05 / (blendedLuminance + 0.05) ? '#000000' : '#ffffff';
}
