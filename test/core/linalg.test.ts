import * as assert from 'node:assert/strict';
import { CholeskyDecomposition, EigenvalueDecomposition, Matrix, SingularValueDecomposition } from 'ml-matrix';
import {
  cholesky,
  crossProductUpdate,
  mirrorUpper,
  pivotedCholesky,
  solveLower,
  solveLowerMatrix,
  solveLowerTranspose,
  solveLowerTransposeMatrix,
  symmetricEigen,
  symmetricEigenvalues,
  thinSvd,
} from '../../src/core/linalg';
import { conditionNumber } from '../../src/core/conditionNumber';
import { normalStream, relativeDifference } from './numericData';

/** A random n × n symmetric matrix B + Bᵀ. */
function randomSymmetric(n: number, seed: number): Float64Array {
  const draw = normalStream(seed);
  const b = Float64Array.from({ length: n * n }, () => draw());
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) a[i * n + j] = b[i * n + j] + b[j * n + i];
  return a;
}

/** G Gᵀ for a random n × rank G: positive semidefinite of the given rank. */
function randomGram(n: number, rank: number, seed: number): Float64Array {
  const draw = normalStream(seed);
  const g = Float64Array.from({ length: n * rank }, () => draw());
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) for (let k = 0; k < rank; k++) a[i * n + j] += g[i * rank + k] * g[j * rank + k];
  return a;
}

function toMatrix(a: Float64Array, rows: number, cols: number): Matrix {
  return new Matrix(Array.from({ length: rows }, (_, i) => Array.from(a.subarray(i * cols, (i + 1) * cols))));
}

/** ‖A V − V D‖_max / ‖A‖_max and ‖VᵀV − I‖_max for the returned eigenpairs. */
function eigenResiduals(a: Float64Array, n: number, values: Float64Array, vectors: Float64Array, count: number): { residual: number; orthogonality: number } {
  let scale = 0;
  for (const v of a) scale = Math.max(scale, Math.abs(v));
  let residual = 0;
  let orthogonality = 0;
  for (let j = 0; j < count; j++) {
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += a[i * n + k] * vectors[k * count + j];
      residual = Math.max(residual, Math.abs(s - values[j] * vectors[i * count + j]));
    }
    for (let l = 0; l < count; l++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += vectors[i * count + j] * vectors[i * count + l];
      orthogonality = Math.max(orthogonality, Math.abs(s - (j === l ? 1 : 0)));
    }
  }
  return { residual: residual / (scale || 1), orthogonality };
}

describe('linalg', () => {
  describe('cholesky and triangular solves', () => {
    it('factors a positive definite matrix like ml-matrix does, and the solves invert L and Lᵀ', () => {
      const n = 9;
      const a = randomGram(n, n + 3, 3);
      const ours = cholesky(a, n);
      assert.ok(ours.positiveDefinite);
      const theirs = new CholeskyDecomposition(toMatrix(a, n, n)).lowerTriangularMatrix.to1DArray();
      assert.ok(relativeDifference(ours.factor, theirs) < 1e-13);
      const b = Float64Array.from({ length: n }, (_, i) => i - 3.5);
      const x = Float64Array.from(b);
      solveLower(ours.factor, n, x);
      solveLowerTranspose(ours.factor, n, x);
      // A x = b
      const ax = Array.from({ length: n }, (_, i) => a.subarray(i * n, (i + 1) * n).reduce((s, v, k) => s + v * x[k], 0));
      assert.ok(relativeDifference(ax, b) < 1e-12);
      const m = 3;
      const rhs = Float64Array.from({ length: n * m }, (_, k) => Math.sin(k));
      const y = Float64Array.from(rhs);
      solveLowerMatrix(ours.factor, n, y, m);
      solveLowerTransposeMatrix(ours.factor, n, y, m);
      for (let c = 0; c < m; c++) {
        const col = Float64Array.from({ length: n }, (_, i) => rhs[i * m + c]);
        solveLower(ours.factor, n, col);
        solveLowerTranspose(ours.factor, n, col);
        for (let i = 0; i < n; i++) assert.ok(Math.abs(col[i] - y[i * m + c]) < 1e-12 * (1 + Math.abs(col[i])));
      }
    });

    it('factors across several panels (n = 101, odd) like ml-matrix does', () => {
      const n = 101;
      const a = randomGram(n, n + 5, 13);
      const ours = cholesky(a, n);
      assert.ok(ours.positiveDefinite);
      const theirs = new CholeskyDecomposition(toMatrix(a, n, n)).lowerTriangularMatrix.to1DArray();
      assert.ok(relativeDifference(ours.factor, theirs) < 1e-11);
    });

    it('reports where a matrix stops being positive definite', () => {
      const a = randomGram(5, 3, 4);
      const result = cholesky(a, 5);
      assert.equal(result.positiveDefinite, false);
      assert.ok(result.failedAt >= 3);
      assert.equal(cholesky(Float64Array.of(-1), 1).failedAt, 0);
    });
  });

  describe('pivotedCholesky', () => {
    it('reveals the rank of a semidefinite matrix and factors the kept block exactly', () => {
      const n = 12;
      const rank = 7;
      const a = randomGram(n, rank, 8);
      const result = pivotedCholesky(a, n, 1e-10 * n);
      assert.equal(result.rank, rank);
      const { pivots, factor } = result;
      // P A Pᵀ = L Lᵀ on every entry (the dropped rows too, since the Schur complement is ~0).
      let worst = 0;
      for (let i = 0; i < n; i++) {
        for (let j = 0; j <= i; j++) {
          let s = 0;
          for (let k = 0; k < rank; k++) s += factor[i * n + k] * factor[j * n + k];
          worst = Math.max(worst, Math.abs(s - a[pivots[i] * n + pivots[j]]));
        }
      }
      assert.ok(worst < 1e-10, `reconstruction error ${worst}`);
      assert.deepEqual(
        [...pivots].sort((x, y) => x - y),
        Array.from({ length: n }, (_, i) => i),
      );
    });

    it('across several panels: rank, P A Pᵀ = L Lᵀ, pivots by decreasing Schur diagonal, copies set aside', () => {
      const n = 150;
      const rank = 97;
      const base = randomGram(n - 3, rank, 21);
      // Columns 147, 148, 149 copy columns 5, 60 and 146: exactly dependent, found in later panels.
      const source = [...Array.from({ length: n - 3 }, (_, i) => i), 5, 60, 146];
      const a = new Float64Array(n * n);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) a[i * n + j] = base[source[i] * (n - 3) + source[j]];
      const result = pivotedCholesky(a, n, 1e-9 * n);
      assert.equal(result.rank, rank);
      const { pivots, factor } = result;
      let scale = 0;
      for (const v of a) scale = Math.max(scale, Math.abs(v));
      let worst = 0;
      for (let i = 0; i < n; i++) {
        for (let j = 0; j <= i; j++) {
          let s = 0;
          for (let k = 0; k < rank; k++) s += factor[i * n + k] * factor[j * n + k];
          worst = Math.max(worst, Math.abs(s - a[pivots[i] * n + pivots[j]]));
        }
        for (let j = i + 1; j < n; j++) assert.equal(factor[i * n + j], 0);
        for (let j = rank; j <= i; j++) assert.equal(factor[i * n + j], 0);
      }
      assert.ok(worst < 1e-10 * scale, `reconstruction error ${worst}`);
      // Complete pivoting takes the Schur diagonals in decreasing order.
      for (let k = 1; k < rank; k++) assert.ok(factor[k * n + k] <= factor[(k - 1) * n + k - 1] * (1 + 1e-12));
      // A copy never becomes a pivot ahead of its original, whose index is lower.
      const kept = new Set(pivots.subarray(0, rank));
      for (const [copy, original] of [
        [147, 5],
        [148, 60],
        [149, 146],
      ]) {
        assert.ok(!kept.has(copy) || !kept.has(original), `copy ${copy} and original ${original} both kept`);
      }
      assert.deepEqual(
        [...pivots].sort((x, y) => x - y),
        Array.from({ length: n }, (_, i) => i),
      );
    });

    it('keeps the first of two identical columns (ties go to the lowest index)', () => {
      const a = Float64Array.of(1, 1, 0.5, 1, 1, 0.5, 0.5, 0.5, 1);
      const result = pivotedCholesky(a, 3, 1e-12);
      assert.equal(result.rank, 2);
      assert.deepEqual(Array.from(result.pivots.subarray(0, 2)).sort(), [0, 2]);
      assert.equal(result.pivots[2], 1);
    });
  });

  describe('crossProductUpdate', () => {
    it('adds YᵀY to the upper triangle for any width (unrolled and remainder columns)', () => {
      for (const d of [1, 3, 4, 5, 11]) {
        const rows = 13;
        const stride = 17;
        const draw = normalStream(d);
        const columns = Float64Array.from({ length: d * stride }, () => draw());
        const s = Float64Array.from({ length: d * d }, (_, k) => k);
        const before = Float64Array.from(s);
        crossProductUpdate(s, d, columns, stride, rows);
        for (let i = 0; i < d; i++) {
          for (let j = 0; j < d; j++) {
            let expected = before[i * d + j];
            if (j >= i) for (let t = 0; t < rows; t++) expected += columns[i * stride + t] * columns[j * stride + t];
            assert.ok(Math.abs(s[i * d + j] - expected) < 1e-12 * (1 + Math.abs(expected)), `d=${d} (${i},${j})`);
          }
        }
        mirrorUpper(s, d);
        for (let i = 0; i < d; i++) for (let j = 0; j < i; j++) assert.equal(s[i * d + j], s[j * d + i]);
      }
    });
  });

  describe('symmetricEigen', () => {
    for (const n of [1, 2, 5, 40]) {
      it(`n = ${n}: A·V = V·D, VᵀV = I, eigenvalues equal ml-matrix's EigenvalueDecomposition`, () => {
        const a = randomSymmetric(n, 100 + n);
        const { values, vectors, count } = symmetricEigen(a, n);
        assert.equal(count, n);
        const { residual, orthogonality } = eigenResiduals(a, n, values, vectors, count);
        assert.ok(residual < 1e-13 * n, `residual ${residual}`);
        assert.ok(orthogonality < 1e-13 * n, `orthogonality ${orthogonality}`);
        const theirs = new EigenvalueDecomposition(toMatrix(a, n, n), { assumeSymmetric: true }).realEigenvalues.sort((x, y) => y - x);
        assert.ok(relativeDifference(values, theirs) < 1e-13, `${relativeDifference(values, theirs)}`);
        for (let i = 1; i < n; i++) assert.ok(values[i - 1] >= values[i]);
        assert.deepEqual(symmetricEigenvalues(a, n), values);
      });
    }

    it('a few eigenvectors by inverse iteration agree with the full decomposition, also for repeated eigenvalues', () => {
      const n = 60;
      const cases: [string, Float64Array][] = [
        ['random', randomSymmetric(n, 7)],
        ['rank 3 (a 57-fold zero eigenvalue)', randomGram(n, 3, 9)],
        ['identity plus rank 2 (a 58-fold eigenvalue 1)', randomGram(n, 2, 10).map((v, k) => v + (k % (n + 1) === 0 ? 1 : 0))],
        ['identity', Float64Array.from({ length: n * n }, (_, k) => (k % (n + 1) === 0 ? 1 : 0))],
      ];
      for (const [name, a] of cases) {
        const few = symmetricEigen(a, n, 6);
        assert.equal(few.count, 6);
        const full = symmetricEigen(a, n);
        assert.ok(relativeDifference(few.values, full.values) < 1e-13, name);
        const { residual, orthogonality } = eigenResiduals(a, n, few.values, few.vectors, few.count);
        assert.ok(residual < 1e-12, `${name}: residual ${residual}`);
        assert.ok(orthogonality < 1e-12, `${name}: orthogonality ${orthogonality}`);
      }
    });

    it('handles the empty matrix, a zero matrix and a diagonal matrix', () => {
      assert.equal(symmetricEigen(new Float64Array(0), 0).values.length, 0);
      const zero = symmetricEigen(new Float64Array(9), 3);
      assert.deepEqual(Array.from(zero.values), [0, 0, 0]);
      const diagonal = symmetricEigen(Float64Array.of(2, 0, 0, 0, 5, 0, 0, 0, -1), 3);
      assert.deepEqual(Array.from(diagonal.values), [5, 2, -1]);
      assert.equal(Math.abs(diagonal.vectors[1 * 3 + 0]), 1);
    });
  });

  describe('conditionNumber', () => {
    it('equals λ_max/λ_min of ml-matrix eigenvalues, by Lanczos above 64 columns and directly below', () => {
      for (const [n, rank, seed] of [
        [30, 40, 1],
        [150, 160, 2],
        [200, 205, 3],
      ]) {
        const a = randomGram(n, rank, seed);
        const factor = cholesky(a, n).factor;
        const values = new EigenvalueDecomposition(toMatrix(a, n, n), { assumeSymmetric: true }).realEigenvalues;
        const expected = Math.max(...values) / Math.min(...values);
        const got = conditionNumber(factor, n);
        assert.ok(Math.abs(got - expected) / expected < 1e-8, `n=${n}: ${got} vs ${expected}`);
      }
      assert.equal(conditionNumber(new Float64Array(0), 0), 1);
    });
  });

  describe('thinSvd', () => {
    it('A = U Σ Vᵀ with orthonormal U and V; singular values equal ml-matrix SVD', () => {
      const m = 30;
      const k = 5;
      const draw = normalStream(21);
      const a = Float64Array.from({ length: m * k }, () => draw());
      // Make column 4 a combination of 0 and 1: one zero singular value.
      for (let i = 0; i < m; i++) a[i * k + 4] = 2 * a[i * k] - a[i * k + 1];
      const { values, u, v } = thinSvd(a, m, k);
      const theirs = new SingularValueDecomposition(toMatrix(a, m, k)).diagonal;
      assert.ok(relativeDifference(values, theirs) < 1e-13);
      assert.ok(values[4] < 1e-14 * values[0]);
      for (let i = 0; i < m; i++) {
        for (let j = 0; j < k; j++) {
          let s = 0;
          for (let c = 0; c < k; c++) s += u[i * k + c] * values[c] * v[j * k + c];
          assert.ok(Math.abs(s - a[i * k + j]) < 1e-13 * values[0]);
        }
      }
      for (let p = 0; p < 4; p++) {
        for (let q = 0; q < 4; q++) {
          let s = 0;
          for (let i = 0; i < m; i++) s += u[i * k + p] * u[i * k + q];
          assert.ok(Math.abs(s - (p === q ? 1 : 0)) < 1e-13);
        }
      }
    });

    it('keeps small singular values to high relative accuracy (graded columns)', () => {
      // Orthogonal columns scaled 1, 1e-6, 1e-12: σ must come out as those norms.
      const m = 4;
      const a = Float64Array.of(1, 0, 0, 0, 1e-6, 0, 0, 0, 1e-12, 0, 0, 0);
      const { values } = thinSvd(a, m, 3);
      assert.deepEqual(Array.from(values), [1, 1e-6, 1e-12]);
    });
  });
});
