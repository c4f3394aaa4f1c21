import * as assert from 'node:assert/strict';
import { cholesky } from '../../../src/core/linalg';
import { boxM, type BoxMClass, type BoxMResult } from '../../../src/core/stats/boxM';
import reference from '../../fixtures/stats/python-reference.json';
import { normalFrom, relativeClose, seededRandom } from './seededRandom';

/** Centred scatter of rows (rows × p, row-major), computed plainly from the rows. */
function scatterOf(rows: number[][], p: number): Float64Array {
  const mean = new Array<number>(p).fill(0);
  for (const r of rows) for (let j = 0; j < p; j++) mean[j] += r[j] / rows.length;
  const s = new Float64Array(p * p);
  for (const r of rows) for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) s[i * p + j] += (r[i] - mean[i]) * (r[j] - mean[j]);
  return s;
}

function computed(result: ReturnType<typeof boxM>): BoxMResult {
  if ('skipped' in result) assert.fail(`skipped: ${result.skipped}`);
  return result;
}

describe("stats/boxM", () => {
  // Reference: an independent numpy implementation written in test/fixtures/stats/generate.py straight
  // from the textbook formula (log-determinants by numpy.linalg.slogdet, p-values by scipy), on the
  // class scatters of R's datasets::iris and mtcars. iris-sepal-width (p = 1, so c2 = 0 < c1²) takes
  // the second branch of the F approximation.
  for (const set of reference.datasets) {
    it(`${set.name}: M, χ², F and p-values match the numpy reference`, () => {
      const classes = set.counts.map((count, i) => ({ count, scatter: Float64Array.from(set.scatters[i]) }));
      const ours = computed(boxM(classes, set.p));
      for (const key of ['M', 'chi2', 'df', 'p', 'F', 'df1', 'df2', 'pF'] as const) {
        assert.ok(relativeClose(ours[key], set.boxM[key], 1e-9), `${key}: ${ours[key]} vs ${set.boxM[key]}`);
      }
    });

    it(`${set.name}: given the pooled correlation's log-determinant (as the exact solver holds it), the same M`, () => {
      const { p } = set;
      const classes = set.counts.map((count, i) => ({ count, scatter: Float64Array.from(set.scatters[i]) }));
      const within = new Float64Array(p * p);
      for (const c of classes) for (let k = 0; k < p * p; k++) within[k] += c.scatter[k];
      const correlation = within.map((v, k) => v / Math.sqrt(within[Math.floor(k / p) * (p + 1)] * within[(k % p) * (p + 1)]));
      const { factor } = cholesky(correlation, p);
      let logDeterminant = 0;
      for (let q = 0; q < p; q++) logDeterminant += 2 * Math.log(factor[q * p + q]);
      const ours = computed(boxM(classes, p, logDeterminant));
      for (const key of ['M', 'chi2', 'F', 'p', 'pF'] as const) {
        assert.ok(relativeClose(ours[key], set.boxM[key], 1e-9), `${key}: ${ours[key]} vs ${set.boxM[key]}`);
      }
    });
  }

  it('fixture premise: both branches of the F approximation are covered', () => {
    assert.ok(reference.datasets.some((d) => d.boxM.c2 > d.boxM.c1 ** 2));
    assert.ok(reference.datasets.some((d) => d.boxM.c2 < d.boxM.c1 ** 2));
  });

  describe('property tests on generated data', () => {
    const normal = normalFrom(seededRandom(99));
    const p = 3;
    const counts = [12, 20, 31];
    // Each class gets its own covariance: rows = z·C_i with a class-specific mixing C_i.
    const classRows = counts.map((count, c) => {
      const mixing = Array.from({ length: p * p }, (_, k) => (k % (p + 1) === 0 ? 1 + c : 0) + 0.5 * normal());
      return Array.from({ length: count }, () => {
        const z = Array.from({ length: p }, () => normal());
        return Array.from({ length: p }, (_, j) => z.reduce((sum, zk, k) => sum + zk * mixing[k * p + j], 0) + 10 * c);
      });
    });
    const classesOf = (rows: number[][][]): BoxMClass[] => rows.map((r) => ({ count: r.length, scatter: scatterOf(r, p) }));

    it('M is unchanged by a non-singular affine map of the features', () => {
      const A = Array.from({ length: p * p }, (_, k) => (k % (p + 1) === 0 ? 3 : 0) + normal());
      const b = Array.from({ length: p }, () => 1e5 * normal());
      const mapped = classRows.map((rows) => rows.map((x) => Array.from({ length: p }, (_, i) => b[i] + x.reduce((s, xk, k) => s + A[i * p + k] * xk, 0))));
      const before = computed(boxM(classesOf(classRows), p));
      const after = computed(boxM(classesOf(mapped), p));
      assert.ok(before.M > 1, `generated classes differ in covariance: M = ${before.M}`);
      assert.ok(relativeClose(after.M, before.M, 1e-9), `${after.M} vs ${before.M}`);
      assert.ok(relativeClose(after.p, before.p, 1e-7));
    });

    it('classes with identical covariance (shifted copies of the same rows) give M = 0, p = 1', () => {
      const base = classRows[1];
      const copies = [0, 5, -40].map((shift) => base.map((x) => x.map((v) => v + shift)));
      const result = computed(boxM(classesOf(copies), p));
      assert.ok(Math.abs(result.M) < 1e-9, `M = ${result.M}`);
      assert.ok(result.p > 0.999999 && result.pF > 0.999999);
    });

    it('χ² and F approximations roughly agree (both approximate the same null distribution)', () => {
      const result = computed(boxM(classesOf(classRows), p));
      assert.equal(result.df, (3 - 1) * p * (p + 1) / 2);
      assert.ok(Math.abs(Math.log10(result.p) - Math.log10(result.pF)) < 0.5, `${result.p} vs ${result.pF}`);
    });
  });

  describe('skipped, with the reason', () => {
    it('a class with fewer than p + 1 rows', () => {
      const s = Float64Array.from([2, 0.5, 0.5, 1]);
      const result = boxM([{ count: 10, scatter: s }, { count: 2, scatter: s, label: 'cavitation' }], 2);
      assert.ok('skipped' in result && result.classIndex === 1 && result.skipped.includes('cavitation') && result.skipped.includes('3 rows'), JSON.stringify(result));
    });

    it('a feature constant within one class (that class covariance is singular)', () => {
      const singular = Float64Array.from([2, 0, 0, 0]);
      const regular = Float64Array.from([2, 0.5, 0.5, 1]);
      const result = boxM([{ count: 10, scatter: regular }, { count: 10, scatter: singular }], 2);
      assert.ok('skipped' in result && result.classIndex === 1 && result.skipped.includes('class #2'), JSON.stringify(result));
    });

    it('two features identical within a class (a dependent pair)', () => {
      const nearly = Float64Array.from([1, 1, 1, 1]);
      const regular = Float64Array.from([2, 0.5, 0.5, 1]);
      const result = boxM([{ count: 10, scatter: regular }, { count: 10, scatter: nearly }], 2);
      assert.ok('skipped' in result && result.classIndex === 1, JSON.stringify(result));
    });

    it('a feature with no variance in any class, and a single class', () => {
      const s = Float64Array.from([0, 0, 0, 1]);
      const noVariance = boxM([{ count: 10, scatter: s }, { count: 10, scatter: s }], 2);
      assert.ok('skipped' in noVariance && noVariance.skipped.includes('feature 1'), JSON.stringify(noVariance));
      const single = boxM([{ count: 10, scatter: Float64Array.from([1]) }], 1);
      assert.ok('skipped' in single);
    });
  });

  it('F beyond the range of the second-branch approximation is ∞ with pF = 0, not negative', () => {
    // p = 1 (c2 = 0 < c1²), two classes of 5 rows with variances 1 and 1e30: M exceeds Box's b.
    const result = computed(boxM([{ count: 5, scatter: Float64Array.from([4]) }, { count: 5, scatter: Float64Array.from([4e30]) }], 1));
    assert.equal(result.F, Infinity);
    assert.equal(result.pF, 0);
    assert.ok(result.p < 1e-20 && result.chi2 > 0);
  });
});
