/**
 * Number formatting for the panel. The counts, percentages, statistics and p-values use the same
 * functions as the text and Markdown reports, so a figure reads the same everywhere; the few
 * forms only the panel needs are here.
 */
export { formatCount, formatNumber, formatPercent, formatPValue } from '../src/core/format/numbers';

/** A value with a fixed number of decimals (coefficients, correlations, distances), typographic minus. */
export function formatFixed(value: number, digits = 2): string {
  if (!Number.isFinite(value)) return '—';
  return value.toFixed(digits).replace(/^-/, '−');
}

/** Degrees of freedom: integers plainly, fractional ones (Rao's F approximation) with one decimal. */
export function formatDf(value: number): string {
  if (!Number.isFinite(value)) return '—';
  return Number.isInteger(value) ? String(value) : value.toFixed(1);
}

/** A size in bytes as MB (10^6 bytes) with one decimal below 10 MB. */
export function formatMegabytes(bytes: number): string {
  return `${(bytes / 1e6).toFixed(bytes < 1e7 ? 1 : 0)} MB`;
}
