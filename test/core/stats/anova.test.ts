import * as assert from 'node:assert/strict';
import { univariateAnova } from '../../../src/core/stats/anova';
import reference from '../../fixtures/stats/python-reference.json';
import { relativeClose, seededRandom } from './seededRandom';

describe('stats/anova', () => {
  // Reference: sklearn.feature_selection.f_classif (F, p) and numpy η² = 1 − SS_within/SS_total, on the
  // raw rows of R's datasets::iris / mtcars (test/fixtures/stats/generate.py). Our input is the class
  // moments numpy computed from the same rows.
  for (const set of reference.datasets) {
    it(`${set.name}: F, p and η² per feature match scikit-learn`, () => {
      const ours = univariateAnova(set.counts, Float64Array.from(set.means), Float64Array.from(set.withinDiagonal), set.p);
      assert.equal(ours.length, set.p);
      ours.forEach((t, j) => {
        assert.ok(relativeClose(t.F, set.anova.F[j], 1e-10), `${set.features[j]} F: ${t.F} vs ${set.anova.F[j]}`);
        assert.ok(relativeClose(t.p, set.anova.p[j], 1e-9), `${set.features[j]} p: ${t.p} vs ${set.anova.p[j]}`);
        assert.ok(relativeClose(t.etaSquared, set.anova.etaSquared[j], 1e-12), `${set.features[j]} η²`);
      });
    });
  }

  it('η² and F agree: η² = F·df1 / (F·df1 + df2) (property, generated moments)', () => {
    const random = seededRandom(5);
    for (let trial = 0; trial < 50; trial++) {
      const K = 2 + Math.floor(random() * 6);
      const d = 1 + Math.floor(random() * 5);
      const counts = Array.from({ length: K }, () => 2 + Math.floor(random() * 40));
      const n = counts.reduce((a, b) => a + b, 0);
      const means = Float64Array.from({ length: K * d }, () => 100 * (random() - 0.5));
      const within = Float64Array.from({ length: d }, () => n * Math.exp(6 * random() - 3));
      for (const t of univariateAnova(counts, means, within, d)) {
        const expected = (t.F * (K - 1)) / (t.F * (K - 1) + (n - K));
        assert.ok(relativeClose(t.etaSquared, expected, 1e-12));
        assert.ok(t.p >= 0 && t.p <= 1 && t.etaSquared >= 0 && t.etaSquared <= 1);
      }
    }
  });

  describe('degenerate features (never NaN)', () => {
    it('constant column: F = 0, p = 1, η² = 0, also at a large offset with rounding in the means', () => {
      // 0.1 + 1e9 is not exact in binary, so the weighted overall mean may differ from it by rounding.
      const c = 1e9 + 0.1;
      const [t] = univariateAnova([3, 7, 11], Float64Array.from([c, c, c]), Float64Array.from([0]), 1);
      assert.deepEqual(t, { F: 0, p: 1, etaSquared: 0 });
    });

    it('constant within every class but different between: F = ∞, p = 0, η² = 1', () => {
      const [t] = univariateAnova([5, 5], Float64Array.from([1, 2]), Float64Array.from([0]), 1);
      assert.deepEqual(t, { F: Infinity, p: 0, etaSquared: 1 });
    });

    it('within-class variance at rounding level of huge values counts as none', () => {
      const [t] = univariateAnova([5, 5], Float64Array.from([1e12, 1e12 + 4096]), Float64Array.from([1e-10]), 1);
      assert.equal(t.F, Infinity);
    });

    it('no difference between classes but variance within: F = 0, p = 1', () => {
      const [t] = univariateAnova([4, 6], Float64Array.from([2.5, 2.5]), Float64Array.from([3]), 1);
      assert.equal(t.F, 0);
      assert.equal(t.p, 1);
      assert.equal(t.etaSquared, 0);
    });
  });

  it('one row per class (no residual degrees of freedom): F and p NaN, η² still described', () => {
    const [t] = univariateAnova([1, 1, 1], Float64Array.from([1, 2, 4]), Float64Array.from([0]), 1);
    assert.ok(Number.isNaN(t.F) && Number.isNaN(t.p));
    assert.equal(t.etaSquared, 1);
  });

  it('rejects caller errors', () => {
    assert.throws(() => univariateAnova([5], Float64Array.from([1]), Float64Array.from([1]), 1), RangeError);
    assert.throws(() => univariateAnova([1, 0], Float64Array.from([1, 2]), Float64Array.from([1]), 1), RangeError);
    assert.throws(() => univariateAnova([3, 3], Float64Array.from([1, 2, 3]), Float64Array.from([1]), 1), RangeError);
  });
});
