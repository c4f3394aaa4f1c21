/**
 * Moments from the SQL query's result (momentsIO.ts): the shifted raw sums the query returns,
 * computed here straight from generated rows as the query defines them, must turn into the same
 * centred moments as the streaming accumulator builds from the rows; blocks of one statement set
 * combine, shards merge, and bad tables fail with a DataError naming the file, line and column.
 * The live runs of the query on DuckDB and PostgreSQL are in test/reference/scriptsSql.test.ts.
 */
import * as assert from 'node:assert/strict';
import { DataError } from '../../src/core/errors';
import { MomentsAccumulator, momentsToJSON, type Moments } from '../../src/core/moments';
import { momentsFromQueryResults, readMomentsInputs, type MomentsInput } from '../../src/core/momentsIO';
import { momentsQueryStatements } from '../../src/core/scripts/sql';

/** Park–Miller generator; invented data for a property test. */
function random(seed: number): () => number {
  let x = seed;
  return () => (x = (48271 * x) % 2147483647) / 2147483647;
}

interface Rows {
  labels: string[];
  values: number[][];
}

/** Rows of 3 classes, d features, far from the origin (offset) so cancellation would show. */
function generatedRows(count: number, d: number, offset: number, seed: number): Rows {
  const next = random(seed);
  const classes = ['a "quoted" class', 'b,comma', 'c'];
  const labels: string[] = [];
  const values: number[][] = [];
  for (let t = 0; t < count; t++) {
    const c = Math.floor(next() * 3);
    labels.push(classes[c]!);
    values.push(Array.from({ length: d }, (_, j) => offset + c * (j + 1) + (next() - 0.5) * (1 + j) + 0.3 * (next() - 0.5)));
  }
  return { labels, values };
}

function accumulate(rows: Rows, features: string[]): Moments {
  const d = features.length;
  const dictionary = [...new Set(rows.labels)];
  const accumulator = new MomentsAccumulator(features);
  const values = Float64Array.from(rows.values.flat());
  const ids = Int32Array.from(rows.labels.map((l) => dictionary.indexOf(l)));
  accumulator.add(values, ids, rows.labels.length, dictionary);
  assert.equal(values.length, rows.labels.length * d);
  return accumulator.result();
}

const csvCell = (text: string) => (/[",\n\r]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text);

/**
 * What the query returns, computed the way its SQL says (sums over rows of y = x − shift), as CSV
 * with only the named statistic columns (all when `columns` is omitted).
 */
function queryResult(rows: Rows, features: string[], shifts: number[], columns?: (name: string) => boolean): string {
  const d = features.length;
  const byClass = new Map<string, number[][]>();
  rows.labels.forEach((label, t) => {
    if (!byClass.has(label)) byClass.set(label, []);
    byClass.get(label)!.push(rows.values[t]!);
  });
  const header: string[] = ['label', 'n', 'label_column'];
  features.forEach((_, j) => header.push(`feature_${j}`, `shift_${j}`));
  features.forEach((_, j) => header.push(`sum_${j}`, `min_${j}`, `max_${j}`, `cubic_${j}`));
  header.push('quartic');
  for (let i = 0; i < d; i++) for (let j = i; j < d; j++) header.push(`cross_${i}_${j}`);
  const keep = header.filter((h) => h === 'label' || h === 'n' || (columns ? columns(h) : true));
  const lines = [keep.join(',')];
  for (const [label, xs] of [...byClass.entries()].sort()) {
    const cells = new Map<string, string>([['label', csvCell(label)], ['n', String(xs.length)], ['label_column', 'fault']]);
    const ys = xs.map((x) => x.map((v, j) => v - shifts[j]!));
    features.forEach((name, j) => {
      cells.set(`feature_${j}`, csvCell(name));
      cells.set(`shift_${j}`, String(shifts[j]));
      cells.set(`sum_${j}`, String(ys.reduce((s, y) => s + y[j]!, 0)));
      cells.set(`min_${j}`, String(Math.min(...xs.map((x) => x[j]!))));
      cells.set(`max_${j}`, String(Math.max(...xs.map((x) => x[j]!))));
      cells.set(`cubic_${j}`, String(ys.reduce((s, y) => s + y.reduce((q, v) => q + v * v, 0) * y[j]!, 0)));
    });
    cells.set('quartic', String(ys.reduce((s, y) => s + y.reduce((q, v) => q + v * v, 0) ** 2, 0)));
    for (let i = 0; i < d; i++) for (let j = i; j < d; j++) cells.set(`cross_${i}_${j}`, String(ys.reduce((s, y) => s + y[i]! * y[j]!, 0)));
    lines.push(keep.map((h) => cells.get(h)!).join(','));
  }
  return lines.join('\n') + '\n';
}

/** Largest |a − b| over a pair of arrays, relative to the largest |b|. */
function relativeError(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let worst = 0;
  let scale = 0;
  for (let i = 0; i < b.length; i++) {
    worst = Math.max(worst, Math.abs(a[i]! - b[i]!));
    scale = Math.max(scale, Math.abs(b[i]!));
  }
  return scale === 0 ? worst : worst / scale;
}

function assertSameMoments(actual: Moments, expected: Moments, tolerance: number): void {
  assert.deepEqual(actual.features, expected.features);
  const byLabel = new Map(actual.classes.map((c) => [c.label, c]));
  assert.equal(actual.classes.length, expected.classes.length);
  for (const e of expected.classes) {
    const a = byLabel.get(e.label);
    assert.ok(a, `class ${e.label} missing`);
    assert.equal(a.count, e.count);
    assert.ok(relativeError(a.mean, e.mean) < tolerance, `mean of ${e.label}: ${relativeError(a.mean, e.mean)}`);
    assert.ok(relativeError(a.scatter, e.scatter) < tolerance, `scatter of ${e.label}: ${relativeError(a.scatter, e.scatter)}`);
    assert.ok(relativeError(a.cubic, e.cubic) < tolerance, `cubic of ${e.label}: ${relativeError(a.cubic, e.cubic)}`);
    assert.ok(relativeError([a.quartic], [e.quartic]) < tolerance, `quartic of ${e.label}`);
    assert.deepEqual(Array.from(a.min), Array.from(e.min));
    assert.deepEqual(Array.from(a.max), Array.from(e.max));
  }
}

describe('moments from the SQL query result', () => {
  const features = ['rms velocity', 'kurtosis "peak"', 'line\nbreak', 'Ünïcødé'];
  const rows = generatedRows(900, features.length, 1000, 11);
  const whole = accumulate(rows, features);
  // Shifts near the overall mean, rounded as the query generator rounds them.
  const shifts = features.map((_, j) => Number((rows.values.reduce((s, x) => s + x[j]!, 0) / rows.values.length).toPrecision(6)));

  it('centres the shifted sums exactly as the streaming accumulator does', () => {
    const [part] = momentsFromQueryResults([{ name: 'result.csv', text: queryResult(rows, features, shifts) }]);
    assert.equal(part!.label, 'fault');
    assertSameMoments(part!.moments, whole, 1e-11);
  });

  it('combines the results of several statements (blocks of cross-products) into one part', () => {
    const first = queryResult(rows, features, shifts, (h) => !h.startsWith('cross_') || h < 'cross_1');
    const second = queryResult(rows, features, shifts, (h) => h.startsWith('cross_') && h >= 'cross_1' && h < 'cross_2');
    const third = queryResult(rows, features, shifts, (h) => h.startsWith('cross_') && h >= 'cross_2');
    const parts = momentsFromQueryResults([
      { name: 'part-1.csv', text: first },
      { name: 'part-2.csv', text: second },
      { name: 'part-3.csv', text: third },
    ]);
    assert.equal(parts.length, 1);
    assertSameMoments(parts[0]!.moments, whole, 1e-11);
  });

  it('merges shards (SQL results and JSON parts mixed) into the moments of the whole', () => {
    const quarter = Math.ceil(rows.labels.length / 4);
    const shard = (i: number): Rows => ({ labels: rows.labels.slice(i * quarter, (i + 1) * quarter), values: rows.values.slice(i * quarter, (i + 1) * quarter) });
    const inputs: MomentsInput[] = [
      { name: 'shard-0.csv', text: queryResult(shard(0), features, shifts) },
      { name: 'shard-1.json', text: JSON.stringify({ ...momentsToJSON(accumulate(shard(1), features)), label: 'fault' }) },
      { name: 'shard-2.csv', text: queryResult(shard(2), features, shifts.map((s) => s + 3)) },
      { name: 'shard-3.json', text: JSON.stringify(momentsToJSON(accumulate(shard(3), features))) },
    ];
    const merged = readMomentsInputs(inputs);
    assert.equal(merged.label, 'fault');
    assertSameMoments(merged.moments, whole, 1e-11);
  });

  it('keeps the precision a raw (unshifted) sum of squares would lose', () => {
    // Rows near 1e7 with spread ~1: Σx² − n·m² in doubles loses about 14 of 16 digits; the shifted
    // sums do not. The check that it can fail: the same algebra with shift 0 is far off.
    const far = generatedRows(500, 2, 1e7, 5);
    const names = ['a', 'b'];
    const exact = accumulate(far, names);
    const near = far.values[0]!.map((v) => Number(v.toPrecision(6)));
    const shifted = momentsFromQueryResults([{ name: 'near.csv', text: queryResult(far, names, near) }])[0]!.moments;
    assertSameMoments(shifted, exact, 1e-9);
    const raw = momentsFromQueryResults([{ name: 'raw.csv', text: queryResult(far, names, [0, 0]) }])[0]!.moments;
    const c = exact.classes[0]!;
    const r = raw.classes.find((x) => x.label === c.label)!;
    assert.ok(relativeError(r.scatter, c.scatter) > 1e-6, 'an unshifted sum of squares should lose precision here');
  });

  it('names the file, line and column of a bad table', () => {
    // The last cell of the last class row; each row spans two lines (a feature name holds a line break).
    const text = queryResult(rows, features, shifts).replace(/,[^,\n]*\n$/, ',oops\n');
    const lines = text.split('\n').length - 1;
    assert.throws(
      () => momentsFromQueryResults([{ name: 'bad.csv', text }]),
      (e: unknown) => e instanceof DataError && e.where.file === 'bad.csv' && e.where.line === lines - 1 && e.where.column === 'cross_3_3',
    );
    const missing = queryResult(rows, features, shifts, (h) => h !== 'cross_0_1');
    assert.throws(
      () => momentsFromQueryResults([{ name: 'short.csv', text: missing }]),
      (e: unknown) => e instanceof DataError && /cross_0_1/.test(e.message),
    );
    const first = queryResult(rows, features, shifts, (h) => !h.startsWith('cross_') || h < 'cross_1');
    const duplicated = queryResult(rows, features, shifts, (h) => h === 'sum_0' || (h.startsWith('cross_') && h >= 'cross_1'));
    assert.throws(
      () => momentsFromQueryResults([{ name: 'a.csv', text: first }, { name: 'b.csv', text: duplicated }]),
      (e: unknown) => e instanceof DataError && e.where.column === 'sum_0',
    );
    const other = generatedRows(300, features.length, 1000, 99);
    const second = queryResult(other, features, shifts, (h) => h.startsWith('cross_') && h >= 'cross_1');
    assert.throws(
      () => momentsFromQueryResults([{ name: 'a.csv', text: first }, { name: 'b.csv', text: second }]),
      (e: unknown) => e instanceof DataError && e.where.file === 'b.csv' && /did not read the same rows/.test(e.message),
    );
  });
});

describe('SQL moments statements', () => {
  it('splits a wide table into statements that name every cross-product once', () => {
    const d = 30;
    const features = Array.from({ length: d }, (_, j) => `f${j}`);
    const statements = momentsQueryStatements({ dialect: 'duckdb', table: 't', label: 'y', features, shifts: features.map(() => 0), maxAggregates: 100, provenance: ['test'] });
    assert.ok(statements.length > 1);
    const seen = new Map<string, number>();
    for (const statement of statements) {
      const aggregates = (statement.match(/\b(SUM|MIN|MAX|COUNT)\(/g) ?? []).length;
      assert.ok(aggregates <= 100, `${aggregates} aggregates in one statement`);
      for (const match of statement.matchAll(/AS "(cross_\d+_\d+)"/g)) seen.set(match[1]!, (seen.get(match[1]!) ?? 0) + 1);
    }
    assert.equal(seen.size, (d * (d + 1)) / 2);
    assert.ok([...seen.values()].every((count) => count === 1));
    for (const name of ['quartic', ...features.flatMap((_, j) => [`sum_${j}`, `min_${j}`, `max_${j}`, `cubic_${j}`])]) {
      assert.equal(statements.filter((s) => s.includes(`AS "${name}"`)).length, 1, name);
    }
    assert.match(statements[0]!, /"feature_29"/);
    assert.ok(statements.slice(1).every((s) => !s.includes('"feature_0"')));
  });
});
