import * as assert from 'node:assert/strict';
import { DataError } from '../../src/core/errors';
import { FoldAssigner, foldSeed } from '../../src/core/folds';
import { uniformStream } from './numericData';

function assign(sequence: number[], k: number, seed: number): number[] {
  const assigner = new FoldAssigner(k, seed);
  return sequence.map((a) => assigner.foldOf(a));
}

describe('folds', () => {
  // Rows' classes by order of first appearance, in file order.
  const sequence = [0, 1, 0, 0, 2, 1, 0, 1, 1, 0, 2, 2, 0, 1, 0, 0, 1, 2, 0, 1, 0, 0, 1, 1];

  it('matches an independent Python implementation of the documented rule', () => {
    // Expected values printed by a 20-line Python 3 function written from the doc comment of
    // src/core/folds.ts alone (Python integers, % as the mathematical remainder), run with
    // Debian's /usr/bin/python3 on this sequence.
    assert.deepEqual(assign(sequence, 5, 1), [4, 1, 3, 2, 1, 3, 1, 2, 4, 0, 3, 2, 1, 0, 0, 4, 2, 4, 2, 0, 3, 4, 4, 3]);
    assert.deepEqual(assign(sequence, 5, 7), [0, 4, 4, 3, 4, 0, 1, 3, 1, 2, 3, 1, 4, 2, 2, 3, 4, 0, 1, 1, 0, 4, 0, 2]);
    assert.deepEqual(assign(sequence, 3, -12345678901), [2, 2, 1, 0, 1, 1, 2, 0, 0, 0, 2, 0, 1, 2, 2, 0, 1, 0, 1, 2, 2, 0, 1, 0]);
    assert.deepEqual(assign(sequence, 10, 1), [3, 6, 6, 4, 3, 2, 5, 9, 0, 1, 5, 7, 7, 8, 9, 8, 4, 2, 2, 7, 0, 8, 3, 1]);
  });

  it('seeds each class with (seed·7919 + a·104729 + 1) mod (2³¹−1), 1 instead of 0, exactly for large seeds', () => {
    assert.equal(foldSeed(1, 0), 7920);
    assert.equal(foldSeed(0, 0), 1);
    assert.equal(foldSeed(1, 2), (7919 + 2 * 104729 + 1) % 2147483647);
    // 2^52 · 7919 exceeds 2^53: the product must be exact (value from Python: (2**52*7919+1) % (2**31-1)).
    assert.equal(foldSeed(2 ** 52, 0), 1574961160);
    const m = 2147483647n;
    for (const seed of [-5, 3, 123456789]) {
      const direct = (((BigInt(seed) * 7919n + 1n) % m) + m) % m;
      assert.equal(foldSeed(seed, 0), direct === 0n ? 1 : Number(direct));
    }
  });

  it('balances strata: each fold gets floor or ceil of n_c/k rows of every class', () => {
    const u = uniformStream(3);
    for (const k of [2, 3, 5, 10]) {
      for (const seed of [1, 7, 2024]) {
        const rows = Array.from({ length: 997 }, () => Math.floor(u() ** 2 * 6)); // unequal class sizes
        const folds = assign(rows, k, seed);
        for (let a = 0; a < 6; a++) {
          const n = rows.filter((c) => c === a).length;
          const perFold = new Array<number>(k).fill(0);
          rows.forEach((c, i) => c === a && perFold[folds[i]]++);
          for (const f of perFold) assert.ok(f === Math.floor(n / k) || f === Math.ceil(n / k), `k=${k} class ${a}: ${perFold}`);
        }
        assert.ok(folds.every((f) => Number.isInteger(f) && f >= 0 && f < k));
      }
    }
  });

  it('is deterministic for a seed and differs for another seed', () => {
    const u = uniformStream(9);
    const rows = Array.from({ length: 300 }, () => Math.floor(u() * 4));
    assert.deepEqual(assign(rows, 5, 11), assign(rows, 5, 11));
    assert.notDeepEqual(assign(rows, 5, 11), assign(rows, 5, 12));
  });

  it('rejects fewer than 2 folds and a non-integer seed', () => {
    assert.throws(() => new FoldAssigner(1, 1), (e: unknown) => e instanceof DataError && e.code === 'bad-option');
    assert.throws(() => new FoldAssigner(5, 1.5), DataError);
  });
});
