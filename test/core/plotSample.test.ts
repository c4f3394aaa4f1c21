import { strict as assert } from 'node:assert';
import { allocatePlotQuota, PlotSampler } from '../../src/core/plotSample';

/** A seeded generator for class sequences (Park–Miller), so the property test is repeatable. */
function generator(seed: number): () => number {
  let x = seed;
  return () => {
    x = (48271 * x) % 2147483647;
    return x / 2147483647;
  };
}

describe('plot sample', () => {
  it('takes every row when they fit the budget', () => {
    assert.deepEqual(allocatePlotQuota([3, 5, 2], 10), [3, 5, 2]);
  });

  it('fills the budget exactly, keeps small classes visible and never exceeds a class', () => {
    const random = generator(7);
    for (let trial = 0; trial < 300; trial++) {
      const K = 2 + Math.floor(random() * 6);
      const counts = Array.from({ length: K }, () => 1 + Math.floor(random() ** 3 * 5000));
      const total = counts.reduce((a, b) => a + b, 0);
      const budget = 1 + Math.floor(random() * total * 1.2);
      const quota = allocatePlotQuota(counts, budget);
      assert.equal(quota.reduce((a, b) => a + b, 0), Math.min(budget, total), `trial ${trial}`);
      const floor = Math.floor(budget / (2 * K));
      quota.forEach((q, c) => {
        assert.ok(q <= counts[c]!, 'at most the class size');
        assert.ok(q >= Math.min(counts[c]!, floor), 'the guaranteed share of a small class');
      });
    }
  });

  it('draws exactly the quota of each class, spread through the file, identically on a second run', () => {
    const random = generator(11);
    const classes = Array.from({ length: 20000 }, () => (random() < 0.9 ? 0 : random() < 0.8 ? 1 : 2));
    const counts = [0, 0, 0];
    for (const c of classes) counts[c]! += 1;
    const quota = allocatePlotQuota(counts, 1000);
    const draw = (): number[] => {
      const sampler = new PlotSampler(counts, quota);
      const rows: number[] = [];
      classes.forEach((c, row) => {
        if (sampler.take(c)) rows.push(row);
      });
      return rows;
    };
    const first = draw();
    assert.deepEqual(draw(), first);
    const drawn = [0, 0, 0];
    for (const row of first) drawn[classes[row]!]! += 1;
    assert.deepEqual(drawn, quota);
    // Systematic sampling: the class-0 rows of the first half of the file hold about half its quota.
    const firstHalf = first.filter((row) => row < classes.length / 2 && classes[row] === 0).length;
    assert.ok(Math.abs(firstHalf - quota[0]! / 2) <= 0.05 * quota[0]!, `${firstHalf} of ${quota[0]}`);
  });

  it('takes row j of a class exactly when ⌊(j+1)q/n⌋ > ⌊jq/n⌋, past 2³¹ for j·q, and a sampler started at a later row continues the same draw', () => {
    // Systematic sampling's rule, written out with BigInt (exact whatever the size).
    const n = 3_000_000;
    const q = 4_999;
    const rule = (j: number): boolean => (BigInt(j + 1) * BigInt(q)) / BigInt(n) > (BigInt(j) * BigInt(q)) / BigInt(n);
    const whole = new PlotSampler([n], [q]);
    const split = 2_500_001; // j·q ≈ 1.25e10 from here on
    let later: PlotSampler | null = null;
    let taken = 0;
    for (let j = 0; j < n; j++) {
      if (j === split) later = new PlotSampler([n], [q], [split]);
      const take = whole.take(0);
      if (take) taken++;
      if (later) assert.equal(later.take(0), take, `row ${j}: the later sampler`);
      if (j % 997 === 0 || take) assert.equal(take, rule(j), `row ${j}`);
    }
    assert.equal(taken, q);
  });
});
