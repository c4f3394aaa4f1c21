/**
 * Everything a report holds that follows from the per-class moments alone: the discriminant
 * solution, PCA, the separability tests, univariate ANOVA, centroid distances, and the findings
 * about features, classes and the solver. No row is read here, so a fit from moments merged from
 * shards or computed by a database gives these same figures.
 *
 * Tests after shrinkage: the multivariate tests and Bartlett's tests are defined for the exact
 * (unshrunk) within-class scatter. When the shrinkage solver was used, the exact problem is solved
 * too on the same moments; when it keeps the same features (S_W is nonsingular on them), the tests
 * use its eigenvalues and are exact. Otherwise (S_W singular, e.g. fewer rows than features) they
 * are computed from the shrunk problem's eigenvalues and the finding `approximate-p-values` says so.
 */
import {
  approximatePValueFinding,
  boxMSkippedFinding,
  classFindings,
  illConditionedFinding,
  leakageFindings,
  passThrough,
  removalCode,
  removedFeatureFindings,
  shrinkageFinding,
  testsUndefinedFinding,
} from '../findings';
import type { LdaSolution } from '../lda';
import { solveLda } from '../lda';
import type { Moments } from '../moments';
import { meanDeviations, overallMean } from '../moments';
import type { PcaSolution } from '../pca';
import { solvePca } from '../pca';
import { bartlettSequential, boxM, centroidMahalanobisWhitened, hotellingLawley, multivariateTestIssue, pillai, roy, univariateAnova, wilks } from '../stats/index';
import type { FitOptions, FitReport, Finding } from '../types';

/** The part of a FitReport that the moments determine. */
export type MomentsReport = Pick<
  FitReport,
  'classes' | 'features' | 'removedFeatures' | 'solver' | 'shrinkage' | 'conditionNumber' | 'discriminant' | 'tests' | 'univariate' | 'centroidDistances' | 'pca'
>;

export interface MomentsFit {
  report: MomentsReport;
  solution: LdaSolution;
  pca: PcaSolution;
  /** Univariate results in the moments' feature order (the report's list is sorted by F). */
  univariateByFeature: { feature: string; F: number; p: number; etaSquared: number }[];
  /** Per moments feature: mean and standard deviation (divisor n − 1) over all rows. */
  spread: { mean: number; standardDeviation: number }[];
  findings: Finding[];
}

/** Features whose removal is reported; the reason is the finding code. */
export interface DroppedColumn {
  feature: string;
  reason: string;
}

/** A row-major `rows × columns` Float64Array as nested arrays. */
export function toRows(values: Float64Array, rows: number, columns: number): number[][] {
  return Array.from({ length: rows }, (_, i) => Array.from(values.subarray(i * columns, (i + 1) * columns)));
}

function sameIndices(a: readonly number[], b: readonly number[]): boolean {
  return a.length === b.length && a.every((v, i) => v === b[i]);
}

/** The p × p block of a d × d row-major matrix at the given indices (the matrix itself when they are 0..d−1). */
function block(matrix: Float64Array, d: number, indices: readonly number[]): Float64Array {
  const p = indices.length;
  if (p === d && indices.every((v, i) => v === i)) return matrix;
  const out = new Float64Array(p * p);
  for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) out[a * p + b] = matrix[indices[a]! * d + indices[b]!]!;
  return out;
}

export function fitMoments(moments: Moments, options: FitOptions, dropped: readonly DroppedColumn[] = []): MomentsFit {
  const solution = solveLda(moments, { solver: options.solver, priors: options.priors });
  const d = moments.features.length;
  const kept = solution.kept;
  const r = kept.length;
  const K = solution.labels.length;
  const n = solution.n;
  const k = solution.eigenvalues.length;
  const findings: Finding[] = [];

  // Class order of the solution; moments classes may be in any order.
  const byLabel = new Map(moments.classes.map((c) => [c.label, c]));
  const classes = solution.labels.map((label) => byLabel.get(label)!);

  // Tests from the exact problem where it exists (see the module comment).
  let testEigenvalues = solution.eigenvalues;
  if (solution.solver === 'shrinkage') {
    const exact = solveLda(moments, { solver: 'exact', priors: options.priors });
    if (sameIndices(exact.kept, kept) && exact.eigenvalues.every(Number.isFinite)) testEigenvalues = exact.eigenvalues;
    else if (multivariateTestIssue(r, K, n) === null) findings.push(approximatePValueFinding());
  }
  const lambdas = Array.from(testEigenvalues);
  const undefinedTests = multivariateTestIssue(r, K, n);
  if (undefinedTests !== null) findings.push(testsUndefinedFinding(undefinedTests));
  // With the exact solver the whitening factor L is the Cholesky factor of the pooled within-class
  // correlation matrix on the kept features, whose log-determinant Box's M needs: 2 Σ ln L_qq.
  let pooledLogDeterminant: number | undefined;
  if (solution.solver === 'exact') {
    const l = solution.whitening.factor;
    pooledLogDeterminant = 0;
    for (let q = 0; q < r; q++) pooledLogDeterminant += 2 * Math.log(l[q * r + q]!);
  }
  const box = boxM(
    classes.map((c) => ({ count: c.count, scatter: block(c.scatter, d, kept), label: `class '${c.label}'` })),
    r,
    pooledLogDeterminant,
  );
  if ('skipped' in box) findings.push(boxMSkippedFinding(box.skipped));

  // Diagonals of S_W and S_T only (summed as withinScatter and totalScatter sum them).
  const withinDiagonal = new Float64Array(d);
  for (const c of moments.classes) for (let j = 0; j < d; j++) withinDiagonal[j] += c.scatter[j * d + j]!;
  const totalDiagonal = Float64Array.from(withinDiagonal);
  const betweenDiagonal = new Float64Array(d);
  meanDeviations(moments).forEach((dev, c) => {
    const count = moments.classes[c]!.count;
    for (let j = 0; j < d; j++) betweenDiagonal[j] += count * dev[j]! * dev[j]!;
  });
  for (let j = 0; j < d; j++) totalDiagonal[j] += betweenDiagonal[j]!;
  const means = new Float64Array(K * d);
  classes.forEach((c, i) => means.set(c.mean, i * d));
  const anova = univariateAnova(
    classes.map((c) => c.count),
    means,
    withinDiagonal,
    d,
  );
  const univariateByFeature = anova.map((a, j) => ({ feature: moments.features[j]!, F: a.F, p: a.p, etaSquared: a.etaSquared }));
  const univariate = univariateByFeature
    .map((u, j) => ({ u, j }))
    .sort((a, b) => b.u.F - a.u.F || a.j - b.j)
    .map(({ u }) => u);

  // Under the within-class covariance as solved (withinScatter / (n − K)), from its whitening.
  const distances = centroidMahalanobisWhitened(solution.classMeans, K, solution.whitening, Math.max(1, n - K));

  const pca = solvePca(moments, options.pcaScale, kept);
  const mean = overallMean(moments);
  const spread = moments.features.map((_, j) => ({ mean: mean[j]!, standardDeviation: n > 1 ? Math.sqrt(Math.max(0, totalDiagonal[j]!) / (n - 1)) : 0 }));

  // Findings about features, classes and the solver.
  findings.push(...removedFeatureFindings(solution.removed));
  findings.push(...classFindings(classes.map((c) => ({ label: c.label, count: c.count })), r));
  findings.push(
    ...leakageFindings(
      moments.features
        .map((feature, j) => ({
          feature,
          etaSquared: univariateByFeature[j]!.etaSquared,
          ranges: classes.map((c) => ({ label: c.label, count: c.count, min: c.min[j]!, max: c.max[j]! })),
        }))
        .filter((f) => !solution.removed.some((x) => x.feature === f.feature && x.reason === 'constant')),
    ),
  );
  // The solver's warnings, less those a finding above already states: the same code on the same
  // columns, or perfect separation by columns already reported as constant within classes.
  const ldaCodes = new Set(solution.warnings.map((w) => w.code));
  const constantWithin = new Set(solution.removed.filter((f) => f.reason === 'constant-within-classes').map((f) => f.feature));
  const stated = (w: { code: string; columns?: string[] }): boolean =>
    findings.some((f) => f.code === w.code && sameColumns(f.columns, w.columns)) ||
    (w.code === 'perfect-separation' && (w.columns ?? []).length > 0 && (w.columns ?? []).every((c) => constantWithin.has(c)));
  findings.push(...passThrough(solution.warnings.filter((w) => !stated(w))));
  if (solution.solver === 'shrinkage' && !ldaCodes.has('shrinkage-used')) {
    const why =
      options.solver === 'shrinkage'
        ? 'the shrinkage solver was asked for.'
        : n - K <= r
          ? `there are ${n - K} degrees of freedom within classes for ${r} features, too few for a stable covariance estimate.`
          : `the within-class correlation matrix is ill-conditioned (condition number ${solution.conditionNumber.toPrecision(3)}).`;
    findings.push(shrinkageFinding(solution.shrinkage, why));
  }
  if (!ldaCodes.has('ill-conditioned')) {
    const ill = illConditionedFinding(solution.conditionNumber, solution.solver);
    if (ill) findings.push(ill);
  }

  const report: MomentsReport = {
    classes: classes.map((c, i) => ({ label: c.label, count: c.count, prior: solution.priors[i]! })),
    features: kept.map((j) => moments.features[j]!),
    removedFeatures: [
      ...dropped.map((f) => ({ feature: f.feature, reason: f.reason })),
      ...solution.removed.map((f) => ({ feature: f.feature, reason: removalCode(f.reason) })),
    ],
    solver: solution.solver,
    shrinkage: solution.shrinkage,
    conditionNumber: solution.conditionNumber,
    discriminant: {
      eigenvalues: Array.from(solution.eigenvalues),
      explainedRatio: Array.from(solution.explainedRatio),
      canonicalCorrelations: Array.from(solution.canonicalCorrelations),
      coefficients: toRows(solution.directions, r, k),
      standardizedCoefficients: toRows(solution.standardizedCoefficients, r, k),
      structure: toRows(solution.structure, r, k),
      centroids: toRows(solution.centroids, K, k),
    },
    tests: {
      wilks: wilks(lambdas, r, K, n),
      pillai: pillai(lambdas, r, K, n),
      hotellingLawley: hotellingLawley(lambdas, r, K, n),
      roy: roy(lambdas, r, K, n),
      bartlett: bartlettSequential(lambdas, r, K, n),
      boxM: 'skipped' in box ? null : box,
    },
    univariate,
    centroidDistances: { labels: [...solution.labels], matrix: distances },
    pca: {
      scale: pca.scale,
      explainedRatio: Array.from(pca.explainedRatio),
      loadings: toRows(pca.loadings, r, pca.components),
    },
  };
  return { report, solution, pca, univariateByFeature, spread, findings };
}

function sameColumns(a: readonly string[] | undefined, b: readonly string[] | undefined): boolean {
  const x = [...(a ?? [])].sort();
  const y = [...(b ?? [])].sort();
  return x.length === y.length && x.every((v, i) => v === y[i]);
}
