/**
 * Per-class kernel density estimates along one axis (discriminant or principal component).
 * Gaussian kernel; bandwidth by Silverman's rule of thumb h = 0.9 · min(s, IQR / 1.34) · n^(−1/5)
 * (Silverman, "Density Estimation for Statistics and Data Analysis", 1986, eq. 3.31). Above a few
 * thousand points the values are first spread onto a fine grid by linear binning (each value split
 * between its two nearest grid nodes), which keeps the cost independent of n.
 */
export interface DensityCurve {
  /** Grid positions (data units), ascending. */
  x: Float64Array;
  /** Density at each position; integrates to 1 over the grid. */
  y: Float64Array;
  bandwidth: number;
  count: number;
}

const GRID_POINTS = 256;
const BINS = 1024;
const DIRECT_LIMIT = 2048;

function quantileSorted(sorted: Float64Array, q: number): number {
  const position = (sorted.length - 1) * q;
  const low = Math.floor(position);
  const high = Math.ceil(position);
  return sorted[low] + (sorted[high] - sorted[low]) * (position - low);
}

/** Silverman's rule-of-thumb bandwidth for sorted values; `fallback` when they do not vary. */
export function silvermanBandwidth(sorted: Float64Array, fallback: number): number {
  const n = sorted.length;
  if (n < 2) return fallback;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += sorted[i];
  mean /= n;
  let squares = 0;
  for (let i = 0; i < n; i++) squares += (sorted[i] - mean) ** 2;
  const sd = Math.sqrt(squares / (n - 1));
  const iqr = quantileSorted(sorted, 0.75) - quantileSorted(sorted, 0.25);
  const spread = iqr > 0 ? Math.min(sd, iqr / 1.34) : sd;
  const h = 0.9 * spread * n ** -0.2;
  return h > 0 ? h : fallback;
}

/** One density curve per class over a common grid spanning all values plus three bandwidths. */
export function classDensities(values: Float64Array, classIndex: Int32Array, classCount: number): DensityCurve[] {
  const perClass: number[][] = Array.from({ length: classCount }, () => []);
  let low = Infinity;
  let high = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    const c = classIndex[i];
    if (!Number.isFinite(v) || c < 0 || c >= classCount) continue;
    perClass[c].push(v);
    if (v < low) low = v;
    if (v > high) high = v;
  }
  if (!(high >= low)) return perClass.map(() => emptyCurve());
  const fallback = high > low ? (high - low) / 100 : Math.max(Math.abs(low), 1) / 100;
  const sortedByClass = perClass.map((list) => Float64Array.from(list).sort());
  const bandwidths = sortedByClass.map((sorted) => silvermanBandwidth(sorted, fallback));
  const reach = 3 * Math.max(...bandwidths);
  const gridLow = low - reach;
  const gridHigh = high + reach;
  return sortedByClass.map((sorted, c) => densityOnGrid(sorted, bandwidths[c], gridLow, gridHigh));
}

function emptyCurve(): DensityCurve {
  return { x: new Float64Array(0), y: new Float64Array(0), bandwidth: NaN, count: 0 };
}

function densityOnGrid(sorted: Float64Array, h: number, low: number, high: number): DensityCurve {
  const n = sorted.length;
  const x = new Float64Array(GRID_POINTS);
  const y = new Float64Array(GRID_POINTS);
  const step = (high - low) / (GRID_POINTS - 1);
  for (let g = 0; g < GRID_POINTS; g++) x[g] = low + g * step;
  if (n === 0) return { x, y, bandwidth: h, count: 0 };
  // Either the points themselves or linear-binned weights stand in as kernel centres.
  let centres: Float64Array = sorted;
  let weights: Float64Array | null = null;
  if (n > DIRECT_LIMIT) {
    const binWidth = (high - low) / (BINS - 1);
    weights = new Float64Array(BINS);
    for (let i = 0; i < n; i++) {
      const position = (sorted[i] - low) / binWidth;
      const left = Math.min(BINS - 2, Math.max(0, Math.floor(position)));
      const share = position - left;
      weights[left] += 1 - share;
      weights[left + 1] += share;
    }
    centres = new Float64Array(BINS);
    for (let b = 0; b < BINS; b++) centres[b] = low + b * binWidth;
  }
  kernelSums(centres, weights, h, x, y);
  const norm = 1 / (n * h * Math.sqrt(2 * Math.PI));
  for (let g = 0; g < GRID_POINTS; g++) y[g] *= norm;
  return { x, y, bandwidth: h, count: n };
}

/** out[g] = Σ_i weight_i · exp(−½ ((at[g] − centre_i) / h)²), skipping terms below e^−32. */
function kernelSums(centres: Float64Array, weights: Float64Array | null, h: number, at: Float64Array, out: Float64Array): void {
  for (let g = 0; g < at.length; g++) {
    let sum = 0;
    for (let i = 0; i < centres.length; i++) {
      const weight = weights ? weights[i] : 1;
      if (weight === 0) continue;
      const z = (at[g] - centres[i]) / h;
      if (z > 8 || z < -8) continue;
      sum += weight * Math.exp(-0.5 * z * z);
    }
    out[g] = sum;
  }
}

/** The Gaussian kernel density of `values` with bandwidth h at the given points, directly (no binning). */
export function kernelDensityAt(values: Float64Array, h: number, at: Float64Array): Float64Array {
  const out = new Float64Array(at.length);
  kernelSums(values, null, h, at, out);
  const norm = 1 / (values.length * h * Math.sqrt(2 * Math.PI));
  for (let g = 0; g < out.length; g++) out[g] *= norm;
  return out;
}
