/**
 * Helpers of the reference suites: where the stored reference figures are, and comparisons whose
 * failure message says which figure, which element, both values, the reference's source and the gap.
 *
 * Tolerance rule (REFERENCE_TOLERANCE = 1e-8): an element e of a figure is matched by a when
 * |a − e| ≤ 1e-8 · max(|e|, floor), where floor = 1e-3 · max|e| over the figure ("absolute for values
 * near 0": an entry a thousand times smaller than the figure's largest entry is compared at the
 * figure's scale, since rounding errors of a computed vector scale with its norm). Probabilities are
 * compared with floor 0 (purely relative), so a p-value of 1e-100 must match to 8 digits too.
 */
import * as assert from 'node:assert/strict';
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';

export const REFERENCE_TOLERANCE = 1e-8;

/** The repository root: the nearest folder above this bundle (or the working folder) with package.json. */
export function repoRoot(): string {
  for (const start of [__dirname, process.cwd()]) {
    let dir = start;
    for (;;) {
      if (existsSync(join(dir, 'package.json')) && existsSync(join(dir, 'test', 'reference'))) return dir;
      const up = dirname(dir);
      if (up === dir) break;
      dir = up;
    }
  }
  throw new Error('cannot find the repository root (a folder with package.json and test/reference)');
}

export function repoPath(...parts: string[]): string {
  return join(repoRoot(), ...parts);
}

/** A stored figure: its value and the source that produced it. */
export interface Figure<T = unknown> {
  source: string;
  value: T;
}

export type Reference = Record<string, unknown>;

export function readReference(path: string): Reference {
  return JSON.parse(readFileSync(path, 'utf8')) as Reference;
}

/** `test/reference/fixtures/<name>.json`, e.g. `iris.python`. */
export function loadReference(name: string): Reference {
  return readReference(repoPath('test', 'reference', 'fixtures', `${name}.json`));
}

/** The figure at a dotted path, e.g. `training.confusion`. */
export function figure<T>(reference: Reference, path: string): Figure<T> {
  let node: unknown = reference;
  for (const key of path.split('.')) {
    if (node === null || typeof node !== 'object' || !(key in node)) {
      throw new Error(`reference has no figure ${path}`);
    }
    node = (node as Record<string, unknown>)[key];
  }
  const f = node as Figure<T>;
  if (f === null || typeof f !== 'object' || !('value' in f) || !('source' in f)) {
    throw new Error(`reference entry ${path} is not a {source, value} figure`);
  }
  return f;
}

function flat(values: unknown): number[] {
  if (typeof values === 'number') return [values];
  if (Array.isArray(values)) return values.flatMap(flat);
  throw new Error(`not numeric: ${JSON.stringify(values)}`);
}

export interface CloseOptions {
  /** Purely relative (floor 0): for probabilities. */
  relativeOnly?: boolean;
  tolerance?: number;
}

function gapMessage(what: string, where: string, actual: number, expected: number, source: string, limit: number): string {
  const gap = Math.abs(actual - expected);
  const relative = expected === 0 ? Infinity : gap / Math.abs(expected);
  return (
    `${what}${where}: ours ${actual}, reference ${expected} (${source}); ` +
    `|difference| ${gap.toExponential(3)} (relative ${relative.toExponential(3)}) exceeds ${limit.toExponential(3)}`
  );
}

/** Numbers, vectors or matrices, element by element, by the tolerance rule above. */
export function assertClose(actual: unknown, expected: Figure | number | number[] | number[][], what: string, options: CloseOptions = {}): void {
  const fig: Figure = typeof expected === 'object' && !Array.isArray(expected) ? expected : { source: 'given', value: expected };
  const tolerance = options.tolerance ?? REFERENCE_TOLERANCE;
  const e = flat(fig.value);
  const a = flat(actual);
  assert.equal(a.length, e.length, `${what}: ours has ${a.length} numbers, the reference ${e.length} (${fig.source})`);
  const floor = options.relativeOnly ? 0 : 1e-3 * Math.max(0, ...e.map(Math.abs));
  const shape = Array.isArray(fig.value) && Array.isArray(fig.value[0]) ? (fig.value[0] as unknown[]).length : 0;
  for (let i = 0; i < e.length; i++) {
    const limit = tolerance * Math.max(Math.abs(e[i]), floor);
    const where = e.length === 1 ? '' : shape ? `[${Math.floor(i / shape)}][${i % shape}]` : `[${i}]`;
    if (!(Math.abs(a[i] - e[i]) <= limit)) assert.fail(gapMessage(what, where, a[i], e[i], fig.source, limit));
  }
}

/**
 * Matrices whose columns are defined up to sign (discriminant axes of another program): each of
 * our columns is compared with the reference column times the sign that best matches, then by the
 * tolerance rule. Returns the signs used.
 */
export function assertCloseUpToColumnSign(actual: number[][], expected: Figure<number[][]>, what: string): number[] {
  const e = expected.value;
  assert.equal(actual.length, e.length, `${what}: ours has ${actual.length} rows, the reference ${e.length}`);
  const columns = e[0].length;
  const signs: number[] = [];
  for (let c = 0; c < columns; c++) {
    let dot = 0;
    for (let r = 0; r < e.length; r++) dot += actual[r][c] * e[r][c];
    signs.push(dot < 0 ? -1 : 1);
  }
  const flipped = e.map((row) => row.map((v, c) => v * signs[c]));
  assertClose(actual, { source: `${expected.source}; column signs ${signs.join(',')} applied`, value: flipped }, what);
  return signs;
}

/** Counts and confusion matrices: exactly. */
export function assertExact(actual: unknown, expected: Figure, what: string): void {
  assert.deepEqual(actual, expected.value, `${what}: ours ${JSON.stringify(actual)}, reference ${JSON.stringify(expected.value)} (${expected.source})`);
}
