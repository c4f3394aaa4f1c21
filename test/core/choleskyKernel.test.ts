/**
 * The WebAssembly SIMD path of the Cholesky factorisations, the condition number and the fit from
 * moments against the plain JavaScript path (useCholeskySimd(false), what runs where SIMD is
 * missing), on orders at and above SIMD_MIN_ORDER that exercise every edge: odd and even orders,
 * a last panel narrower than PANEL, pivoting, a rank-deficient matrix and a non-definite one.
 */
import { strict as assert } from 'node:assert';
import { choleskySimdAvailable, SIMD_MIN_ORDER, useCholeskySimd } from '../../src/core/choleskyKernel';
import { conditionNumber } from '../../src/core/conditionNumber';
import { solveLda } from '../../src/core/lda';
import { cholesky, pivotedCholesky } from '../../src/core/linalg';
import { MomentsAccumulator } from '../../src/core/moments';
import { fitMoments } from '../../src/core/pipeline/fitMoments';
import { resolveOptions } from '../../src/core/pipeline/options';
import { normal } from './generatedTables';

/** Runs f with the WebAssembly path on or off, restoring the setting. */
function withSimd<T>(on: boolean, f: () => T): T {
  const previous = useCholeskySimd(on);
  try {
    return f();
  } finally {
    useCholeskySimd(previous);
  }
}

/** XᵀX of `rows` random rows of n normals (full rank when rows ≥ n), the last `copies` columns copies of the first. */
function gram(n: number, rows: number, seed: number, copies = 0): Float64Array {
  const draw = normal(seed);
  const x = new Float64Array(rows * n);
  for (let t = 0; t < rows; t++) {
    for (let j = 0; j < n; j++) x[t * n + j] = j >= n - copies ? x[t * n + (j - (n - copies))]! : draw() * (1 + (j % 7));
  }
  const a = new Float64Array(n * n);
  for (let t = 0; t < rows; t++) {
    for (let i = 0; i < n; i++) {
      const xi = x[t * n + i]!;
      for (let j = 0; j <= i; j++) a[i * n + j]! += xi * x[t * n + j]!;
    }
  }
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) a[j * n + i] = a[i * n + j]!;
  return a;
}

const maxAbs = (a: ArrayLike<number>): number => {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]!));
  return m;
};

/** Largest |a − b| relative to the largest |a|. */
function relativeDifference(a: ArrayLike<number>, b: ArrayLike<number>): number {
  assert.equal(a.length, b.length);
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i]! - b[i]!));
  return d / Math.max(maxAbs(a), Number.MIN_VALUE);
}

/**
 * Walks two results of the same computation: strings, booleans and integers equal, other numbers
 * and typed arrays equal to `tolerance` relative to the largest magnitude of that value.
 */
function assertClose(a: unknown, b: unknown, tolerance: number, path = 'result'): void {
  if (typeof a === 'number' && typeof b === 'number') {
    if (Number.isInteger(a) && Number.isInteger(b) && Math.abs(a) < 2 ** 31) assert.equal(a, b, path);
    else if (Number.isFinite(a)) assert.ok(Math.abs(a - b) <= tolerance * Math.max(Math.abs(a), Number.MIN_VALUE), `${path}: ${a} vs ${b}`);
    else assert.equal(a, b, path);
  } else if (a instanceof Float64Array && b instanceof Float64Array) {
    assert.ok(relativeDifference(a, b) <= tolerance, `${path}: differ by ${relativeDifference(a, b)} relative`);
  } else if (ArrayBuffer.isView(a) && ArrayBuffer.isView(b)) {
    assert.deepEqual(a, b, path);
  } else if (Array.isArray(a) && Array.isArray(b)) {
    assert.equal(a.length, b.length, path);
    a.forEach((v, i) => assertClose(v, b[i], tolerance, `${path}[${i}]`));
  } else if (a !== null && b !== null && typeof a === 'object' && typeof b === 'object') {
    assert.deepEqual(Object.keys(a).sort(), Object.keys(b).sort(), path);
    for (const key of Object.keys(a)) assertClose((a as Record<string, unknown>)[key], (b as Record<string, unknown>)[key], tolerance, `${path}.${key}`);
  } else {
    assert.equal(a, b, path);
  }
}

describe('Cholesky kernel (WebAssembly SIMD against plain JavaScript)', () => {
  it('runs as WebAssembly SIMD on this Node', () => {
    assert.ok(choleskySimdAvailable(), 'Node 20 has WebAssembly SIMD');
  });

  for (const n of [SIMD_MIN_ORDER, 65, 96, 131, 250]) {
    it(`n = ${n}: cholesky and pivotedCholesky agree to rounding, same pivots and rank`, () => {
      const a = gram(n, n + 40, n);
      const plain = withSimd(false, () => ({ full: cholesky(a, n), pivoted: pivotedCholesky(a, n, n * Number.EPSILON) }));
      const simd = withSimd(true, () => ({ full: cholesky(a, n), pivoted: pivotedCholesky(a, n, n * Number.EPSILON) }));
      assert.ok(plain.full.positiveDefinite && simd.full.positiveDefinite);
      assert.deepEqual(simd.pivoted.pivots, plain.pivoted.pivots);
      assert.equal(simd.pivoted.rank, n);
      // Sums of up to n products in another order: a few ulps of the entries, times the growth
      // the factor's later columns allow (the condition here is modest).
      assert.ok(relativeDifference(plain.full.factor, simd.full.factor) < 1e3 * n * Number.EPSILON);
      assert.ok(relativeDifference(plain.pivoted.factor, simd.pivoted.factor) < 1e3 * n * Number.EPSILON);
      // And each reproduces A: L Lᵀ = A to rounding.
      const l = simd.full.factor;
      let worst = 0;
      for (let i = 0; i < n; i++) {
        for (let j = 0; j <= i; j++) {
          let s = 0;
          for (let k = 0; k <= j; k++) s += l[i * n + k]! * l[j * n + k]!;
          worst = Math.max(worst, Math.abs(s - a[i * n + j]!));
        }
      }
      assert.ok(worst < 1e2 * n * Number.EPSILON * maxAbs(a), `L Lᵀ − A: ${worst}`);
    });
  }

  it('rank deficient (10 copied columns of 120): the same rank, pivots and residual in both paths', () => {
    const n = 120;
    const a = gram(n, 200, 5, 10);
    const tolerance = n * Number.EPSILON * maxAbs(a);
    const plain = withSimd(false, () => pivotedCholesky(a, n, tolerance));
    const simd = withSimd(true, () => pivotedCholesky(a, n, tolerance));
    assert.equal(plain.rank, 110);
    assert.equal(simd.rank, plain.rank);
    assert.deepEqual(simd.pivots, plain.pivots);
    assert.ok(relativeDifference(plain.factor, simd.factor) < 1e4 * n * Number.EPSILON);
    assert.ok(maxAbs(simd.residual) <= tolerance);
  });

  it('not positive definite: both paths stop at the same pivot', () => {
    const n = 100;
    const a = gram(n, n + 10, 9);
    a[70 * n + 70] = -1;
    const plain = withSimd(false, () => cholesky(a, n));
    const simd = withSimd(true, () => cholesky(a, n));
    assert.equal(plain.positiveDefinite, false);
    assert.equal(simd.failedAt, plain.failedAt);
    assert.ok(relativeDifference(plain.factor, simd.factor) < 1e3 * n * Number.EPSILON);
  });

  for (const n of [65, 300]) {
    it(`n = ${n}: the condition number is the same number in both paths (same sums, same order)`, () => {
      const a = gram(n, 3 * n, 3);
      const factor = pivotedCholesky(a, n, 0).factor;
      const plain = withSimd(false, () => conditionNumber(factor, n));
      const simd = withSimd(true, () => conditionNumber(factor, n));
      assert.equal(simd, plain);
      // λ_max/λ_min of a Wishart-like matrix with 3n rows: (1 + √(1/3))²/(1 − √(1/3))² ≈ 14 in
      // the limit (Marchenko–Pastur), spread further by the column scales 1..7 above.
      assert.ok(plain > 5 && plain < 1e4, String(plain));
    });
  }

  it('a fit from moments at d = 90 (LDA, PCA, tests with Box’s M) agrees to rounding in both paths', () => {
    const d = 90;
    const K = 3;
    const n = 900;
    const draw = normal(21);
    const values = new Float64Array(n * d);
    const ids = new Int32Array(n);
    for (let t = 0; t < n; t++) {
      ids[t] = t % K;
      for (let j = 0; j < d; j++) values[t * d + j] = draw() * (1 + (j % 5)) + (j % 3 === 0 ? 0.3 * ids[t]! : 0);
    }
    const features = Array.from({ length: d }, (_, j) => `sensor_${j + 1}`);
    const labels = ['bearing', 'healthy', 'seal'];
    const accumulator = new MomentsAccumulator(features);
    accumulator.add(values, ids, n, labels);
    const moments = accumulator.result();
    const options = resolveOptions({});
    const plain = withSimd(false, () => ({ lda: solveLda(moments, { solver: 'exact', priors: 'empirical' }), fit: fitMoments(moments, options) }));
    const simd = withSimd(true, () => ({ lda: solveLda(moments, { solver: 'exact', priors: 'empirical' }), fit: fitMoments(moments, options) }));
    assert.equal(simd.lda.solver, 'exact');
    assert.equal(simd.lda.kept.length, d);
    assertClose(plain.lda.eigenvalues, simd.lda.eigenvalues, 1e-11);
    assertClose(plain.lda.directions, simd.lda.directions, 1e-10);
    assertClose(plain.fit, simd.fit, 1e-9);
  });
});
