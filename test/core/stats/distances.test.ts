import * as assert from 'node:assert/strict';
import { cholesky } from '../../../src/core/linalg';
import { centroidMahalanobis, centroidMahalanobisWhitened } from '../../../src/core/stats/distances';
import reference from '../../fixtures/stats/python-reference.json';
import { normalFrom, relativeClose, seededRandom } from './seededRandom';

/** S_W/(n − K) from per-class scatters (p × p each). */
function pooledCovariance(scatters: number[][], n: number, K: number, p: number): Float64Array {
  const out = new Float64Array(p * p);
  for (const s of scatters) for (let k = 0; k < p * p; k++) out[k] += s[k] / (n - K);
  return out;
}

describe('stats/distances', () => {
  // Reference: scipy.spatial.distance.mahalanobis with VI = inv(S_W/(n − K)), on R's datasets::iris
  // and mtcars (test/fixtures/stats/generate.py).
  for (const set of reference.datasets) {
    it(`${set.name}: centroid distances match scipy.spatial.distance.mahalanobis`, () => {
      const covariance = pooledCovariance(set.scatters, set.n, set.K, set.p);
      const ours = centroidMahalanobis(Float64Array.from(set.means), covariance, set.K, set.p);
      for (let i = 0; i < set.K; i++) {
        assert.equal(ours[i][i], 0);
        for (let j = 0; j < set.K; j++) {
          if (i === j) continue;
          assert.ok(relativeClose(ours[i][j], set.mahalanobis.matrix[i][j], 1e-10), `${i},${j}: ${ours[i][j]} vs ${set.mahalanobis.matrix[i][j]}`);
        }
      }
    });
    it(`${set.name}: from a whitening of S_W in a permuted order, the same scipy distances`, () => {
      const { p, K, n } = set;
      const within = pooledCovariance(set.scatters, 1 + K, K, p); // divisor 1: S_W itself
      const order = Int32Array.from({ length: p }, (_, q) => (q * 3 + 1) % p);
      const scale = Float64Array.from(order, (f) => Math.sqrt(within[f * p + f]));
      const correlation = new Float64Array(p * p);
      for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) correlation[a * p + b] = within[order[a] * p + order[b]] / (scale[a] * scale[b]);
      const { factor, positiveDefinite } = cholesky(correlation, p);
      assert.ok(positiveDefinite);
      const ours = centroidMahalanobisWhitened(Float64Array.from(set.means), K, { order, factor, scale }, n - K);
      for (let i = 0; i < K; i++) {
        assert.equal(ours[i][i], 0);
        for (let j = 0; j < K; j++) if (i !== j) assert.ok(relativeClose(ours[i][j], set.mahalanobis.matrix[i][j], 1e-10), `${i},${j}: ${ours[i][j]}`);
      }
    });
  }

  it('one feature: |m_i − m_j| / σ', () => {
    const d = centroidMahalanobis(Float64Array.from([1, 4, -2]), Float64Array.from([2.25]), 3, 1);
    assert.ok(relativeClose(d[0][1], 2, 1e-15) && relativeClose(d[0][2], 2, 1e-15) && relativeClose(d[1][2], 4, 1e-15));
  });

  it('invariant under a non-singular affine map of the features; symmetric; triangle inequality', () => {
    const normal = normalFrom(seededRandom(21));
    const K = 5;
    const p = 4;
    const means = Float64Array.from({ length: K * p }, () => 3 * normal());
    // A random covariance B Bᵀ + I and a random map A (diagonally dominated, so non-singular).
    const B = Float64Array.from({ length: p * p }, () => normal());
    const covariance = new Float64Array(p * p);
    for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) {
      let sum = i === j ? 1 : 0;
      for (let k = 0; k < p; k++) sum += B[i * p + k] * B[j * p + k];
      covariance[i * p + j] = sum;
    }
    const A = Float64Array.from({ length: p * p }, (_, k) => (k % (p + 1) === 0 ? 4 : 0) + normal());
    const offset = Float64Array.from({ length: p }, () => 1e6 * normal());
    const mapped = new Float64Array(K * p);
    for (let c = 0; c < K; c++) for (let i = 0; i < p; i++) {
      let sum = offset[i];
      for (let k = 0; k < p; k++) sum += A[i * p + k] * means[c * p + k];
      mapped[c * p + i] = sum;
    }
    const mappedCovariance = new Float64Array(p * p); // A Σ Aᵀ
    for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) {
      let sum = 0;
      for (let k = 0; k < p; k++) for (let l = 0; l < p; l++) sum += A[i * p + k] * covariance[k * p + l] * A[j * p + l];
      mappedCovariance[i * p + j] = sum;
    }
    const before = centroidMahalanobis(means, covariance, K, p);
    const after = centroidMahalanobis(mapped, mappedCovariance, K, p);
    for (let i = 0; i < K; i++) for (let j = 0; j < K; j++) {
      assert.equal(before[i][j], before[j][i]);
      if (i !== j) assert.ok(relativeClose(after[i][j], before[i][j], 1e-8), `${i},${j}: ${after[i][j]} vs ${before[i][j]}`);
      for (let k = 0; k < K; k++) assert.ok(before[i][k] <= before[i][j] + before[j][k] + 1e-12);
    }
  });

  it('a covariance that is not positive definite gives NaN distances, not a throw', () => {
    const singular = centroidMahalanobis(Float64Array.from([0, 0, 1, 1]), Float64Array.from([1, 1, 1, 1]), 2, 2);
    assert.deepEqual(singular.map((row) => row.map((v) => (Number.isNaN(v) ? 'NaN' : v))), [[0, 'NaN'], ['NaN', 0]]);
    const zero = centroidMahalanobis(Float64Array.from([0, 1]), Float64Array.from([0]), 2, 1);
    assert.ok(Number.isNaN(zero[0][1]));
  });

  it('rejects arrays that do not match K and p', () => {
    assert.throws(() => centroidMahalanobis(Float64Array.from([0, 0, 1]), Float64Array.from([1, 0, 0, 1]), 2, 2), RangeError);
  });
});
