/**
 * Generated data for the numerical core's property tests (invented: vibration and acoustic
 * features recorded on a fleet of pumps, labelled by fault type), and straightforward
 * reference computations over the raw rows that the tests compare the streaming code against.
 */
import { MomentsAccumulator, type Moments } from '../../src/core/moments';

/** Park–Miller minimal standard generator, uniform in (0, 1). */
export function uniformStream(seed: number): () => number {
  let x = seed % 2147483647 || 1;
  return () => {
    x = (48271 * x) % 2147483647;
    return x / 2147483647;
  };
}

/** Standard normal draws (Box–Muller over uniformStream). */
export function normalStream(seed: number): () => number {
  const u = uniformStream(seed);
  return () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
}

export const PUMP_FEATURES = [
  'vibration_rms',
  'vibration_peak',
  'vibration_kurtosis',
  'acoustic_level_db',
  'acoustic_peak_hz',
  'bearing_temp_c',
  'motor_current_a',
  'discharge_pressure_bar',
  'suction_pressure_bar',
  'flow_rate_m3h',
];

export const PUMP_FAULTS = ['healthy', 'bearing-wear', 'cavitation', 'impeller-damage', 'misalignment', 'seal-leak'];

export function featureNames(d: number): string[] {
  return Array.from({ length: d }, (_, i) => (i < PUMP_FEATURES.length ? PUMP_FEATURES[i] : `sensor_${i + 1}`));
}

export interface LabelledRows {
  features: string[];
  labels: string[];
  /** n × d row-major. */
  values: Float64Array;
  classIds: Int32Array;
  n: number;
  d: number;
}

export interface GenerateOptions {
  seed: number;
  /** Rows per class; classes are interleaved in a shuffled order. */
  counts: number[];
  d: number;
  /** Spread of the class means in within-class standard deviations. */
  separation?: number;
  /** Added to every value (numerical stability tests). */
  offset?: number;
  /** Scale of the within-class noise. */
  noise?: number;
}

/** Rows x = μ_class + A g (g standard normal, A a fixed random mixing matrix) + offset. */
export function generateRows(options: GenerateOptions): LabelledRows {
  const { seed, counts, d } = options;
  const separation = options.separation ?? 2;
  const offset = options.offset ?? 0;
  const noise = options.noise ?? 1;
  const draw = normalStream(seed);
  const u = uniformStream(seed + 17);
  const mixing = Float64Array.from({ length: d * d }, (_, k) => (k % (d + 1) === 0 ? 1 : 0) + 0.4 * draw());
  const means = counts.map(() => Float64Array.from({ length: d }, () => separation * draw()));
  const order: number[] = [];
  counts.forEach((c, k) => {
    for (let i = 0; i < c; i++) order.push(k);
  });
  for (let i = order.length - 1; i > 0; i--) {
    const j = Math.floor(u() * (i + 1));
    [order[i], order[j]] = [order[j], order[i]];
  }
  const n = order.length;
  const values = new Float64Array(n * d);
  const classIds = new Int32Array(n);
  const g = new Float64Array(d);
  order.forEach((k, r) => {
    classIds[r] = k;
    for (let i = 0; i < d; i++) g[i] = draw();
    for (let i = 0; i < d; i++) {
      let sum = 0;
      for (let j = 0; j < d; j++) sum += mixing[i * d + j] * g[j];
      values[r * d + i] = offset + means[k][i] + noise * sum;
    }
  });
  return { features: featureNames(d), labels: PUMP_FAULTS.slice(0, counts.length), values, classIds, n, d };
}

/** Accumulates the rows in batches of `batch` rows. */
export function accumulate(rows: LabelledRows, batch = 37, rowsSubset?: number[]): Moments {
  const acc = new MomentsAccumulator(rows.features);
  const picked = rowsSubset ?? Array.from({ length: rows.n }, (_, i) => i);
  for (let start = 0; start < picked.length; start += batch) {
    const take = picked.slice(start, start + batch);
    const values = new Float64Array(take.length * rows.d);
    const ids = new Int32Array(take.length);
    take.forEach((r, i) => {
      values.set(rows.values.subarray(r * rows.d, (r + 1) * rows.d), i * rows.d);
      ids[i] = rows.classIds[r];
    });
    acc.add(values, ids, take.length, rows.labels);
  }
  return acc.result();
}

export interface ReferenceClass {
  count: number;
  mean: number[];
  scatter: number[][];
  cubic: number[];
  quartic: number;
}

/** Two-pass moments of each class straight from the rows (the textbook definitions). */
export function referenceMoments(rows: LabelledRows, rowsSubset?: number[]): Map<string, ReferenceClass> {
  const { d } = rows;
  const picked = rowsSubset ?? Array.from({ length: rows.n }, (_, i) => i);
  const out = new Map<string, ReferenceClass>();
  rows.labels.forEach((label, k) => {
    const members = picked.filter((r) => rows.classIds[r] === k);
    if (members.length === 0) return;
    const mean = new Array<number>(d).fill(0);
    for (const r of members) for (let i = 0; i < d; i++) mean[i] += rows.values[r * d + i];
    for (let i = 0; i < d; i++) mean[i] /= members.length;
    const scatter = Array.from({ length: d }, () => new Array<number>(d).fill(0));
    const cubic = new Array<number>(d).fill(0);
    let quartic = 0;
    for (const r of members) {
      const z = mean.map((m, i) => rows.values[r * d + i] - m);
      const norm = z.reduce((s, v) => s + v * v, 0);
      for (let i = 0; i < d; i++) {
        cubic[i] += norm * z[i];
        for (let j = 0; j < d; j++) scatter[i][j] += z[i] * z[j];
      }
      quartic += norm * norm;
    }
    out.set(label, { count: members.length, mean, scatter, cubic, quartic });
  });
  return out;
}

/** Centred scatter of all rows together (two-pass), d × d. */
export function referenceTotalScatter(rows: LabelledRows): number[][] {
  const { d, n } = rows;
  const mean = new Array<number>(d).fill(0);
  for (let r = 0; r < n; r++) for (let i = 0; i < d; i++) mean[i] += rows.values[r * d + i] / n;
  const s = Array.from({ length: d }, () => new Array<number>(d).fill(0));
  for (let r = 0; r < n; r++) {
    for (let i = 0; i < d; i++) {
      const zi = rows.values[r * d + i] - mean[i];
      for (let j = 0; j < d; j++) s[i][j] += zi * (rows.values[r * d + j] - mean[j]);
    }
  }
  return s;
}

/** max |a − b| / max |b| over two equally long lists of numbers. */
export function relativeDifference(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) throw new Error(`length ${a.length} vs ${b.length}`);
  let diff = 0;
  let scale = 0;
  for (let i = 0; i < a.length; i++) {
    diff = Math.max(diff, Math.abs(a[i] - b[i]));
    scale = Math.max(scale, Math.abs(b[i]));
  }
  return scale === 0 ? diff : diff / scale;
}

export function flatten(m: number[][]): number[] {
  return m.flat();
}

/** A copy of the rows with column `source` appended as a new column computed by `f`. */
export function withColumn(rows: LabelledRows, name: string, f: (row: Float64Array, classId: number) => number): LabelledRows {
  const d = rows.d + 1;
  const values = new Float64Array(rows.n * d);
  for (let r = 0; r < rows.n; r++) {
    const row = rows.values.subarray(r * rows.d, (r + 1) * rows.d);
    values.set(row, r * d);
    values[r * d + rows.d] = f(row, rows.classIds[r]);
  }
  return { ...rows, features: [...rows.features, name], values, d };
}
