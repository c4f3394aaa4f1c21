import * as assert from 'node:assert/strict';
import { hotellingLawley, multivariateTestIssue, pillai, roy, wilks } from '../../../src/core/stats/multivariate';
import reference from '../../fixtures/stats/r-manova.json';
import { relativeClose, seededRandom } from './seededRandom';

const tests = { wilks, pillai, hotellingLawley, roy } as const;
type TestName = keyof typeof tests;
const fields = ['statistic', 'F', 'df1', 'df2', 'p'] as const;

describe('stats/multivariate', () => {
  // Reference: R 4.2 stats::summary.manova on datasets::iris and datasets::mtcars, written by
  // test/fixtures/stats/generate.R. The eigenvalues fed in are the ones summary.manova computed.
  for (const set of reference.datasets) {
    describe(`against R summary.manova: ${set.name} (p = ${set.p}, K = ${set.K}, n = ${set.n})`, () => {
      for (const name of Object.keys(tests) as TestName[]) {
        it(`${name}: statistic, F, df1, df2, p within 1e-8`, () => {
          const ours = tests[name](set.eigenvalues, set.p, set.K, set.n);
          const theirs = set[name];
          for (const field of fields) {
            assert.ok(relativeClose(ours[field], theirs[field], 1e-8), `${name}.${field}: ours ${ours[field]}, R ${theirs[field]}`);
          }
        });
      }
    });
  }

  it('R reference premise: the sets cover p < K − 1, s = 1 and Rao-exact cases', () => {
    const names = reference.datasets.map((d) => d.name);
    assert.ok(reference.datasets.some((d) => d.p < d.K - 1), `sets: ${names}`);
    assert.ok(reference.datasets.some((d) => d.K === 2));
    assert.ok(reference.datasets.some((d) => d.p === 2 && d.K > 2));
  });

  describe('identities (property tests on generated eigenvalues)', () => {
    const random = seededRandom(7);
    const cases = Array.from({ length: 40 }, () => {
      const p = 1 + Math.floor(random() * 12);
      const n = 2 + p + 1 + Math.floor(random() * 300);
      const lambda = Math.exp(8 * random() - 5);
      return { p, n, lambda };
    });

    it('for K = 2 the four F statistics are equal (each is exact)', () => {
      for (const { p, n, lambda } of cases) {
        const Fs = (Object.keys(tests) as TestName[]).map((name) => tests[name]([lambda], p, 2, n));
        for (const t of Fs) {
          assert.ok(relativeClose(t.F, Fs[0].F, 1e-12), `p=${p} n=${n} λ=${lambda}: F ${Fs.map((x) => x.F)}`);
          assert.ok(relativeClose(t.p, Fs[0].p, 1e-9), `p=${p} n=${n} λ=${lambda}: p ${Fs.map((x) => x.p)}`);
          assert.equal(t.df1, p);
          assert.equal(t.df2, n - 1 - p);
        }
        // The exact two-class F is λ·(n − p − 1)/p (Hotelling's T² relation; textbook identity).
        assert.ok(relativeClose(Fs[0].F, (lambda * (n - p - 1)) / p, 1e-12));
      }
    });

    it("Wilks' Λ = Π 1/(1 + λ), Pillai's V = Σ λ/(1 + λ), Hotelling–Lawley U = Σ λ, Roy θ = max λ", () => {
      const random2 = seededRandom(11);
      for (let trial = 0; trial < 30; trial++) {
        const K = 3 + Math.floor(random2() * 8);
        const p = 1 + Math.floor(random2() * 15);
        const n = K + p + 5 + Math.floor(random2() * 200);
        const s = Math.min(p, K - 1);
        const eigen = Array.from({ length: s }, () => Math.exp(6 * random2() - 4)).sort((a, b) => b - a);
        const product = eigen.reduce((acc, l) => acc / (1 + l), 1);
        assert.ok(relativeClose(wilks(eigen, p, K, n).statistic, product, 1e-13));
        assert.ok(relativeClose(pillai(eigen, p, K, n).statistic, eigen.reduce((a, l) => a + l / (1 + l), 0), 1e-13));
        assert.ok(relativeClose(hotellingLawley(eigen, p, K, n).statistic, eigen.reduce((a, l) => a + l, 0), 1e-13));
        assert.equal(roy(eigen, p, K, n).statistic, eigen[0]);
        for (const name of Object.keys(tests) as TestName[]) {
          const t = tests[name](eigen, p, K, n);
          assert.ok(t.p >= 0 && t.p <= 1 && t.F >= 0, `${name}: ${JSON.stringify(t)}`);
        }
      }
    });

    it('larger eigenvalues never raise a p-value (monotone in each λ)', () => {
      for (const name of Object.keys(tests) as TestName[]) {
        const smaller = tests[name]([2, 0.3], 5, 4, 80);
        const larger = tests[name]([2.5, 0.3], 5, 4, 80);
        assert.ok(larger.F > smaller.F && larger.p < smaller.p, `${name}: ${smaller.p} → ${larger.p}`);
      }
    });
  });

  describe('edges', () => {
    it('missing eigenvalues count as zero and rounding negatives as zero', () => {
      for (const name of Object.keys(tests) as TestName[]) {
        const full = tests[name]([1.7, 0, 0], 4, 5, 60);
        assert.deepEqual(tests[name]([1.7], 4, 5, 60), full, name);
        assert.deepEqual(tests[name]([1.7, -3e-16], 4, 5, 60), full, name);
      }
    });

    it('no separation at all: statistic at its null value, p = 1', () => {
      assert.equal(wilks([], 3, 4, 50).statistic, 1);
      for (const name of Object.keys(tests) as TestName[]) {
        const t = tests[name]([0, 0], 3, 3, 50);
        assert.equal(t.F, 0, name);
        assert.equal(t.p, 1, name);
      }
    });

    it('perfect separation (λ = ∞): F = ∞, p = 0, no NaN', () => {
      for (const name of ['wilks', 'hotellingLawley', 'roy'] as const) {
        const t = tests[name]([Infinity, 0.4], 3, 3, 50);
        assert.equal(t.F, Infinity, name);
        assert.equal(t.p, 0, name);
      }
      assert.equal(wilks([Infinity], 3, 3, 50).statistic, 0);
      // Pillai's V is bounded by s: one infinite root adds 1, and only V = s is infinite F.
      const partly = pillai([Infinity, 0.4], 3, 3, 50);
      assert.ok(relativeClose(partly.statistic, 1 + 0.4 / 1.4, 1e-15) && Number.isFinite(partly.F) && partly.p > 0);
      const fully = pillai([Infinity, Infinity], 3, 3, 50);
      assert.equal(fully.statistic, 2);
      assert.equal(fully.F, Infinity);
      assert.equal(fully.p, 0);
    });

    it('huge eigenvalues give tiny but nonzero p where the double range allows', () => {
      const t = wilks([400, 30], 4, 3, 150);
      assert.ok(t.p > 0 && t.p < 1e-100, `p = ${t.p}`);
      assert.ok(t.statistic > 0);
    });

    it('fewer residual degrees of freedom than features: NaN F and p and a reason', () => {
      // n − K = 5 < p = 10: R's summary.manova refuses ("residuals have rank 5 < 10").
      const issue = multivariateTestIssue(10, 3, 8);
      assert.ok(issue && issue.includes('5 residual degrees of freedom') && issue.includes('10 features'), issue ?? 'null');
      assert.equal(multivariateTestIssue(4, 3, 150), null);
      for (const name of Object.keys(tests) as TestName[]) {
        const t = tests[name]([3, 1], 10, 3, 8);
        assert.ok(Number.isNaN(t.F) && Number.isNaN(t.p), name);
        assert.ok(Number.isFinite(t.statistic), name);
      }
    });

    it('one row per class, or no feature left: undefined (NaN F and p), never a throw', () => {
      assert.ok(multivariateTestIssue(2, 6, 6)?.includes('0 residual degrees of freedom'));
      assert.ok(multivariateTestIssue(0, 3, 50)?.includes('No feature'));
      for (const name of Object.keys(tests) as TestName[]) {
        for (const t of [tests[name]([1.5, 0.2], 2, 6, 6), tests[name]([], 0, 3, 50)]) {
          assert.ok(Number.isNaN(t.F) && Number.isNaN(t.p), `${name}: ${JSON.stringify(t)}`);
        }
      }
      assert.equal(wilks([], 0, 3, 50).statistic, 1);
    });

    it('with n − K = p exactly the tests are defined (Hotelling–Lawley may still lack df, as in R)', () => {
      assert.equal(multivariateTestIssue(4, 3, 7), null);
      const t = wilks([2, 0.5], 4, 3, 7);
      assert.ok(Number.isFinite(t.F) && t.p > 0 && t.p < 1);
      // HL's den df 2(s·(n − K − p − 1)/2 + 1) = 2(2·(−½) + 1) = 0 here: R's HL gives NA.
      assert.ok(Number.isNaN(hotellingLawley([2, 0.5], 4, 3, 7).p));
    });

    it('rejects caller errors', () => {
      assert.throws(() => wilks([1], 3, 1, 50), RangeError);
      assert.throws(() => wilks([], -1, 3, 50), RangeError);
      assert.throws(() => wilks([1], 3, 3, 2), RangeError);
      assert.throws(() => wilks([1, 2, 3], 2, 5, 50), RangeError);
      assert.throws(() => pillai([NaN], 2, 5, 50), RangeError);
    });
  });
});
