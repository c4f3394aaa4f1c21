/**
 * A second outside table, so the engine is not checked on Iris alone: the Wine recognition data
 * (13 features, classes of 59/71/48 rows) against Debian's numpy / scipy / scikit-learn
 * (fixtures/wine.python.json) and R 4.2 stats + MASS (fixtures/wine.r.json). Plus the same table
 * with `ash` multiplied by 1e-5, which MASS::lda with its default tolerance rejects as constant
 * (recorded in wine.r.json): ours must solve it and give the unscaled eigenvalues.
 */
import * as assert from 'node:assert/strict';
import type { FitOptions, FitReport } from '../../src/core/types';
import { assertClose, assertExact, figure, loadReference, type Reference } from './compare';
import { checkMisclassified, fitFixture, loadReferenceCase } from './engine';

const WINE = 'wine/wine.csv';
const SCALED = 'wine/wine-ash-scaled.csv';
const BASE: Partial<FitOptions> = { label: 'cultivar', solver: 'exact', priors: 'empirical', cv: 'loo' };

describe('Wine: our analysis against numpy/scipy/scikit-learn and R MASS', function () {
  this.timeout(60_000);
  let py: Reference;
  let rr: Reference;
  let truth: number[];
  let report: FitReport;

  before(async function () {
    ({ py, rr, truth, report } = await loadReferenceCase('wine', WINE, BASE));
  });

  it('uses every row, feature and class as the references do', function () {
    const data = py.data as { rows: number; features: string[]; labels: string[]; counts: number[] };
    assert.equal(report.rows.used, data.rows);
    assert.deepEqual(report.features, data.features);
    assert.deepEqual(report.classes.map((c) => c.label), data.labels);
    assert.deepEqual(report.classes.map((c) => c.count), data.counts);
    assert.deepEqual(report.removedFeatures, []);
    assert.equal(report.solver, 'exact');
  });

  it('eigenvalues and explained ratios', function () {
    assertClose(report.discriminant.eigenvalues, figure(py, 'eigenvalues'), 'eigenvalues'); // scipy.linalg.eigh(S_B, S_W)
    assertClose(report.discriminant.eigenvalues, figure(rr, 'eigenvalues'), 'eigenvalues'); // R MASS::lda svd²·(K−1)/(n−K)
    assertClose(report.discriminant.explainedRatio, figure(py, 'explainedRatio'), 'explained ratio'); // scipy λ/Σλ
  });

  it("Wilks' lambda and the other MANOVA tests: R summary.manova", function () {
    for (const test of ['wilks', 'pillai', 'hotellingLawley', 'roy'] as const) {
      const ref = figure<{ statistic: number; F: number; df1: number; df2: number; p: number }>(rr, test);
      const ours = report.tests[test];
      for (const key of ['statistic', 'F', 'df1', 'df2'] as const) {
        assertClose(ours[key], { source: ref.source, value: ref.value[key] }, `${test} ${key}`);
      }
      assertClose(ours.p, { source: ref.source, value: ref.value.p }, `${test} p`, { relativeOnly: true });
    }
  });

  it('training confusion (R MASS predict(lda))', function () {
    assertExact(report.confusion.matrix, figure(rr, 'training.confusion'), 'training confusion');
  });

  it('leave-one-out accuracy, confusion and misclassified rows (brute-force refit; sklearn refit)', function () {
    const cv = report.accuracy.crossValidated;
    assert.ok(cv && cv.method === 'loo', `cross-validation should be loo, got ${JSON.stringify(cv)}`);
    assertClose(cv.value, figure(py, 'leaveOneOut.accuracy'), 'LOO accuracy'); // numpy brute-force refit
    assert.equal(Math.round(cv.value * 178), figure(py, 'leaveOneOut.sklearnCorrect').value, 'LOO correct vs sklearn cross_val_predict(LeaveOneOut)');
    assertExact(report.crossValidatedConfusion?.matrix, figure(py, 'leaveOneOut.confusion'), 'LOO confusion'); // numpy brute force
    assertExact(report.crossValidatedConfusion?.matrix, figure(py, 'leaveOneOut.sklearnConfusion'), 'LOO confusion'); // sklearn
    checkMisclassified(report, figure(py, 'leaveOneOut.posterior'), truth, 'LOO');
  });

  it('uniform priors: leave-one-out equals MASS lda(CV = TRUE, prior = 1/3), posteriors included', async function () {
    const r = await fitFixture(WINE, { ...BASE, priors: 'uniform' });
    assertExact(r.confusion.matrix, figure(rr, 'trainingUniform.confusion'), 'uniform training confusion'); // R MASS lda(prior = rep(1/3, 3))
    assertExact(r.crossValidatedConfusion?.matrix, figure(rr, 'leaveOneOutUniform.confusion'), 'uniform LOO confusion'); // R MASS CV = TRUE
    checkMisclassified(r, figure(rr, 'leaveOneOutUniform.posterior'), truth, 'uniform LOO (MASS)');
  });

  it('Ledoit–Wolf shrinkage intensity and the shrinkage solver', async function () {
    const r = await fitFixture(WINE, { ...BASE, solver: 'shrinkage', cv: 'none' });
    assert.equal(r.solver, 'shrinkage');
    assertClose(r.shrinkage, figure(py, 'shrinkage.intensity'), 'Ledoit–Wolf intensity'); // sklearn ledoit_wolf(Z, assume_centered=True)
    assertClose(r.discriminant.eigenvalues, figure(py, 'shrinkage.eigenvalues'), 'shrinkage eigenvalues'); // scipy eigh(S_B, n·shrunk)
    assertClose(r.discriminant.explainedRatio, figure(py, 'shrinkage.explainedRatio'), 'shrinkage explained ratio');
    assertExact(r.confusion.matrix, figure(py, 'shrinkage.training.confusion'), 'shrinkage training confusion');
  });

  describe('ash × 1e-5 (MASS with its default tol = 1e-4 stops: "variable 3 appears to be constant within groups")', function () {
    it('the exact solver keeps the column and gives the unscaled eigenvalues', async function () {
      // R MASS::lda(x, grouping) on this file: the error message stored in wine.r.json.
      assert.match(figure<string>(rr, 'ashScaled.massDefaultTol').value, /constant within groups/);
      const r = await fitFixture(SCALED, BASE);
      assert.deepEqual(r.removedFeatures, [], 'no column may be removed: ash is not constant, only small');
      assert.deepEqual(r.features, report.features);
      assertClose(r.discriminant.eigenvalues, figure(py, 'eigenvalues'), 'eigenvalues, scaled table vs unscaled reference'); // scipy, unscaled
      assertClose(r.discriminant.eigenvalues, figure(py, 'ashScaled.eigenvalues'), 'eigenvalues, scaled table'); // scipy on the scaled file
      assertClose(r.discriminant.eigenvalues, figure(rr, 'ashScaled.eigenvaluesSmallTol'), 'eigenvalues, scaled table'); // R MASS tol = 1e-10
      assertClose(r.discriminant.eigenvalues, report.discriminant.eigenvalues, 'eigenvalues, scaled vs our unscaled fit');
      assertExact(r.crossValidatedConfusion?.matrix, figure(py, 'leaveOneOut.confusion'), 'LOO confusion, scaled table');
    });

    it('solver auto decides as on the unscaled table (the correlation-scaled condition number does not see units)', async function () {
      const unscaled = await fitFixture(WINE, { ...BASE, solver: 'auto', cv: 'none' });
      const scaled = await fitFixture(SCALED, { ...BASE, solver: 'auto', cv: 'none' });
      assert.equal(scaled.solver, unscaled.solver);
      assertClose(scaled.conditionNumber, unscaled.conditionNumber, 'condition number, scaled vs unscaled');
      assertClose(scaled.discriminant.eigenvalues, unscaled.discriminant.eigenvalues, 'eigenvalues with solver auto, scaled vs unscaled');
    });

    it('the shrinkage intensity is scale-dependent, as sklearn documents: ours equals sklearn on the scaled table', async function () {
      const r = await fitFixture(SCALED, { ...BASE, solver: 'shrinkage', cv: 'none' });
      assertClose(r.shrinkage, figure(py, 'ashScaled.shrinkageIntensity'), 'Ledoit–Wolf intensity, scaled table'); // sklearn ledoit_wolf on the scaled rows
    });
  });
});
