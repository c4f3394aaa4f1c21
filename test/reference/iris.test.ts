/**
 * Our analyze() on Fisher's Iris data against outside references: Debian's numpy / scipy /
 * scikit-learn (fixtures/iris.python.json, from scripts/iris_reference.py) and R 4.2 stats + MASS
 * (fixtures/iris.r.json, from scripts/iris_reference.R). Each check names the reference's source;
 * the JSON carries the exact call beside every value. Tolerance: 1e-8 relative (compare.ts), counts
 * and confusion matrices exactly.
 */
import * as assert from 'node:assert/strict';
import type { FitOptions, FitReport } from '../../src/core/types';
import { assertClose, assertCloseUpToColumnSign, assertExact, figure, loadReference, type Reference } from './compare';
import { checkMisclassified, fitFixture, loadReferenceCase, pooledWithinCovariance, sampledRows } from './engine';

const IRIS = 'iris/iris.csv';
const BASE: Partial<FitOptions> = { label: 'species', solver: 'exact', priors: 'empirical', cv: 'loo', pcaScale: 'covariance' };

describe('Iris: our analysis against numpy/scipy/scikit-learn and R MASS', function () {
  this.timeout(60_000);
  let py: Reference;
  let rr: Reference;
  let report: FitReport;
  let truth: number[];

  before(async function () {
    ({ py, rr, truth, report } = await loadReferenceCase('iris', IRIS, BASE));
  });

  describe('default options (exact solver, empirical priors, leave-one-out)', function () {
    it('uses every row, feature and class as the references do', function () {
      const data = py.data as { rows: number; features: string[]; labels: string[]; counts: number[] };
      assert.equal(report.rows.used, data.rows);
      assert.deepEqual(report.features, data.features);
      assert.deepEqual(report.classes.map((c) => c.label), data.labels);
      assert.deepEqual(report.classes.map((c) => c.count), data.counts);
      assert.deepEqual(report.removedFeatures, []);
      assert.equal(report.solver, 'exact');
      assert.equal(report.shrinkage, 0);
      report.classes.forEach((c) => assertClose(c.prior, 50 / 150, `prior of ${c.label} (empirical 50/150)`));
    });

    it('eigenvalues', function () {
      const ours = report.discriminant.eigenvalues;
      assertClose(ours, figure(py, 'eigenvalues'), 'eigenvalues'); // scipy.linalg.eigh(S_B, S_W)
      assertClose(ours, figure(rr, 'eigenvalues'), 'eigenvalues'); // R MASS::lda svd²·(K−1)/(n−K)
      assertClose(ours, figure(rr, 'eigenvaluesCholesky'), 'eigenvalues'); // R eigen on the Cholesky-whitened S_B
    });

    it('explained ratios and canonical correlations', function () {
      assertClose(report.discriminant.explainedRatio, figure(py, 'explainedRatio'), 'explained ratio'); // scipy λ/Σλ
      assertClose(report.discriminant.explainedRatio, figure(py, 'sklearnExplainedRatio'), 'explained ratio'); // sklearn LDA(svd).explained_variance_ratio_
      assertClose(report.discriminant.canonicalCorrelations, figure(py, 'canonicalCorrelations'), 'canonical correlations'); // scipy √(λ/(1+λ))
    });

    it('raw and standardized coefficients (our sign rule exactly; MASS up to the sign of each axis)', function () {
      assertClose(report.discriminant.coefficients, figure(py, 'coefficients'), 'coefficients'); // scipy eigh, wᵀS_W w = n − K, sign rule
      assertCloseUpToColumnSign(report.discriminant.coefficients, figure(rr, 'coefficients'), 'coefficients'); // R MASS lda()$scaling
      assertClose(report.discriminant.standardizedCoefficients, figure(py, 'standardizedCoefficients'), 'standardized coefficients'); // numpy w·pooled SD
      assertCloseUpToColumnSign(report.discriminant.standardizedCoefficients, figure(rr, 'standardizedCoefficients'), 'standardized coefficients'); // R MASS scaling·pooled SD
    });

    it('sign rule: on each axis the feature with the largest |standardized coefficient| has a positive coefficient', function () {
      const std = report.discriminant.standardizedCoefficients;
      for (let axis = 0; axis < report.discriminant.eigenvalues.length; axis++) {
        const column = std.map((row) => row[axis]);
        const largest = column.reduce((best, v, j) => (Math.abs(v) > Math.abs(column[best]) ? j : best), 0);
        assert.ok(column[largest] > 0, `axis ${axis + 1}: ${report.features[largest]} has ${column[largest]}`);
        assert.ok(report.discriminant.coefficients[largest][axis] > 0);
      }
    });

    it('structure matrix and class centroids', function () {
      assertClose(report.discriminant.structure, figure(py, 'structure'), 'structure'); // numpy pooled within-class correlations
      assertClose(report.discriminant.centroids, figure(py, 'centroids'), 'centroids'); // numpy class means of the scores
      assertCloseUpToColumnSign(report.discriminant.centroids, figure(rr, 'centroids'), 'centroids'); // R class means of MASS predict()$x
    });

    it('discriminant scores of every row; their pooled within-class covariance is I', function () {
      const k = report.discriminant.eigenvalues.length;
      const expected = sampledRows(report, figure<number[][]>(py, 'scores').value, k);
      assertClose(report.sample.ld, { source: figure(py, 'scores').source, value: expected }, 'LD scores'); // numpy (x − m)ᵀw
      const mass = figure<number[][]>(rr, 'scores');
      assertCloseUpToColumnSign(report.sample.ld, { source: mass.source, value: sampledRows(report, mass.value, k) }, 'LD scores'); // R MASS predict(lda)$x
      const identity = [[1, 0], [0, 1]];
      assertClose(pooledWithinCovariance(report.sample.ld, report.sample.classIndex, 3), identity, 'pooled within-class covariance of our scores');
    });

    it('condition number of the pooled within-class correlation matrix', function () {
      assertClose(report.conditionNumber, figure(py, 'conditionNumber'), 'condition number'); // numpy.linalg.cond
    });

    it('Wilks, Pillai, Hotelling–Lawley, Roy: R summary.manova', function () {
      for (const test of ['wilks', 'pillai', 'hotellingLawley', 'roy'] as const) {
        const ref = figure<{ statistic: number; F: number; df1: number; df2: number; p: number }>(rr, test);
        const ours = report.tests[test];
        for (const key of ['statistic', 'F', 'df1', 'df2'] as const) {
          assertClose(ours[key], { source: ref.source, value: ref.value[key] }, `${test} ${key}`);
        }
        assertClose(ours.p, { source: ref.source, value: ref.value.p }, `${test} p`, { relativeOnly: true });
      }
    });

    it("Bartlett's sequential χ² (numpy, Bartlett 1947)", function () {
      const ref = figure<{ chi2: number; df: number; p: number }[]>(py, 'bartlett');
      assert.equal(report.tests.bartlett.length, ref.value.length);
      ref.value.forEach((r, j) => {
        const ours = report.tests.bartlett[j];
        assertClose(ours.chi2, { source: ref.source, value: r.chi2 }, `Bartlett ${j} χ²`);
        assert.equal(ours.df, r.df, `Bartlett ${j} df`);
        assertClose(ours.p, { source: ref.source, value: r.p }, `Bartlett ${j} p`, { relativeOnly: true });
      });
    });

    it("Box's M (numpy, Box 1949 textbook formulas)", function () {
      const ref = figure<Record<string, number>>(py, 'boxM');
      const ours = report.tests.boxM;
      assert.ok(ours, 'Box M should be computed: every class has 50 > d + 1 rows');
      for (const key of ['M', 'chi2', 'df', 'F', 'df1', 'df2'] as const) {
        assertClose(ours[key], { source: ref.source, value: ref.value[key] }, `Box M ${key}`);
      }
      assertClose(ours.p, { source: ref.source, value: ref.value.p }, 'Box M p', { relativeOnly: true });
      assertClose(ours.pF, { source: ref.source, value: ref.value.pF }, 'Box M pF', { relativeOnly: true });
    });

    it('per-feature ANOVA F, p, η²', function () {
      // The report may order the features (e.g. by F); the references are in input order.
      const byFeature = report.features.map((f) => {
        const u = report.univariate.find((entry) => entry.feature === f);
        assert.ok(u, `no univariate entry for ${f}`);
        return u;
      });
      assert.equal(report.univariate.length, report.features.length);
      const F = byFeature.map((u) => u.F);
      const p = byFeature.map((u) => u.p);
      assertClose(F, figure(py, 'univariate.F'), 'ANOVA F'); // sklearn f_classif
      assertClose(p, figure(py, 'univariate.p'), 'ANOVA p', { relativeOnly: true }); // sklearn f_classif
      const aov = figure<{ F: number[]; p: number[] }>(rr, 'univariate');
      assertClose(F, { source: aov.source, value: aov.value.F }, 'ANOVA F'); // R summary(aov())
      assertClose(p, { source: aov.source, value: aov.value.p }, 'ANOVA p', { relativeOnly: true });
      assertClose(byFeature.map((u) => u.etaSquared), figure(py, 'univariate.etaSquared'), 'η²'); // numpy SS_B/SS_T
    });

    it('Mahalanobis distances between class centroids', function () {
      assert.deepEqual(report.centroidDistances.labels, report.classes.map((c) => c.label));
      assertClose(report.centroidDistances.matrix, figure(py, 'centroidDistances'), 'centroid distances'); // scipy mahalanobis
      assertClose(report.centroidDistances.matrix, figure(rr, 'centroidDistances'), 'centroid distances'); // R stats::mahalanobis
    });

    it('training accuracy, confusion matrix, per-class precision and recall', function () {
      assertExact(report.confusion.matrix, figure(rr, 'training.confusion'), 'training confusion'); // R MASS predict(lda)
      assertExact(report.confusion.matrix, figure(py, 'training.confusion'), 'training confusion'); // numpy Gaussian
      assertClose(report.accuracy.training, figure(rr, 'training.accuracy'), 'training accuracy');
      assert.equal(Math.round(report.accuracy.training * 150), figure(py, 'training.sklearnSvdCorrect').value); // sklearn LDA(svd).predict
      assertClose(report.perClass.map((c) => c.precision), figure(rr, 'training.precision'), 'precision'); // R MASS
      assertClose(report.perClass.map((c) => c.recall), figure(rr, 'training.recall'), 'recall'); // R MASS
    });

    it('leave-one-out accuracy, confusion and misclassified rows (brute-force refit; sklearn refit)', function () {
      const cv = report.accuracy.crossValidated;
      assert.ok(cv && cv.method === 'loo', `cross-validation should be loo, got ${JSON.stringify(cv)}`);
      assertClose(cv.value, figure(py, 'leaveOneOut.accuracy'), 'LOO accuracy'); // numpy brute-force refit
      assert.equal(Math.round(cv.value * 150), figure(py, 'leaveOneOut.sklearnCorrect').value, 'LOO correct vs sklearn cross_val_predict(LeaveOneOut)');
      assertExact(report.crossValidatedConfusion?.matrix, figure(py, 'leaveOneOut.confusion'), 'LOO confusion'); // numpy brute force
      assertExact(report.crossValidatedConfusion?.matrix, figure(py, 'leaveOneOut.sklearnConfusion'), 'LOO confusion'); // sklearn
      assertClose(report.perClass.map((c) => c.cvRecall ?? NaN), figure(py, 'leaveOneOut.recall'), 'LOO recall');
      checkMisclassified(report, figure(py, 'leaveOneOut.posterior'), truth, 'LOO');
    });

    it('PCA on the covariance: explained ratios, loadings, PC1–PC2 scores', function () {
      assert.equal(report.pca.scale, 'covariance');
      assertClose(report.pca.explainedRatio, figure(py, 'pca.covariance.explainedRatio'), 'PCA ratio'); // sklearn PCA
      assertClose(report.pca.explainedRatio, figure(rr, 'pca.covariance'), 'PCA ratio'); // R prcomp
      assertClose(report.pca.loadings, figure(py, 'pca.covariance.loadings'), 'PCA loadings'); // sklearn components_, sign rule
      const scores = figure<number[][]>(py, 'pca.covariance.scores');
      assertClose(report.sample.pc, { source: scores.source, value: sampledRows(report, scores.value, 2) }, 'PC scores');
    });
  });

  describe('PCA on standardized features', function () {
    it('explained ratios, loadings and PC1–PC2 scores', async function () {
      const r = await fitFixture(IRIS, { ...BASE, cv: 'none', pcaScale: 'standardized' });
      assert.equal(r.pca.scale, 'standardized');
      assertClose(r.pca.explainedRatio, figure(py, 'pca.standardized.explainedRatio'), 'PCA ratio'); // sklearn StandardScaler + PCA
      assertClose(r.pca.explainedRatio, figure(rr, 'pca.standardized'), 'PCA ratio'); // R prcomp(scale. = TRUE)
      assertClose(r.pca.loadings, figure(py, 'pca.standardized.loadings'), 'PCA loadings');
      // Scores of standardized features depend on the SD divisor: sklearn's StandardScaler uses n;
      // the product's PCA (pca.ts) scales by the SD with divisor n − 1 — reference: sklearn's
      // scores times √((n − 1)/n).
      const scores = figure<number[][]>(py, 'pca.standardized.scoresSampleSd');
      assertClose(r.sample.pc, { source: scores.source, value: sampledRows(r, scores.value, 2) }, 'PC scores (standardized)');
    });
  });

  describe('stratified k-fold cross-validation (folds from the documented rule, re-implemented in Python)', function () {
    for (const k of [5, 10]) {
      for (const seed of [1, 7]) {
        it(`kfold:${k}, seed ${seed}: accuracy and confusion equal a brute-force fit per fold`, async function () {
          const r = await fitFixture(IRIS, { ...BASE, cv: `kfold:${k}`, seed });
          const key = `kfold${k}seed${seed}`;
          const cv = r.accuracy.crossValidated;
          assert.ok(cv && cv.method === `kfold:${k}`, `cross-validation should be kfold:${k}, got ${JSON.stringify(cv)}`);
          assertExact(r.crossValidatedConfusion?.matrix, figure(py, `${key}.confusion`), `${key} confusion`); // numpy per-fold refit
          assertClose(cv.value, figure(py, `${key}.accuracy`), `${key} accuracy`);
          assert.equal(Math.round(cv.value * 150), figure(py, `${key}.sklearnCorrect`).value, `${key} correct vs sklearn PredefinedSplit`);
          checkMisclassified(r, figure(py, `${key}.posterior`), truth, key);
        });
      }
    }
  });

  describe('shrinkage solver (Ledoit–Wolf on within-class-centred rows)', function () {
    it('intensity, eigenvalues, explained ratios, training confusion', async function () {
      const r = await fitFixture(IRIS, { ...BASE, solver: 'shrinkage', cv: 'none' });
      assert.equal(r.solver, 'shrinkage');
      assertClose(r.shrinkage, figure(py, 'shrinkage.intensity'), 'Ledoit–Wolf intensity'); // sklearn ledoit_wolf(Z, assume_centered=True)
      assertClose(r.discriminant.eigenvalues, figure(py, 'shrinkage.eigenvalues'), 'shrinkage eigenvalues'); // scipy eigh(S_B, n·shrunk)
      assertClose(r.discriminant.explainedRatio, figure(py, 'shrinkage.explainedRatio'), 'shrinkage explained ratio');
      assertExact(r.confusion.matrix, figure(py, 'shrinkage.training.confusion'), 'shrinkage training confusion'); // numpy Σ = n·shrunk/(n − K)
    });
  });

  describe('uniform priors', function () {
    it('training confusion (MASS prior = 1/3) and leave-one-out (MASS CV = TRUE, prior = 1/3)', async function () {
      const r = await fitFixture(IRIS, { ...BASE, priors: 'uniform' });
      r.classes.forEach((c) => assertClose(c.prior, 1 / 3, `prior of ${c.label}`));
      assertExact(r.confusion.matrix, figure(rr, 'trainingUniform.confusion'), 'uniform training confusion'); // R MASS lda(prior = rep(1/3, 3))
      assertExact(r.crossValidatedConfusion?.matrix, figure(rr, 'leaveOneOutUniform.confusion'), 'uniform LOO confusion'); // R MASS lda(CV = TRUE, prior)
      checkMisclassified(r, figure(rr, 'leaveOneOutUniform.posterior'), truth, 'uniform LOO (MASS)');
      checkMisclassified(r, figure(py, 'leaveOneOutUniform.posterior'), truth, 'uniform LOO (numpy)');
    });
  });
});
