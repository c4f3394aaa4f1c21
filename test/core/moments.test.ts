import * as assert from 'node:assert/strict';
import { DataError } from '../../src/core/errors';
import {
  betweenScatter,
  mergeMoments,
  mergeMomentsInPlace,
  MomentsAccumulator,
  momentsBuffers,
  momentsFromJSON,
  momentsToJSON,
  overallMean,
  subtractMoments,
  totalScatter,
  withinScatter,
  type Moments,
} from '../../src/core/moments';
import { simdAvailable } from '../../src/core/crossProductKernel';
import { accumulate, flatten, generateRows, referenceMoments, referenceTotalScatter, relativeDifference, type LabelledRows } from './numericData';

function assertMatchesReference(m: Moments, rows: LabelledRows, tolerance: number, subset?: number[]): void {
  const reference = referenceMoments(rows, subset);
  assert.equal(m.classes.length, reference.size);
  for (const c of m.classes) {
    const r = reference.get(c.label);
    assert.ok(r, `class ${c.label}`);
    assert.equal(c.count, r.count);
    assert.ok(relativeDifference(c.mean, r.mean) < tolerance, `mean of ${c.label}`);
    assert.ok(relativeDifference(c.scatter, flatten(r.scatter)) < tolerance, `scatter of ${c.label}: ${relativeDifference(c.scatter, flatten(r.scatter))}`);
    assert.ok(relativeDifference(c.cubic, r.cubic) < tolerance, `cubic of ${c.label}: ${relativeDifference(c.cubic, r.cubic)}`);
    assert.ok(Math.abs(c.quartic - r.quartic) / r.quartic < tolerance, `quartic of ${c.label}`);
  }
}

describe('moments', () => {
  const rows = generateRows({ seed: 11, counts: [150, 97, 203, 64], d: 7 });

  it('streams per-class count, mean, centred scatter, cubic and quartic equal to the two-pass definitions', () => {
    assertMatchesReference(accumulate(rows, 37), rows, 1e-12);
    // Batch size must not matter (blocks of 64 straddle batches differently).
    assertMatchesReference(accumulate(rows, 1), rows, 1e-12);
    assertMatchesReference(accumulate(rows, 1000), rows, 1e-12);
  });

  it('wide tables (blocks of 128 and 256 rows, d not a multiple of the kernel tile) equal the two-pass definitions', function () {
    this.timeout(30000);
    for (const [d, counts] of [[131, [700, 301]], [517, [560, 30]]] as const) {
      const wide = generateRows({ seed: 5, counts: [...counts], d });
      assertMatchesReference(accumulate(wide, 97), wide, 1e-12);
    }
  });

  it('keeps per-feature min and max and the classes in order of first appearance', () => {
    const m = accumulate(rows);
    const firstSeen: string[] = [];
    for (let r = 0; r < rows.n; r++) {
      const label = rows.labels[rows.classIds[r]];
      if (!firstSeen.includes(label)) firstSeen.push(label);
    }
    assert.deepEqual(
      m.classes.map((c) => c.label),
      firstSeen,
    );
    for (const c of m.classes) {
      const k = rows.labels.indexOf(c.label);
      for (let i = 0; i < rows.d; i++) {
        let lo = Infinity;
        let hi = -Infinity;
        for (let r = 0; r < rows.n; r++) {
          if (rows.classIds[r] !== k) continue;
          lo = Math.min(lo, rows.values[r * rows.d + i]);
          hi = Math.max(hi, rows.values[r * rows.d + i]);
        }
        assert.equal(c.min[i], lo);
        assert.equal(c.max[i], hi);
      }
    }
  });

  it('S_T = S_W + S_B: the total scatter from the moments equals the scatter of all rows', () => {
    const m = accumulate(rows);
    const direct = flatten(referenceTotalScatter(rows));
    const sum = withinScatter(m).map((v, k) => v + betweenScatter(m)[k]);
    assert.ok(relativeDifference(sum, direct) < 1e-12, `${relativeDifference(sum, direct)}`);
    assert.ok(relativeDifference(totalScatter(m), direct) < 1e-12);
    const mean = overallMean(m);
    for (let i = 0; i < rows.d; i++) {
      let s = 0;
      for (let r = 0; r < rows.n; r++) s += rows.values[r * rows.d + i];
      assert.ok(Math.abs(mean[i] - s / rows.n) < 1e-12 * (1 + Math.abs(s / rows.n)));
    }
  });

  it('merging the moments of four shards equals the moments of the whole, and subtracting a shard inverts the merge', () => {
    const shards: number[][] = [[], [], [], []];
    for (let r = 0; r < rows.n; r++) shards[(r * 7 + (r >> 3)) % 4].push(r);
    const parts = shards.map((s) => accumulate(rows, 29, s));
    const whole = accumulate(rows);
    const merged = parts.slice(1).reduce((acc, p) => mergeMoments(acc, p), parts[0]);
    const byLabel = new Map(merged.classes.map((c) => [c.label, c]));
    for (const c of whole.classes) {
      const m = byLabel.get(c.label);
      assert.ok(m);
      assert.equal(m.count, c.count);
      assert.ok(relativeDifference(m.mean, c.mean) < 1e-12);
      assert.ok(relativeDifference(m.scatter, c.scatter) < 1e-12);
      assert.ok(relativeDifference(m.cubic, c.cubic) < 1e-12);
      assert.ok(Math.abs(m.quartic - c.quartic) / c.quartic < 1e-12);
      assert.deepEqual(m.min, c.min);
      assert.deepEqual(m.max, c.max);
    }
    // Merged in place, after a transfer as between threads: the same numbers, and no copy made.
    const copies = parts.map((p) => structuredClone(p));
    const sent = copies.map((p) => structuredClone(p, { transfer: momentsBuffers(p) }));
    assert.equal(copies[0]!.classes[0]!.scatter.length, 0, 'transferred arrays are detached on the sending side');
    const firstScatter = sent[0]!.classes[0]!.scatter;
    const inPlace = sent.slice(1).reduce((acc, p) => mergeMomentsInPlace(acc, p), sent[0]!);
    assert.deepEqual(inPlace, merged);
    assert.equal(inPlace.classes[0]!.scatter, firstScatter, 'the scatter was updated in place');
    // total − shard 2 = shards 0, 1, 3 (the cross-validation training set).
    const rest = subtractMoments(merged, parts[2]);
    assertMatchesReference(rest, rows, 1e-11, [...shards[0], ...shards[1], ...shards[3]]);
  });

  it('subtracting every row of a class removes the class; a part that is not contained is a DataError', () => {
    const m = accumulate(rows);
    const onlyFirst = rows.labels[0];
    const subset = Array.from({ length: rows.n }, (_, r) => r).filter((r) => rows.labels[rows.classIds[r]] === onlyFirst);
    const part = accumulate(rows, 50, subset);
    const rest = subtractMoments(m, part);
    assert.ok(!rest.classes.some((c) => c.label === onlyFirst));
    assert.equal(rest.classes.length, m.classes.length - 1);
    assert.throws(() => subtractMoments(part, m), (e: unknown) => e instanceof DataError && e.code === 'moments-mismatch');
    const other: Moments = { features: ['x'], classes: [] };
    assert.throws(() => mergeMoments(m, other), (e: unknown) => e instanceof DataError && e.code === 'moments-mismatch');
  });

  it('is stable under a huge offset: 1e9 + small noise gives the scatter of the noise, where raw sums of squares fail', () => {
    const small = generateRows({ seed: 5, counts: [300, 300], d: 3, noise: 1e-3, separation: 1e-3 });
    const offset = 1e9;
    const shifted: LabelledRows = { ...small, values: small.values.map((v) => v + offset) };
    // Exact reference: x − 1e9 is computed exactly (Sterbenz), so centre the offset rows that way.
    const exact: LabelledRows = { ...small, values: shifted.values.map((v) => v - offset) };
    const reference = referenceMoments(exact);
    const m = accumulate(shifted);
    for (const c of m.classes) {
      const r = reference.get(c.label)!;
      const ours = relativeDifference(c.scatter, flatten(r.scatter));
      assert.ok(ours < 1e-9, `streaming scatter error ${ours}`);
      // The naive formula Σx xᵀ − n m mᵀ on the same rows.
      const d = small.d;
      const k = small.labels.indexOf(c.label);
      const sums = new Array<number>(d).fill(0);
      const squares = new Array<number>(d * d).fill(0);
      for (let t = 0; t < small.n; t++) {
        if (small.classIds[t] !== k) continue;
        for (let i = 0; i < d; i++) {
          sums[i] += shifted.values[t * d + i];
          for (let j = 0; j < d; j++) squares[i * d + j] += shifted.values[t * d + i] * shifted.values[t * d + j];
        }
      }
      const naive = squares.map((s, ij) => s - (sums[Math.floor(ij / d)] * sums[ij % d]) / c.count);
      const naiveError = relativeDifference(naive, flatten(r.scatter));
      assert.ok(naiveError > 1, `the naive formula should fail here (error ${naiveError}); otherwise this test proves nothing`);
    }
  });

  it('accepts a label dictionary that grows between calls, and result() may be called mid-stream', () => {
    const features = ['vibration_rms', 'acoustic_level_db'];
    const acc = new MomentsAccumulator(features);
    const labels = ['cavitation'];
    acc.add(Float64Array.of(1, 2, 3, 5), Int32Array.of(0, 0), 2, labels);
    const early = acc.result();
    assert.equal(early.classes[0].count, 2);
    labels.push('healthy');
    acc.add(Float64Array.of(7, 1, 2, 2, 4, 4), Int32Array.of(1, 0, 1), 3, labels);
    const m = acc.result();
    assert.deepEqual(
      m.classes.map((c) => [c.label, c.count]),
      [
        ['cavitation', 3],
        ['healthy', 2],
      ],
    );
    // cavitation rows (1,2), (3,5), (2,2): mean (2, 3); scatter by hand.
    assert.deepEqual(Array.from(m.classes[0].mean), [2, 3]);
    assert.deepEqual(Array.from(m.classes[0].scatter), [2, 3, 3, 6]);
    assert.equal(early.classes[0].count, 2, 'an earlier result is a snapshot, not a live view');
  });

  it('finish() gives exactly the moments of result(), its scatters formed in the kernel memory (shared with a receiving thread, not copied), and ends the accumulator', () => {
    for (const d of [1, 7, 12, 131]) {
      const table = generateRows({ seed: 17, counts: [140, 75, 261], d });
      const [snapshot, finished] = [new MomentsAccumulator(table.features), new MomentsAccumulator(table.features)];
      for (const acc of [snapshot, finished]) acc.add(table.values, table.classIds, table.n, table.labels);
      const expected = snapshot.result();
      const m = finished.finish();
      assert.deepEqual(
        m.classes.map((c) => ({ ...c, mean: Array.from(c.mean), scatter: Array.from(c.scatter), min: Array.from(c.min), max: Array.from(c.max), cubic: Array.from(c.cubic) })),
        expected.classes.map((c) => ({ ...c, mean: Array.from(c.mean), scatter: Array.from(c.scatter), min: Array.from(c.min), max: Array.from(c.max), cubic: Array.from(c.cubic) })),
        `d=${d}`,
      );
      if (simdAvailable()) {
        const scatter = m.classes[0]!.scatter;
        assert.ok(scatter.buffer instanceof SharedArrayBuffer, `d=${d}: the WebAssembly kernel's scatter is handed on in its shared memory`);
        const received = structuredClone(m, { transfer: momentsBuffers(m) });
        received.classes[0]!.scatter[0] = -1;
        assert.equal(scatter[0], -1, `d=${d}: a clone shares the scatter, as postMessage does`);
      }
      assert.throws(() => finished.add(table.values, table.classIds, 1, table.labels), /finished/);
    }
  });

  it('rejects a non-finite value with a DataError naming the column (at the latest when its block is flushed)', () => {
    const acc = new MomentsAccumulator(['vibration_rms', 'acoustic_level_db']);
    assert.throws(
      () => {
        acc.add(Float64Array.of(1, 2, 1, Infinity), Int32Array.of(0, 0), 2, ['healthy']);
        acc.result();
      },
      (e: unknown) => e instanceof DataError && e.code === 'non-finite-value' && e.where.column === 'acoustic_level_db',
    );
  });

  it('round-trips through JSON exactly and rejects malformed input with a DataError', () => {
    const m = accumulate(rows);
    const text = JSON.stringify(momentsToJSON(m));
    const back = momentsFromJSON(JSON.parse(text));
    assert.deepEqual(back.features, m.features);
    back.classes.forEach((c, i) => {
      const o = m.classes[i];
      assert.equal(c.label, o.label);
      assert.equal(c.count, o.count);
      assert.deepEqual(c.mean, o.mean);
      assert.deepEqual(c.scatter, o.scatter);
      assert.deepEqual(c.cubic, o.cubic);
      assert.deepEqual(c.min, o.min);
      assert.deepEqual(c.max, o.max);
      assert.equal(c.quartic, o.quartic);
    });
    const good = JSON.parse(text);
    const broken = (edit: (o: any) => void): unknown => {
      const o = JSON.parse(text);
      edit(o);
      return o;
    };
    const cases: unknown[] = [
      null,
      [],
      broken((o) => (o.format = 'other')),
      broken((o) => (o.version = 2)),
      broken((o) => (o.features = [1, 2])),
      broken((o) => (o.classes[0].count = 0)),
      broken((o) => (o.classes[0].count = 2.5)),
      broken((o) => o.classes[0].mean.pop()),
      broken((o) => (o.classes[0].mean[0] = null)),
      broken((o) => (o.classes[0].scatterUpper[0] = -1)),
      broken((o) => (o.classes[1].label = o.classes[0].label)),
      broken((o) => (o.classes[0].quartic = 'big')),
    ];
    assert.doesNotThrow(() => momentsFromJSON(good));
    for (const c of cases) assert.throws(() => momentsFromJSON(c, 'part-1.json'), (e: unknown) => e instanceof DataError && e.code === 'bad-moments' && e.message.startsWith('part-1.json'));
  });
});
