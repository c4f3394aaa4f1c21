import * as assert from 'node:assert/strict';
import { CholeskyDecomposition, EigenvalueDecomposition, inverse, Matrix } from 'ml-matrix';
import { DataError } from '../../src/core/errors';
import { scoreRow, solveLda, sortLabels, type LdaOptions, type LdaSolution } from '../../src/core/lda';
import { betweenScatter, withinScatter, type Moments } from '../../src/core/moments';
import { accumulate, generateRows, normalStream, referenceMoments, relativeDifference, withColumn, type LabelledRows } from './numericData';

const EXACT: LdaOptions = { solver: 'exact', priors: 'empirical' };
const SHRINKAGE: LdaOptions = { solver: 'shrinkage', priors: 'empirical' };

/** Submatrix of a d × d row-major matrix at the kept indices. */
function restrict(a: Float64Array, d: number, kept: number[]): Float64Array {
  const r = kept.length;
  const out = new Float64Array(r * r);
  for (let i = 0; i < r; i++) for (let j = 0; j < r; j++) out[i * r + j] = a[kept[i] * d + kept[j]];
  return out;
}

function toMatrix(a: Float64Array, n: number): Matrix {
  return new Matrix(Array.from({ length: n }, (_, i) => Array.from(a.subarray(i * n, (i + 1) * n))));
}

/** Independent dense route with ml-matrix: eigenvalues of L⁻¹ S_B L⁻ᵀ, S_W = L Lᵀ, descending. */
function denseGeneralizedEigenvalues(sw: Float64Array, sb: Float64Array, n: number): number[] {
  const l = new CholeskyDecomposition(toMatrix(sw, n)).lowerTriangularMatrix;
  const li = inverse(l);
  const c = li.mmul(toMatrix(sb, n)).mmul(li.transpose());
  const symmetric = c.add(c.transpose()).mul(0.5);
  return new EigenvalueDecomposition(symmetric, { assumeSymmetric: true }).realEigenvalues.sort((a, b) => b - a);
}

/** Scores of every row. */
function scoresOf(s: LdaSolution, rows: LabelledRows): Float64Array[] {
  const k = s.eigenvalues.length;
  return Array.from({ length: rows.n }, (_, r) => {
    const out = new Float64Array(k);
    scoreRow(s, rows.values.subarray(r * rows.d, (r + 1) * rows.d), out);
    return out;
  });
}

/** Pooled within-class covariance of the scores, divisor n − K. */
function pooledScoreCovariance(s: LdaSolution, rows: LabelledRows): Float64Array {
  const k = s.eigenvalues.length;
  const scores = scoresOf(s, rows);
  const K = rows.labels.length;
  const means = Array.from({ length: K }, () => new Float64Array(k));
  const counts = new Array<number>(K).fill(0);
  scores.forEach((z, r) => {
    counts[rows.classIds[r]]++;
    for (let j = 0; j < k; j++) means[rows.classIds[r]][j] += z[j];
  });
  means.forEach((m, c) => m.forEach((_, j) => (m[j] /= counts[c])));
  const cov = new Float64Array(k * k);
  scores.forEach((z, r) => {
    const m = means[rows.classIds[r]];
    for (let a = 0; a < k; a++) for (let b = 0; b < k; b++) cov[a * k + b] += (z[a] - m[a]) * (z[b] - m[b]);
  });
  return cov.map((v) => v / (rows.n - K));
}

function identity(k: number): Float64Array {
  return Float64Array.from({ length: k * k }, (_, i) => (i % (k + 1) === 0 ? 1 : 0));
}

function maxAbsDifference(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i]));
  return m;
}

describe('lda', () => {
  const rows = generateRows({ seed: 42, counts: [80, 65, 120, 45], d: 6 });
  const moments = accumulate(rows);

  for (const options of [EXACT, SHRINKAGE]) {
    describe(`solver ${options.solver}`, () => {
      const s = solveLda(moments, options);

      it('satisfies S_B w = λ S_W w for each direction, with wᵀ S_W w = n − K (S_W as solved)', () => {
        const r = s.kept.length;
        const k = s.eigenvalues.length;
        assert.equal(k, 3);
        for (let j = 0; j < k; j++) {
          const w = Float64Array.from({ length: r }, (_, q) => s.directions[q * k + j]);
          const bw = new Float64Array(r);
          const ww = new Float64Array(r);
          for (let a = 0; a < r; a++) {
            for (let b = 0; b < r; b++) {
              bw[a] += s.betweenScatter[a * r + b] * w[b];
              ww[a] += s.withinScatter[a * r + b] * w[b];
            }
          }
          assert.ok(relativeDifference(bw, ww.map((v) => v * s.eigenvalues[j])) < 1e-12, `axis ${j}`);
          const quadratic = w.reduce((sum, v, a) => sum + v * ww[a], 0);
          assert.ok(Math.abs(quadratic - (s.n - s.labels.length)) < 1e-9 * s.n);
        }
      });

      it('has eigenvalues equal to a dense generalized eigensolve with ml-matrix, explained ratios summing to 1', () => {
        const r = s.kept.length;
        const dense = denseGeneralizedEigenvalues(s.withinScatter, s.betweenScatter, r).slice(0, s.eigenvalues.length);
        assert.ok(relativeDifference(s.eigenvalues, dense) < 1e-11, `${Array.from(s.eigenvalues)} vs ${dense}`);
        assert.ok(Math.abs(s.explainedRatio.reduce((a, b) => a + b, 0) - 1) < 1e-15);
        for (let j = 0; j < s.eigenvalues.length; j++) {
          assert.ok(Math.abs(s.canonicalCorrelations[j] - Math.sqrt(s.eigenvalues[j] / (1 + s.eigenvalues[j]))) < 1e-15);
        }
      });

      it('gives centroids equal to the class means of the row scores, and standardized coefficients w·√(S_W,ii/(n − K))', () => {
        const k = s.eigenvalues.length;
        const scores = scoresOf(s, rows);
        s.labels.forEach((label, c) => {
          const id = rows.labels.indexOf(label);
          const members = scores.filter((_, r) => rows.classIds[r] === id);
          for (let j = 0; j < k; j++) {
            const mean = members.reduce((sum, z) => sum + z[j], 0) / members.length;
            assert.ok(Math.abs(mean - s.centroids[c * k + j]) < 1e-10);
          }
        });
        const r = s.kept.length;
        const degrees = s.n - s.labels.length;
        for (let q = 0; q < r; q++) {
          for (let j = 0; j < k; j++) {
            const expected = s.directions[q * k + j] * Math.sqrt(s.withinScatter[q * r + q] / degrees);
            assert.ok(Math.abs(expected - s.standardizedCoefficients[q * k + j]) < 1e-12 * (1 + Math.abs(expected)));
          }
        }
      });

      it('applies the sign rule: the largest |standardized coefficient| on each axis is positive', () => {
        const k = s.eigenvalues.length;
        for (let j = 0; j < k; j++) {
          let best = 0;
          for (let q = 1; q < s.kept.length; q++) {
            if (Math.abs(s.standardizedCoefficients[q * k + j]) > Math.abs(s.standardizedCoefficients[best * k + j])) best = q;
          }
          assert.ok(s.standardizedCoefficients[best * k + j] > 0);
        }
      });
    });
  }

  it('exact: the scores have pooled within-class covariance I (divisor n − K), and structure = pooled within-class correlations', () => {
    const s = solveLda(moments, EXACT);
    const k = s.eigenvalues.length;
    assert.ok(maxAbsDifference(pooledScoreCovariance(s, rows), identity(k)) < 1e-12);
    // Structure: correlation of feature q and score j, both centred at their class means, pooled.
    const scores = scoresOf(s, rows);
    const reference = referenceMoments(rows);
    const d = rows.d;
    for (let q = 0; q < s.kept.length; q++) {
      const f = s.kept[q];
      for (let j = 0; j < k; j++) {
        let sxy = 0;
        let sxx = 0;
        let syy = 0;
        const scoreMeans = new Map<number, number>();
        for (const [label] of reference) {
          const id = rows.labels.indexOf(label);
          const member = scores.filter((_, r) => rows.classIds[r] === id);
          scoreMeans.set(id, member.reduce((a, z) => a + z[j], 0) / member.length);
        }
        for (let r = 0; r < rows.n; r++) {
          const id = rows.classIds[r];
          const x = rows.values[r * d + f] - reference.get(rows.labels[id])!.mean[f];
          const y = scores[r][j] - scoreMeans.get(id)!;
          sxy += x * y;
          sxx += x * x;
          syy += y * y;
        }
        assert.ok(Math.abs(sxy / Math.sqrt(sxx * syy) - s.structure[q * k + j]) < 1e-10);
      }
    }
  });

  it('S_W and S_B of the solution are those of the moments, the classes sorted', () => {
    const s = solveLda(moments, EXACT);
    const d = rows.d;
    assert.deepEqual(s.labels, sortLabels(rows.labels));
    assert.ok(relativeDifference(s.withinScatter, restrict(withinScatter(moments), d, s.kept)) < 1e-15);
    assert.ok(relativeDifference(s.betweenScatter, restrict(betweenScatter(moments), d, s.kept)) < 1e-12);
    assert.deepEqual(
      s.classCounts,
      s.labels.map((l) => moments.classes.find((c) => c.label === l)!.count),
    );
    const uniform = solveLda(moments, { solver: 'exact', priors: 'uniform' });
    assert.deepEqual(Array.from(uniform.priors), [0.25, 0.25, 0.25, 0.25]);
    assert.deepEqual(uniform.eigenvalues, s.eigenvalues, 'priors affect classification only');
    assert.ok(Math.abs(s.priors[0] - s.classCounts[0] / s.n) < 1e-16);
  });

  it('eigenvalues are invariant under a non-singular affine transform of the features', () => {
    const d = rows.d;
    const draw = normalStream(99);
    const a = Float64Array.from({ length: d * d }, (_, k) => (k % (d + 1) === 0 ? 3 : 0) + draw());
    const b = Float64Array.from({ length: d }, () => 1000 * draw());
    const transformed: LabelledRows = { ...rows, values: new Float64Array(rows.n * d) };
    for (let r = 0; r < rows.n; r++) {
      for (let i = 0; i < d; i++) {
        let s = b[i];
        for (let j = 0; j < d; j++) s += a[i * d + j] * rows.values[r * d + j];
        transformed.values[r * d + i] = s;
      }
    }
    const before = solveLda(moments, EXACT);
    const after = solveLda(accumulate(transformed), EXACT);
    assert.ok(relativeDifference(after.eigenvalues, before.eigenvalues) < 1e-10);
    // The scores themselves are the same up to the sign of each axis.
    const k = before.eigenvalues.length;
    const z1 = scoresOf(before, rows);
    const z2 = scoresOf(after, transformed);
    for (let j = 0; j < k; j++) {
      const sign = Math.sign(z1[0][j]) * Math.sign(z2[0][j]);
      for (let r = 0; r < rows.n; r += 17) assert.ok(Math.abs(z1[r][j] - sign * z2[r][j]) < 1e-8 * (1 + Math.abs(z1[r][j])));
    }
  });

  it('a huge common offset (1e9) changes nothing', () => {
    const shifted: LabelledRows = { ...rows, values: rows.values.map((v) => v + 1e9) };
    const a = solveLda(moments, EXACT);
    const b = solveLda(accumulate(shifted), EXACT);
    assert.ok(relativeDifference(b.eigenvalues, a.eigenvalues) < 1e-6, `${relativeDifference(b.eigenvalues, a.eigenvalues)}`);
  });

  describe('degenerate columns are found, named and projected out', () => {
    const base = solveLda(moments, EXACT);
    const cases: { name: string; rows: LabelledRows; reason: string; combination?: [string, number][] }[] = [
      { name: 'a duplicated column', rows: withColumn(rows, 'vibration_rms_copy', (x) => x[0]), reason: 'duplicate', combination: [['vibration_rms', 1]] },
      { name: 'a constant column', rows: withColumn(rows, 'pump_model', () => 7.5), reason: 'constant' },
      { name: 'a column constant within every class', rows: withColumn(rows, 'fault_code', (_, c) => 10 * c + 1), reason: 'constant-within-classes' },
      {
        name: 'a linear combination of two columns',
        rows: withColumn(rows, 'combined', (x) => 2 * x[1] - x[3] + 5),
        reason: 'dependent',
        combination: [
          ['vibration_peak', 2],
          ['acoustic_level_db', -1],
        ],
      },
    ];
    for (const c of cases) {
      it(`${c.name}: eigenvalues unchanged, reason "${c.reason}"`, () => {
        const s = solveLda(accumulate(c.rows), EXACT);
        assert.ok(relativeDifference(s.eigenvalues, base.eigenvalues) < 1e-9, `${Array.from(s.eigenvalues)} vs ${Array.from(base.eigenvalues)}`);
        assert.equal(s.removed.length, 1);
        const removed = s.removed[0];
        assert.equal(removed.reason, c.reason);
        // Of a dependent group the later column is the one set aside, named by the earlier ones.
        assert.equal(removed.feature, c.rows.features[c.rows.d - 1]);
        if (c.combination) {
          const got = removed.combination!.map((t) => [t.feature, t.coefficient] as [string, number]);
          assert.equal(got.length, c.combination.length);
          got.forEach(([f, v], i) => {
            assert.equal(f, c.combination![i][0]);
            assert.ok(Math.abs(v - c.combination![i][1]) < 1e-9);
          });
        } else {
          assert.equal(removed.combination, undefined);
        }
        if (c.reason === 'constant-within-classes') assert.ok(s.warnings.some((w) => w.code === 'perfect-separation'));
        for (const v of [...s.eigenvalues, ...s.directions, s.conditionNumber]) assert.ok(Number.isFinite(v));
      });
    }

    it('a combination constant within classes but not between them is named and flagged as perfect separation', () => {
      const leaky = withColumn(rows, 'maintenance_score', (x, c) => x[1] - 3 * x[4] + 4 * c);
      const s = solveLda(accumulate(leaky), EXACT);
      assert.ok(relativeDifference(s.eigenvalues, base.eigenvalues) < 1e-9);
      assert.equal(s.removed[0].feature, 'maintenance_score');
      const warning = s.warnings.find((w) => w.code === 'perfect-separation');
      assert.ok(warning && warning.message.includes('maintenance_score = vibration_peak − 3·suction_pressure_bar'.replace('suction_pressure_bar', leaky.features[4])), warning?.message);
    });

    it('exact on data whose within-class scatter is singular for want of rows answers with a warning', () => {
      const thin = generateRows({ seed: 4, counts: [6, 5, 7], d: 25 });
      const s = solveLda(accumulate(thin), EXACT);
      assert.equal(s.solver, 'exact');
      assert.ok(s.warnings.some((w) => w.code === 'singular-within-scatter'));
      assert.ok(s.kept.length <= 18 - 3);
      for (const v of [...s.eigenvalues, ...s.directions]) assert.ok(Number.isFinite(v));
    });
  });

  describe('shrinkage', () => {
    it('d > n: finite results with solver shrinkage and a warning; auto chooses shrinkage and says why', () => {
      const wide = generateRows({ seed: 8, counts: [10, 12, 9], d: 60 });
      const m = accumulate(wide);
      const s = solveLda(m, SHRINKAGE);
      assert.equal(s.solver, 'shrinkage');
      assert.ok(s.shrinkage > 0 && s.shrinkage <= 1);
      assert.equal(s.kept.length, 60);
      assert.ok(s.warnings.some((w) => w.code === 'more-features-than-rows'));
      for (const v of [...s.eigenvalues, ...s.directions, ...s.structure, ...s.centroids, s.conditionNumber]) assert.ok(Number.isFinite(v));
      assert.ok(Math.abs(s.explainedRatio.reduce((a, b) => a + b, 0) - 1) < 1e-15);
      const auto = solveLda(m, { solver: 'auto', priors: 'empirical' });
      assert.equal(auto.solver, 'shrinkage');
      const why = auto.warnings.find((w) => w.code === 'shrinkage-used');
      assert.ok(why && /d approaches or exceeds n/.test(why.message));
    });

    it('auto picks exact on well-conditioned data with enough rows', () => {
      const s = solveLda(moments, { solver: 'auto', priors: 'empirical' });
      assert.equal(s.solver, 'exact');
      assert.equal(s.shrinkage, 0);
      assert.ok(!s.warnings.some((w) => w.code === 'shrinkage-used'));
    });

    it('intensity and shrunk within scatter equal the Ledoit–Wolf formula computed from the raw within-class-centred rows', () => {
      for (const data of [rows, generateRows({ seed: 12, counts: [15, 11, 14], d: 30 })]) {
        const s = solveLda(accumulate(data), SHRINKAGE);
        // Straightforward implementation over rows: Z = rows centred by class means, S = ZᵀZ/n.
        const { n, d } = data;
        const reference = referenceMoments(data);
        const z = Array.from({ length: n }, (_, r) => {
          const mean = reference.get(data.labels[data.classIds[r]])!.mean;
          return Array.from({ length: d }, (_, i) => data.values[r * d + i] - mean[i]);
        });
        const cov = Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => z.reduce((sum, row) => sum + row[i] * row[j], 0) / n));
        const mu = cov.reduce((t, row, i) => t + row[i], 0) / d;
        let delta = 0;
        let frobenius = 0;
        for (let i = 0; i < d; i++) {
          for (let j = 0; j < d; j++) {
            delta += (cov[i][j] - (i === j ? mu : 0)) ** 2;
            frobenius += cov[i][j] ** 2;
          }
        }
        delta /= d;
        let beta = 0;
        for (const row of z) {
          // ‖z zᵀ − S‖²_F summed over rows, divided by n²: Ledoit & Wolf's b̄² (Lemma 3.2).
          let term = 0;
          for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) term += (row[i] * row[j] - cov[i][j]) ** 2;
          beta += term;
        }
        beta /= n * n * d;
        const alpha = Math.min(beta, delta) / delta;
        assert.ok(Math.abs(s.shrinkage - alpha) < 1e-10, `${s.shrinkage} vs ${alpha}`);
        const r = s.kept.length;
        assert.equal(r, d);
        for (let i = 0; i < d; i++) {
          for (let j = 0; j < d; j++) {
            const expected = n * ((1 - alpha) * cov[i][j] + (i === j ? alpha * mu : 0));
            assert.ok(Math.abs(s.withinScatter[i * r + j] - expected) < 1e-9 * n * mu);
          }
        }
      }
    });

    it('a fixed intensity is used as given, and needs the shrinkage solver', () => {
      const s = solveLda(moments, { solver: 'shrinkage', priors: 'empirical', shrinkageIntensity: 0.25 });
      assert.equal(s.shrinkage, 0.25);
      assert.throws(() => solveLda(moments, { solver: 'exact', priors: 'empirical', shrinkageIntensity: 0.25 }), (e: unknown) => e instanceof DataError && e.code === 'bad-option');
      assert.throws(() => solveLda(moments, { solver: 'shrinkage', priors: 'empirical', shrinkageIntensity: 1.5 }), DataError);
    });
  });

  describe('small and odd inputs', () => {
    it('one feature, two classes: λ = S_B/S_W', () => {
      const m: Moments = {
        features: ['vibration_rms'],
        classes: [
          { label: 'healthy', count: 4, mean: Float64Array.of(1), scatter: Float64Array.of(2), min: Float64Array.of(0), max: Float64Array.of(2), cubic: Float64Array.of(0), quartic: 2 },
          { label: 'cavitation', count: 4, mean: Float64Array.of(3), scatter: Float64Array.of(2), min: Float64Array.of(2), max: Float64Array.of(4), cubic: Float64Array.of(0), quartic: 2 },
        ],
      };
      const s = solveLda(m, EXACT);
      // S_W = 4, S_B = 4·1² + 4·1² = 8.
      assert.deepEqual(s.labels, ['cavitation', 'healthy']);
      assert.ok(Math.abs(s.eigenvalues[0] - 2) < 1e-15);
      assert.equal(s.explainedRatio[0], 1);
      // w² S_W = n − K = 6 → w = √1.5, positive by the sign rule.
      assert.ok(Math.abs(s.directions[0] - Math.sqrt(1.5)) < 1e-15);
    });

    it('every feature constant: no features left, an error-level warning, no crash', () => {
      const flat = withColumn({ ...rows, d: 0, features: [], values: new Float64Array(0) }, 'pump_model', () => 3);
      const s = solveLda(accumulate(flat), { solver: 'auto', priors: 'empirical' });
      assert.equal(s.kept.length, 0);
      assert.equal(s.eigenvalues.length, 0);
      assert.ok(s.warnings.some((w) => w.code === 'no-features-left' && w.severity === 'error'));
    });

    it('identical class means: no discriminant direction, a warning', () => {
      const m = accumulate(rows);
      const same: Moments = { ...m, classes: m.classes.map((c) => ({ ...c, mean: Float64Array.from(m.classes[0].mean) })) };
      const s = solveLda(same, EXACT);
      assert.equal(s.eigenvalues.length, 0);
      assert.ok(s.warnings.some((w) => w.code === 'no-discriminant'));
    });

    it('one class or bad options are DataErrors', () => {
      const one: Moments = { features: moments.features, classes: [moments.classes[0]] };
      assert.throws(() => solveLda(one, EXACT), (e: unknown) => e instanceof DataError && e.code === 'one-class');
      assert.throws(() => solveLda(moments, { solver: 'qr' as 'exact', priors: 'empirical' }), (e: unknown) => e instanceof DataError && e.code === 'bad-option');
    });

    it('sortLabels: numeric labels by value, others by code point', () => {
      assert.deepEqual(sortLabels(['10', '9', '-1.5', '2e1']), ['-1.5', '9', '10', '2e1']);
      assert.deepEqual(sortLabels(['b', 'B', 'a', '10', '9']), ['10', '9', 'B', 'a', 'b']);
      // U+FF21 (fullwidth A) sorts before U+1F600 by code point although its UTF-16 unit is larger.
      assert.deepEqual(sortLabels(['\u{1F600}', '\uFF21']), ['\uFF21', '\u{1F600}']);
    });
  });
});
