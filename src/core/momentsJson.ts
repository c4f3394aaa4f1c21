/**
 * Lossless JSON form of Moments, for shards computed apart and merged later. Numbers are JSON
 * numbers: JavaScript prints the shortest decimal that reads back to the same double, so the
 * round trip is exact. The scatter is written as its upper triangle, row by row
 * (d(d+1)/2 numbers: S[0][0], S[0][1], …, S[0][d−1], S[1][1], …).
 *
 *   { "format": "scatterwise-moments", "version": 1, "features": [..],
 *     "classes": [ { "label", "count", "mean", "scatterUpper", "min", "max", "cubic", "quartic" } ] }
 */
import { DataError } from './errors';
import type { ClassMoments, Moments } from './moments';

const FORMAT = 'scatterwise-moments';

export function momentsToJSON(m: Moments): object {
  const d = m.features.length;
  return {
    format: FORMAT,
    version: 1,
    features: [...m.features],
    classes: m.classes.map((c) => {
      const upper: number[] = [];
      for (let i = 0; i < d; i++) for (let j = i; j < d; j++) upper.push(c.scatter[i * d + j]);
      return {
        label: c.label,
        count: c.count,
        mean: Array.from(c.mean),
        scatterUpper: upper,
        min: Array.from(c.min),
        max: Array.from(c.max),
        cubic: Array.from(c.cubic),
        quartic: c.quartic,
      };
    }),
  };
}

/** Reads what momentsToJSON wrote; anything else is a DataError saying which field is wrong. */
export function momentsFromJSON(o: unknown, source = 'moments'): Moments {
  const fail = (message: string): never => {
    throw new DataError('bad-moments', `${source}: ${message}`, { file: source }, 'Give a file written by `scatterwise moments` (format "scatterwise-moments", version 1).');
  };
  if (!isRecord(o)) return fail('expected a JSON object.');
  if (o.format !== FORMAT) fail(`"format" must be "${FORMAT}".`);
  if (o.version !== 1) fail(`"version" ${JSON.stringify(o.version)} is not supported (expected 1).`);
  const features = o.features;
  if (!Array.isArray(features) || !features.every((f) => typeof f === 'string')) return fail('"features" must be an array of strings.');
  const d = features.length;
  if (!Array.isArray(o.classes)) return fail('"classes" must be an array.');
  const seen = new Set<string>();
  const classes = o.classes.map((raw: unknown, index: number): ClassMoments => {
    const where = `class ${index}`;
    if (!isRecord(raw)) return fail(`${where} is not an object.`);
    if (typeof raw.label !== 'string') return fail(`${where}: "label" must be a string.`);
    if (seen.has(raw.label)) fail(`label "${raw.label}" appears twice.`);
    seen.add(raw.label);
    const name = `class "${raw.label}"`;
    const count = raw.count;
    if (typeof count !== 'number' || !Number.isInteger(count) || count < 1) return fail(`${name}: "count" must be a positive integer.`);
    const vector = (key: string, length: number): Float64Array => {
      const value = raw[key];
      if (!Array.isArray(value) || value.length !== length) return fail(`${name}: "${key}" must be an array of ${length} numbers.`);
      const out = new Float64Array(length);
      value.forEach((v: unknown, i: number) => {
        if (typeof v !== 'number' || !Number.isFinite(v)) fail(`${name}: "${key}"[${i}] is not a finite number.`);
        out[i] = v as number;
      });
      return out;
    };
    const mean = vector('mean', d);
    const upper = vector('scatterUpper', (d * (d + 1)) / 2);
    const min = vector('min', d);
    const max = vector('max', d);
    const cubic = vector('cubic', d);
    const quartic = raw.quartic;
    if (typeof quartic !== 'number' || !Number.isFinite(quartic) || quartic < 0) return fail(`${name}: "quartic" must be a finite number ≥ 0.`);
    const scatter = new Float64Array(d * d);
    let k = 0;
    for (let i = 0; i < d; i++) {
      for (let j = i; j < d; j++) {
        scatter[i * d + j] = upper[k];
        scatter[j * d + i] = upper[k];
        k++;
      }
      if (scatter[i * d + i] < 0) fail(`${name}: the scatter of "${features[i]}" is negative.`);
      if (min[i] > max[i]) fail(`${name}: "min" exceeds "max" for "${features[i]}".`);
    }
    return { label: raw.label, count, mean, scatter, min, max, cubic, quartic };
  });
  return { features: [...features], classes };
}

function isRecord(o: unknown): o is Record<string, unknown> {
  return typeof o === 'object' && o !== null && !Array.isArray(o);
}
