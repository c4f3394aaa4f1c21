/**
 * What changed between two fits of a data file (the base, e.g. the main branch, and the head, the
 * pull request): rows, classes gained and lost, columns added and removed, discriminant
 * eigenvalues and explained ratios, accuracy, per-class recall, findings new and resolved. Pure
 * arithmetic on two FitReports; the words are in reasons.ts, the gates in gates.ts.
 */
import type { Finding, FitReport } from '../types';
import { significantDiscriminants } from '../format/verdict';

/** A figure on both sides; `delta` = head − base. */
export interface Change {
  base: number;
  head: number;
  delta: number;
}

/** A figure that may be missing on either side (a discriminant that exists on one side only). */
export interface OptionalChange {
  base: number | null;
  head: number | null;
  delta: number | null;
}

export interface ClassCountChange {
  label: string;
  /** Rows of the class, 0 when absent on that side. */
  base: number;
  head: number;
}

export interface RecallChange extends OptionalChange {
  label: string;
  /** Which recall was compared: cross-validated when both sides have it, else training. */
  kind: 'cross-validated' | 'training';
}

export interface ReportDeltas {
  baseName: string;
  headName: string;
  rows: { total: Change; used: Change; dropped: Change };
  classes: {
    gained: ClassCountChange[];
    lost: ClassCountChange[];
    /** Classes on both sides, in the head's order, with their counts. */
    kept: ClassCountChange[];
  };
  /** All columns of the table, when known (both sides' column lists were given). */
  columns: { added: string[]; removed: string[] } | null;
  /** Feature columns used in the solved problem. */
  features: { added: string[]; removed: string[] };
  label: { base: string; head: string };
  discriminants: { index: number; eigenvalue: OptionalChange; explainedRatio: OptionalChange; canonicalCorrelation: OptionalChange }[];
  significantDiscriminants: Change;
  wilks: { statistic: Change; p: Change };
  accuracy: {
    training: Change;
    /** Null when neither side was cross-validated. */
    crossValidated: (OptionalChange & { baseMethod: string | null; headMethod: string | null }) | null;
    /** Rows the two accuracies rest on, for judging whether a change exceeds sampling noise. */
    rows: Change;
  };
  perClassRecall: RecallChange[];
  findings: { added: Finding[]; resolved: Finding[] };
  /** Fit options that differ, as `name: base → head`. */
  options: { name: string; base: string; head: string }[];
  /** The head's priors (they decide how class sizes move the boundaries). */
  priors: 'empirical' | 'uniform';
}

function change(base: number, head: number): Change {
  return { base, head, delta: head - base };
}

function optional(base: number | undefined | null, head: number | undefined | null): OptionalChange {
  const b = base ?? null;
  const h = head ?? null;
  return { base: b, head: h, delta: b !== null && h !== null ? h - b : null };
}

/**
 * The identity of a finding across two fits: its code and the columns it is about (its message
 * carries counts, which may change while the problem stays the same).
 */
export function findingKey(finding: Finding): string {
  return `${finding.code}\u0000${[...(finding.columns ?? [])].sort().join('\u0001')}`;
}

function difference(a: readonly string[], b: readonly string[]): string[] {
  const other = new Set(b);
  return a.filter((x) => !other.has(x));
}

/** Option values that shape the fit, as text (what a reviewer would compare). */
function optionTexts(report: FitReport): Record<string, string> {
  const o = report.options;
  return {
    solver: report.solver === o.solver ? o.solver : `${o.solver} (${report.solver})`,
    priors: o.priors,
    'cross-validation': report.accuracy.crossValidated?.method ?? (o.cv === 'none' ? 'none' : `${o.cv} (not run)`),
    'missing values': o.missing,
    'PCA scale': o.pcaScale,
    seed: String(o.seed),
  };
}

/** Per-class recall on both sides: cross-validated when both sides have it, else training. */
function recallChanges(base: FitReport, head: FitReport): RecallChange[] {
  const crossValidated = base.accuracy.crossValidated !== null && head.accuracy.crossValidated !== null;
  const recallOf = (report: FitReport): Map<string, number> =>
    new Map(report.perClass.map((p) => [p.label, crossValidated ? (p.cvRecall ?? NaN) : p.recall]));
  const baseRecall = recallOf(base);
  const headRecall = recallOf(head);
  const labels = [...head.classes.map((c) => c.label), ...base.classes.map((c) => c.label).filter((l) => !headRecall.has(l))];
  return labels.map((label) => ({ label, kind: crossValidated ? 'cross-validated' : 'training', ...optional(baseRecall.get(label), headRecall.get(label)) }));
}

/**
 * The deltas between two reports of the same data file. `columns` are the full column lists of
 * the two tables when the caller has them (the report lists only the features used).
 */
export function compareReports(base: FitReport, head: FitReport, columns?: { base: readonly string[]; head: readonly string[] }): ReportDeltas {
  const baseCounts = new Map(base.classes.map((c) => [c.label, c.count]));
  const headCounts = new Map(head.classes.map((c) => [c.label, c.count]));
  const gained = head.classes.filter((c) => !baseCounts.has(c.label)).map((c) => ({ label: c.label, base: 0, head: c.count }));
  const lost = base.classes.filter((c) => !headCounts.has(c.label)).map((c) => ({ label: c.label, base: c.count, head: 0 }));
  const kept = head.classes.filter((c) => baseCounts.has(c.label)).map((c) => ({ label: c.label, base: baseCounts.get(c.label)!, head: c.count }));

  const k = Math.max(base.discriminant.eigenvalues.length, head.discriminant.eigenvalues.length);
  const discriminants = Array.from({ length: k }, (_, j) => ({
    index: j,
    eigenvalue: optional(base.discriminant.eigenvalues[j], head.discriminant.eigenvalues[j]),
    explainedRatio: optional(base.discriminant.explainedRatio[j], head.discriminant.explainedRatio[j]),
    canonicalCorrelation: optional(base.discriminant.canonicalCorrelations[j], head.discriminant.canonicalCorrelations[j]),
  }));

  const baseCv = base.accuracy.crossValidated;
  const headCv = head.accuracy.crossValidated;
  const baseKeys = new Set(base.findings.map(findingKey));
  const headKeys = new Set(head.findings.map(findingKey));

  const baseOptions = optionTexts(base);
  const headOptions = optionTexts(head);
  const options = Object.keys(headOptions)
    .filter((name) => baseOptions[name] !== headOptions[name])
    .map((name) => ({ name, base: baseOptions[name]!, head: headOptions[name]! }));

  return {
    baseName: base.source.name,
    headName: head.source.name,
    rows: { total: change(base.rows.total, head.rows.total), used: change(base.rows.used, head.rows.used), dropped: change(base.rows.dropped, head.rows.dropped) },
    classes: { gained, lost, kept },
    columns: columns ? { added: difference(columns.head, columns.base), removed: difference(columns.base, columns.head) } : null,
    features: { added: difference(head.features, base.features), removed: difference(base.features, head.features) },
    label: { base: base.label, head: head.label },
    discriminants,
    significantDiscriminants: change(significantDiscriminants(base), significantDiscriminants(head)),
    wilks: { statistic: change(base.tests.wilks.statistic, head.tests.wilks.statistic), p: change(base.tests.wilks.p, head.tests.wilks.p) },
    accuracy: {
      training: change(base.accuracy.training, head.accuracy.training),
      crossValidated: baseCv || headCv ? { ...optional(baseCv?.value, headCv?.value), baseMethod: baseCv?.method ?? null, headMethod: headCv?.method ?? null } : null,
      rows: change(base.rows.used, head.rows.used),
    },
    perClassRecall: recallChanges(base, head),
    findings: {
      added: head.findings.filter((f) => !baseKeys.has(findingKey(f))),
      resolved: base.findings.filter((f) => !headKeys.has(findingKey(f))),
    },
    options,
    priors: head.options.priors,
  };
}

/**
 * The standard error of the difference of two accuracies measured on n₁ and n₂ rows, treating each
 * as a binomial proportion: √(p₁(1−p₁)/n₁ + p₂(1−p₂)/n₂). Cross-validated predictions are not
 * independent draws, so this is a rough yardstick for "beyond sampling noise", not a test.
 */
export function accuracyNoise(base: number, head: number, baseRows: number, headRows: number): number {
  const term = (p: number, n: number): number => (n > 0 ? (p * (1 - p)) / n : 0);
  return Math.sqrt(term(base, baseRows) + term(head, headRows));
}
