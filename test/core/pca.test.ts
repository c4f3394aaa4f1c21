import * as assert from 'node:assert/strict';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { pcaScoreRow, solvePca, type PcaSolution } from '../../src/core/pca';
import { accumulate, generateRows, relativeDifference, withColumn, type LabelledRows } from './numericData';

/** Covariance (divisor n − 1) of the selected columns, straight from the rows. */
function rowCovariance(rows: LabelledRows, columns: number[], standardize: boolean): number[][] {
  const { n, d } = rows;
  const get = (r: number, j: number) => rows.values[r * d + columns[j]];
  const p = columns.length;
  const mean = columns.map((_, j) => Array.from({ length: n }, (_, r) => get(r, j)).reduce((a, b) => a + b, 0) / n);
  const cov = Array.from({ length: p }, (_, a) =>
    Array.from({ length: p }, (_, b) => Array.from({ length: n }, (_, r) => (get(r, a) - mean[a]) * (get(r, b) - mean[b])).reduce((x, y) => x + y, 0) / (n - 1)),
  );
  if (!standardize) return cov;
  return cov.map((row, a) => row.map((v, b) => v / Math.sqrt(cov[a][a] * cov[b][b])));
}

function checkEigenpairs(pca: PcaSolution, matrix: number[][]): void {
  const p = matrix.length;
  const c = pca.components;
  const theirs = new EigenvalueDecomposition(new Matrix(matrix), { assumeSymmetric: true }).realEigenvalues.sort((x, y) => y - x);
  assert.ok(relativeDifference(pca.eigenvalues, theirs) < 1e-11, `${relativeDifference(pca.eigenvalues, theirs)}`);
  assert.ok(Math.abs(pca.explainedRatio.reduce((a, b) => a + b, 0) - 1) < 1e-14);
  for (let j = 0; j < c; j++) {
    let best = 0;
    for (let a = 0; a < p; a++) {
      let av = 0;
      for (let b = 0; b < p; b++) av += matrix[a][b] * pca.loadings[b * c + j];
      assert.ok(Math.abs(av - pca.eigenvalues[j] * pca.loadings[a * c + j]) < 1e-11 * pca.eigenvalues[0]);
      if (Math.abs(pca.loadings[a * c + j]) > Math.abs(pca.loadings[best * c + j])) best = a;
    }
    assert.ok(pca.loadings[best * c + j] > 0, 'sign rule');
    for (let l = 0; l < c; l++) {
      let dot = 0;
      for (let a = 0; a < p; a++) dot += pca.loadings[a * c + j] * pca.loadings[a * c + l];
      assert.ok(Math.abs(dot - (j === l ? 1 : 0)) < 1e-12);
    }
  }
}

describe('pca', () => {
  const rows = generateRows({ seed: 31, counts: [90, 70, 110], d: 8 });
  const moments = accumulate(rows);
  const all = Array.from({ length: rows.d }, (_, i) => i);

  it('covariance: eigenvalues equal ml-matrix on the covariance of the rows, A·v = λv, orthonormal loadings, ratios sum to 1', () => {
    const pca = solvePca(moments, 'covariance');
    assert.equal(pca.components, 8);
    checkEigenpairs(pca, rowCovariance(rows, all, false));
  });

  it('standardized: the PCA of the correlation matrix', () => {
    const pca = solvePca(moments, 'standardized');
    checkEigenpairs(pca, rowCovariance(rows, all, true));
    assert.ok(Math.abs(pca.eigenvalues.reduce((a, b) => a + b, 0) - rows.d) < 1e-12);
  });

  it('a feature subset, and many features (10 loadings by inverse iteration)', () => {
    const subset = [1, 3, 4, 6];
    checkEigenpairs(solvePca(moments, 'covariance', subset), rowCovariance(rows, subset, false));
    const wide = generateRows({ seed: 5, counts: [60, 50], d: 48 });
    const pca = solvePca(accumulate(wide), 'covariance');
    assert.equal(pca.components, 10);
    checkEigenpairs(pca, rowCovariance(wide, Array.from({ length: 48 }, (_, i) => i), false));
  });

  it('scores on PC1 and PC2 have mean 0, variances λ1 and λ2 (divisor n − 1) and no correlation', () => {
    for (const scale of ['covariance', 'standardized'] as const) {
      const pca = solvePca(moments, scale);
      const out = new Float64Array(2);
      const scores = Array.from({ length: rows.n }, (_, r) => {
        pcaScoreRow(pca, rows.values.subarray(r * rows.d, (r + 1) * rows.d), out);
        return [out[0], out[1]];
      });
      const mean = [0, 1].map((j) => scores.reduce((a, z) => a + z[j], 0) / rows.n);
      assert.ok(Math.abs(mean[0]) < 1e-10 && Math.abs(mean[1]) < 1e-10);
      const cov = (a: number, b: number) => scores.reduce((s, z) => s + z[a] * z[b], 0) / (rows.n - 1);
      assert.ok(Math.abs(cov(0, 0) - pca.eigenvalues[0]) < 1e-10 * pca.eigenvalues[0]);
      assert.ok(Math.abs(cov(1, 1) - pca.eigenvalues[1]) < 1e-10 * pca.eigenvalues[0]);
      assert.ok(Math.abs(cov(0, 1)) < 1e-10 * pca.eigenvalues[0]);
    }
  });

  it('a constant feature: standardized PCA gives it a zero eigenvalue, zero loadings on the other components, no NaN', () => {
    const withConstant = withColumn(rows, 'pump_model', () => 4);
    const pca = solvePca(accumulate(withConstant), 'standardized');
    const c = pca.components;
    for (let j = 0; j < c; j++) if (pca.eigenvalues[j] > 0) assert.ok(Math.abs(pca.loadings[rows.d * c + j]) < 1e-15);
    assert.equal(pca.eigenvalues[rows.d], 0);
    for (const v of [...pca.eigenvalues, ...pca.loadings, ...pca.explainedRatio]) assert.ok(Number.isFinite(v));
    const one = solvePca(accumulate(withConstant), 'covariance', [rows.d]);
    assert.deepEqual(Array.from(one.explainedRatio), [0]);
  });
});
