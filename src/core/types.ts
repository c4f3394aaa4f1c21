/**
 * The options of an analysis and the report it produces. The report is the JSON contract of
 * `scatterwise fit --format json`, the payload the panel draws and what `compare` diffs: change a
 * field here and every consumer sees it at compile time.
 */
import type { ReadOptions } from './read/types';

/** Allowed values, declared once; the CLI, the settings and the config schema read them from here. */
export const SOLVERS = ['auto', 'exact', 'shrinkage'] as const;
export type Solver = (typeof SOLVERS)[number];
export const PRIORS = ['empirical', 'uniform'] as const;
export type Priors = (typeof PRIORS)[number];
export const MISSING_POLICIES = ['drop-rows', 'drop-columns'] as const;
export type MissingPolicy = (typeof MISSING_POLICIES)[number];
export const PCA_SCALES = ['covariance', 'standardized'] as const;
export type PcaScale = (typeof PCA_SCALES)[number];

/** `none`, `loo`, or `kfold:N`; `auto` picks loo while it is cheap, else kfold:10. */
export type CvMethod = 'auto' | 'none' | 'loo' | `kfold:${number}`;

export interface RoleOptions {
  /** Label column name; default detected (see roles.ts). */
  label?: string;
  /** Feature column names, in this order; default every numeric column but the label. */
  features?: string[];
  /** Columns never used as features. */
  exclude?: string[];
}

export interface FitOptions extends RoleOptions {
  solver: Solver;
  priors: Priors;
  cv: CvMethod;
  /** Seed of the fold generator (folds.ts). */
  seed: number;
  missing: MissingPolicy;
  pcaScale: PcaScale;
  /** Most misclassified rows listed in the report. */
  misclassifiedLimit: number;
  /** Points the panel's plots may draw (a deterministic stratified sample). */
  plotBudget: number;
  read: ReadOptions;
}

export const DEFAULT_FIT_OPTIONS: FitOptions = {
  solver: 'auto',
  priors: 'empirical',
  cv: 'auto',
  seed: 1,
  missing: 'drop-rows',
  pcaScale: 'covariance',
  misclassifiedLimit: 100,
  plotBudget: 50_000,
  read: {},
};

export type Severity = 'info' | 'warning' | 'error';

/** A data-quality finding: a stable code, a plain message, and what it is about. */
export interface Finding {
  code: string;
  severity: Severity;
  message: string;
  columns?: string[];
  /** 0-based data rows. */
  rows?: number[];
}

/** A multivariate test of equal class means (Rao's F approximation for Wilks). */
export interface MultivariateTest {
  statistic: number;
  F: number;
  df1: number;
  df2: number;
  p: number;
}

export interface FitReport {
  /** Report format version; bump on an incompatible change. */
  version: 1;
  source: {
    name: string;
    format: 'csv' | 'tsv' | 'parquet';
    bytes: number;
    sha256?: string;
    delimiter?: string;
    /** Bytes the figures rest on when the report is provisional (only the first bytes were read); absent otherwise. */
    bytesRead?: number;
  };
  options: FitOptions;
  label: string;
  rows: { total: number; used: number; dropped: number; droppedMissing: number; droppedNonFinite: number; droppedRagged: number };
  /** Classes in the report's order (see roles.ts: numeric labels by value, others by code point). */
  classes: { label: string; count: number; prior: number }[];
  /** Features actually used in the solved problem, in input order. */
  features: string[];
  /** Features asked for but removed before solving (constant, dependent, …), with the finding code. */
  removedFeatures: { feature: string; reason: string }[];
  solver: 'exact' | 'shrinkage';
  /** Ledoit–Wolf intensity in [0, 1]; 0 with the exact solver. */
  shrinkage: number;
  /** Condition number of the pooled within-class correlation matrix that was solved. */
  conditionNumber: number;
  discriminant: {
    /** λ_i of S_B w = λ S_W w, descending; length k = min(K − 1, rank). */
    eigenvalues: number[];
    /** λ_i / Σλ of the problem solved; sums to 1. */
    explainedRatio: number[];
    /** √(λ/(1 + λ)). */
    canonicalCorrelations: number[];
    /** Raw coefficients, features × k (row-major per feature): score = (x − mean)ᵀ w. */
    coefficients: number[][];
    /** Coefficients times the pooled within-class standard deviation of each feature. */
    standardizedCoefficients: number[][];
    /** Correlation of each feature with each discriminant score, pooled within classes. features × k. */
    structure: number[][];
    /** Class centroids in score space, classes × k. */
    centroids: number[][];
  };
  tests: {
    wilks: MultivariateTest;
    pillai: MultivariateTest;
    hotellingLawley: MultivariateTest;
    roy: MultivariateTest;
    /** Bartlett's sequential χ² tests: entry j tests discriminants j+1..k together. */
    bartlett: { chi2: number; df: number; p: number }[];
    /** null when a class has fewer rows than d + 1 (a finding says so). */
    boxM: { M: number; chi2: number; df: number; p: number; F: number; df1: number; df2: number; pF: number } | null;
  };
  univariate: { feature: string; F: number; p: number; etaSquared: number }[];
  /** Mahalanobis distances between class centroids under the pooled within-class covariance. */
  centroidDistances: { labels: string[]; matrix: number[][] };
  accuracy: {
    training: number;
    crossValidated: { method: 'loo' | `kfold:${number}`; value: number; folds?: number } | null;
  };
  /** Training (resubstitution) confusion: rows true class, columns predicted, classes' order. */
  confusion: { labels: string[]; matrix: number[][] };
  /** Cross-validated confusion, same layout, when cross-validation ran. */
  crossValidatedConfusion: { labels: string[]; matrix: number[][] } | null;
  perClass: { label: string; precision: number; recall: number; cvRecall: number | null }[];
  /** Misclassified rows under cross-validation (training when none ran), capped by misclassifiedLimit. */
  misclassified: { row: number; line?: number; label: string; predicted: string; posterior: number }[];
  misclassifiedTotal: number;
  pca: {
    scale: PcaScale;
    explainedRatio: number[];
    /** Loadings of the first components, features × min(d, 10). */
    loadings: number[][];
  };
  findings: Finding[];
  /** Plot sample: a deterministic stratified subset of rows with their scores. */
  sample: {
    total: number;
    rows: number[];
    lines?: number[];
    classIndex: number[];
    /** rows × min(k, 3) discriminant scores. */
    ld: number[][];
    /** rows × 2 principal component scores. */
    pc: number[][];
    /** rows × up to 5 feature values (the top univariate features). */
    topFeatures: { names: string[]; values: number[][] };
  };
  /** ms spent per phase. */
  timing: { inspect: number; moments: number; solve: number; rows: number; total: number };
  /** True when computed from the first bytes only (the editor's quick answer). */
  provisional: boolean;
}
