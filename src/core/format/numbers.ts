/**
 * Number formatting shared by the findings, the verdict and the text/Markdown reports. Plain
 * ASCII digits, no locale: the same report reads the same on every machine.
 */

/** `x` to `digits` significant digits; exponent form outside [1e-4, 1e6); ∞ spelled out; NaN (a
 * figure that cannot be computed, e.g. a test without degrees of freedom) shown as `—`. */
export function formatNumber(x: number, digits = 4): string {
  if (Number.isNaN(x)) return '—';
  if (x === Infinity) return '∞';
  if (x === -Infinity) return '−∞';
  if (x === 0) return '0';
  const magnitude = Math.abs(x);
  if (magnitude >= 1e6 || magnitude < 1e-4) {
    const [mantissa, exponent] = x.toExponential(digits - 1).split('e') as [string, string];
    return `${trimZeros(mantissa)}e${exponent.replace('+', '')}`;
  }
  return trimZeros(x.toPrecision(digits));
}

function trimZeros(text: string): string {
  return text.includes('.') ? text.replace(/\.?0+$/, '') : text;
}

/** A fraction in [0, 1] as a percentage with `decimals` decimals: 0.98765 → `98.8%`. */
export function formatPercent(fraction: number, decimals = 1): string {
  if (!Number.isFinite(fraction)) return formatNumber(fraction);
  return `${(100 * fraction).toFixed(decimals)}%`;
}

/** A p-value: 3 significant digits, exponent form when small, `< 1e-307` when it underflowed to 0. */
export function formatPValue(p: number): string {
  if (Number.isNaN(p)) return '—';
  if (p === 0) return '< 1e-307';
  if (p < 1e-4) return formatNumber(p, 2);
  return formatNumber(p, 3);
}

/** `p = 0.0312`, or `p < 1e-307` when it underflowed to 0. */
export function formatPEquals(p: number): string {
  if (Number.isNaN(p)) return 'p —';
  return p === 0 ? `p ${formatPValue(p)}` : `p = ${formatPValue(p)}`;
}

/** An integer with `,` between thousands: 1234567 → `1,234,567`. */
export function formatCount(n: number): string {
  const text = String(Math.abs(Math.trunc(n)));
  const grouped = text.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return n < 0 ? `-${grouped}` : grouped;
}

/** `'a', 'b' and 3 more` — names quoted, at most `limit` shown. */
export function listNames(names: readonly string[], limit = 8): string {
  const shown = names.slice(0, limit).map((n) => `'${n}'`);
  const more = names.length - shown.length;
  if (more > 0) return `${shown.join(', ')} and ${more} more`;
  if (shown.length <= 1) return shown.join('');
  return `${shown.slice(0, -1).join(', ')} and ${shown[shown.length - 1]}`;
}

/** A linear combination in words: [{a, 2}, {b, −1}] → `2·a − b`. */
export function formatCombination(terms: readonly { feature: string; coefficient: number }[]): string {
  let text = '';
  for (const { feature, coefficient } of terms) {
    const magnitude = Math.abs(coefficient);
    const factor = Math.abs(magnitude - 1) <= 1e-9 ? '' : `${formatNumber(magnitude)}·`;
    if (text === '') text = `${coefficient < 0 ? '−' : ''}${factor}${feature}`;
    else text += ` ${coefficient < 0 ? '−' : '+'} ${factor}${feature}`;
  }
  return text === '' ? '0' : text;
}
