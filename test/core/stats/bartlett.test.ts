import * as assert from 'node:assert/strict';
import { bartlettSequential } from '../../../src/core/stats/bartlett';
import { wilks } from '../../../src/core/stats/multivariate';
import reference from '../../fixtures/stats/python-reference.json';
import { relativeClose, seededRandom } from './seededRandom';

describe('stats/bartlett', () => {
  // Reference: test/fixtures/stats/generate.py — eigenvalues from scipy.linalg.eigh(S_B, S_W) on R's
  // datasets::iris / mtcars, the tests written there with numpy from Bartlett's formula and
  // p-values from scipy.stats.chi2.sf (an implementation independent of ours).
  for (const set of reference.datasets) {
    it(`${set.name}: χ², df and p of every step match the numpy/scipy reference`, () => {
      const ours = bartlettSequential(set.eigenvalues, set.p, set.K, set.n);
      assert.equal(ours.length, set.bartlett.tests.length);
      set.bartlett.tests.forEach((theirs, j) => {
        assert.equal(ours[j].df, theirs.df, `step ${j} df`);
        assert.ok(relativeClose(ours[j].chi2, theirs.chi2, 1e-12), `step ${j} χ²: ${ours[j].chi2} vs ${theirs.chi2}`);
        assert.ok(relativeClose(ours[j].p, theirs.p, 1e-10), `step ${j} p: ${ours[j].p} vs ${theirs.p}`);
      });
    });
  }

  it('step 0 is −(n − 1 − (p + K)/2)·ln Λ with Wilks Λ (property, generated eigenvalues)', () => {
    const random = seededRandom(3);
    for (let trial = 0; trial < 30; trial++) {
      const K = 2 + Math.floor(random() * 9);
      const p = 1 + Math.floor(random() * 20);
      const n = K + p + 2 + Math.floor(random() * 500);
      const eigen = Array.from({ length: Math.min(p, K - 1) }, () => Math.exp(7 * random() - 5)).sort((a, b) => b - a);
      const first = bartlettSequential(eigen, p, K, n)[0];
      const expected = -(n - 1 - (p + K) / 2) * Math.log(wilks(eigen, p, K, n).statistic);
      assert.ok(relativeClose(first.chi2, expected, 1e-12), `${first.chi2} vs ${expected}`);
      assert.equal(first.df, p * (K - 1));
    }
  });

  it('steps lose significance as the leading discriminants are removed', () => {
    const steps = bartlettSequential([5, 0.8, 0.05], 6, 5, 200);
    assert.deepEqual(steps.map((t) => t.df), [24, 15, 8]);
    assert.ok(steps[0].chi2 > steps[1].chi2 && steps[1].chi2 > steps[2].chi2);
    assert.ok(steps[0].p < steps[1].p && steps[1].p < steps[2].p);
  });

  it('one entry per eigenvalue given; zero eigenvalues give χ² = 0, p = 1; λ = ∞ gives p = 0', () => {
    assert.equal(bartlettSequential([], 3, 4, 50).length, 0);
    assert.deepEqual(bartlettSequential([0], 3, 4, 50), [{ chi2: 0, df: 9, p: 1 }]);
    const infinite = bartlettSequential([Infinity, 1], 3, 4, 50);
    assert.equal(infinite[0].p, 0);
    assert.ok(infinite[1].p > 0 && infinite[1].p < 1);
  });

  it('NaN when n − K < p (more features than residual degrees of freedom)', () => {
    const steps = bartlettSequential([2, 1], 30, 3, 10);
    assert.ok(steps.every((t) => Number.isNaN(t.chi2) && Number.isNaN(t.p)));
    assert.deepEqual(steps.map((t) => t.df), [60, 29]);
  });
});
