/**
 * Data-quality findings: each has a stable code (what tools and the CI gate key on), a severity and a
 * plain message naming the columns and rows involved. The functions here turn facts gathered by the
 * pipeline (counts, moments, the LDA solution) into findings; they compute nothing from rows.
 *
 * Severity: `error` = the analysis is not trustworthy as it stands; `warning` = look at it before
 * trusting the figures; `info` = worth knowing.
 */
import type { CellExample } from './read/types';
import type { Finding, MissingPolicy, Severity } from './types';
import { formatCombination, formatCount, formatNumber, formatPercent, listNames } from './format/numbers';

const SEVERITY_ORDER: Record<Severity, number> = { error: 0, warning: 1, info: 2 };

export function finding(code: string, severity: Severity, message: string, columns?: string[], rows?: number[]): Finding {
  const result: Finding = { code, severity, message };
  if (columns && columns.length > 0) result.columns = columns;
  if (rows && rows.length > 0) result.rows = rows;
  return result;
}

/** Errors first, then warnings, then info; by code within a severity; otherwise in the order found. */
export function sortFindings(findings: readonly Finding[]): Finding[] {
  return findings
    .map((f, i) => ({ f, i }))
    .sort((a, b) => SEVERITY_ORDER[a.f.severity] - SEVERITY_ORDER[b.f.severity] || (a.f.code < b.f.code ? -1 : a.f.code > b.f.code ? 1 : a.i - b.i))
    .map(({ f }) => f);
}

function where(example: CellExample): string {
  return example.line !== undefined ? `line ${example.line}` : `row ${example.row}`;
}

// ---- cells and columns (pass 1) ---------------------------------------------------------------

/** What pass 1 counted in one feature column, over every row with a label. */
export interface FeatureCellCounts {
  feature: string;
  /** Cells that were a missing token (or null in Parquet). */
  missing: number;
  /** Cells present but not a number. */
  nonNumeric: number;
  nonNumericExamples: CellExample[];
  positiveInfinity: number;
  negativeInfinity: number;
}

export interface MissingValueFacts {
  label: string;
  /** Rows whose label is missing (always dropped). */
  labelMissing: number;
  features: readonly FeatureCellCounts[];
  policy: MissingPolicy;
  /** Rows dropped for a missing label or a missing feature value under the policy. */
  rowsDropped: number;
  /** Feature columns dropped by the `drop-columns` policy. */
  columnsDropped: readonly string[];
}

/** `missing-values`: per column counts, and what the policy did about them. */
export function missingValueFinding(facts: MissingValueFacts): Finding | null {
  const withMissing = facts.features.filter((f) => f.missing > 0);
  if (withMissing.length === 0 && facts.labelMissing === 0) return null;
  const parts = withMissing.map((f) => `'${f.feature}' ${formatCount(f.missing)}`);
  if (facts.labelMissing > 0) parts.unshift(`label '${facts.label}' ${formatCount(facts.labelMissing)}`);
  let policy: string;
  if (facts.policy === 'drop-columns' && facts.columnsDropped.length > 0) {
    policy = `policy drop-columns: dropped the column${facts.columnsDropped.length > 1 ? 's' : ''} ${listNames(facts.columnsDropped)}`;
    policy += facts.rowsDropped > 0 ? ` and ${formatCount(facts.rowsDropped)} row${facts.rowsDropped > 1 ? 's' : ''} with a missing label or an unreadable value` : '';
  } else {
    policy = `policy ${facts.policy}: ${formatCount(facts.rowsDropped)} row${facts.rowsDropped === 1 ? '' : 's'} dropped`;
  }
  const columns = withMissing.map((f) => f.feature);
  if (facts.labelMissing > 0) columns.unshift(facts.label);
  return finding('missing-values', 'warning', `Missing values: ${parts.join(', ')}; ${policy}.`, columns);
}

/** `non-numeric-cells`: cells in a numeric column that are not numbers, with the first examples. */
export function nonNumericCellFindings(features: readonly FeatureCellCounts[]): Finding[] {
  return features
    .filter((f) => f.nonNumeric > 0)
    .map((f) => {
      const examples = f.nonNumericExamples.slice(0, 3).map((e) => `${where(e)}: '${e.text}'`);
      const shown = examples.length > 0 ? ` (${examples.join('; ')})` : '';
      return finding(
        'non-numeric-cells',
        'warning',
        `Column '${f.feature}' has ${formatCount(f.nonNumeric)} cell${f.nonNumeric > 1 ? 's' : ''} that ${f.nonNumeric > 1 ? 'are' : 'is'} not a number${shown}; treated as missing.`,
        [f.feature],
        f.nonNumericExamples.map((e) => e.row),
      );
    });
}

/** `infinite-values`: ±∞ cells; the rows holding them are dropped. */
export function infiniteValueFinding(features: readonly FeatureCellCounts[], rowsDropped: number): Finding | null {
  const withInfinity = features.filter((f) => f.positiveInfinity + f.negativeInfinity > 0);
  if (withInfinity.length === 0) return null;
  const parts = withInfinity.map((f) => {
    const signs = [f.positiveInfinity > 0 ? `+∞ ×${f.positiveInfinity}` : '', f.negativeInfinity > 0 ? `−∞ ×${f.negativeInfinity}` : ''].filter(Boolean);
    return `'${f.feature}' (${signs.join(', ')})`;
  });
  return finding(
    'infinite-values',
    'warning',
    `Infinite values in ${parts.join(', ')}; ${formatCount(rowsDropped)} row${rowsDropped === 1 ? '' : 's'} holding them dropped.`,
    withInfinity.map((f) => f.feature),
  );
}

/** `non-numeric-column` and `empty-column`: columns left out of the features. */
export function unusedColumnFindings(text: readonly string[], empty: readonly string[]): Finding[] {
  const found: Finding[] = [];
  if (text.length > 0) {
    found.push(finding('non-numeric-column', 'info', `Text column${text.length > 1 ? 's' : ''} ${listNames(text)} ${text.length > 1 ? 'are' : 'is'} not numeric and not used as features.`, [...text]));
  }
  if (empty.length > 0) {
    found.push(finding('empty-column', 'info', `Column${empty.length > 1 ? 's' : ''} ${listNames(empty)} ${empty.length > 1 ? 'have' : 'has'} no values in the sampled rows and ${empty.length > 1 ? 'are' : 'is'} not used.`, [...empty]));
  }
  return found;
}

// ---- features removed by the solver -----------------------------------------------------------

/** A feature the rank-revealing solve removed (structurally lda.ts's RemovedFeature). */
export interface RemovedFeatureFact {
  feature: string;
  reason: 'constant' | 'constant-within-classes' | 'duplicate' | 'dependent';
  combination?: { feature: string; coefficient: number }[];
}

/** The finding code for a removal reason; also what `report.removedFeatures[].reason` holds. */
export function removalCode(reason: RemovedFeatureFact['reason']): string {
  switch (reason) {
    case 'constant':
      return 'constant-column';
    case 'constant-within-classes':
      return 'constant-within-classes';
    case 'duplicate':
      return 'duplicate-column';
    case 'dependent':
      return 'dependent-columns';
  }
}

/** `constant-column`, `constant-within-classes`, `duplicate-column`, `dependent-columns`. */
export function removedFeatureFindings(removed: readonly RemovedFeatureFact[]): Finding[] {
  return removed.map((r) => {
    const code = removalCode(r.reason);
    const others = (r.combination ?? []).map((c) => c.feature);
    switch (r.reason) {
      case 'constant':
        return finding(code, 'warning', `Column '${r.feature}' has the same value in every row; removed before solving.`, [r.feature]);
      case 'constant-within-classes':
        return finding(
          code,
          'warning',
          `Column '${r.feature}' is constant within every class but differs between classes: it alone separates the classes perfectly (check for leakage); removed before solving.`,
          [r.feature],
        );
      case 'duplicate':
        return finding(code, 'warning', `Column '${r.feature}' duplicates ${listNames(others)} (${r.feature} = ${formatCombination(r.combination ?? [])}, up to an offset); removed before solving.`, [r.feature, ...others]);
      case 'dependent':
        return finding(
          code,
          'warning',
          `Column '${r.feature}' is a linear combination of other features: ${r.feature} = ${formatCombination(r.combination ?? [])} (within each class, up to an offset); removed before solving.`,
          [r.feature, ...others],
        );
    }
  });
}

// ---- near-constant columns --------------------------------------------------------------------

/** Facts about one feature over the rows used. */
export interface SpreadFacts {
  feature: string;
  mean: number;
  standardDeviation: number;
  /** The most frequent value found, and in how many rows (exact count), when known. */
  mode?: { value: number; count: number };
}

/** Share of rows one value must cover for `near-constant-column`. */
export const NEAR_CONSTANT_SHARE = 0.99;
/**
 * Relative spread below which a column is near constant: sd ≤ √ε·|mean| means the values agree to
 * about half of a double's 16 digits, so centring them loses that half (√ε ≈ 1.5e-8).
 */
export const NEAR_CONSTANT_RELATIVE_SPREAD = Math.sqrt(Number.EPSILON);

/**
 * `near-constant-column`: one value covers ≥ 99% of the rows used, or sd ≤ √ε·|mean|.
 * Columns already removed as constant are not passed in.
 */
export function nearConstantFindings(facts: readonly SpreadFacts[], rowsUsed: number): Finding[] {
  const found: Finding[] = [];
  for (const f of facts) {
    if (rowsUsed === 0) break;
    if (f.mode && f.mode.count >= NEAR_CONSTANT_SHARE * rowsUsed && f.mode.count < rowsUsed) {
      found.push(
        finding(
          'near-constant-column',
          'warning',
          `Column '${f.feature}' is nearly constant: the value ${formatNumber(f.mode.value, 6)} fills ${formatCount(f.mode.count)} of ${formatCount(rowsUsed)} rows (${formatPercent(f.mode.count / rowsUsed)}; rule: one value in ≥ ${formatPercent(NEAR_CONSTANT_SHARE, 0)} of rows).`,
          [f.feature],
        ),
      );
    } else if (f.standardDeviation > 0 && f.standardDeviation <= NEAR_CONSTANT_RELATIVE_SPREAD * Math.abs(f.mean)) {
      found.push(
        finding(
          'near-constant-column',
          'warning',
          `Column '${f.feature}' is nearly constant: its standard deviation ${formatNumber(f.standardDeviation)} is below √ε ≈ 1.5e-8 times its mean ${formatNumber(f.mean)}, so its variation is at rounding level.`,
          [f.feature],
        ),
      );
    }
  }
  return found;
}

// ---- classes ------------------------------------------------------------------------------------

/** Largest/smallest class size ratio that counts as imbalance (common practice, no source). */
export const IMBALANCE_RATIO = 10;

/** `tiny-class` (< 2 rows: error; fewer rows than features: warning) and `class-imbalance`. */
export function classFindings(classes: readonly { label: string; count: number }[], features: number): Finding[] {
  const found: Finding[] = [];
  const single = classes.filter((c) => c.count < 2);
  if (single.length > 0) {
    found.push(
      finding(
        'tiny-class',
        'error',
        `Class${single.length > 1 ? 'es' : ''} ${listNames(single.map((c) => c.label))} ${single.length > 1 ? 'have' : 'has'} a single row: no within-class spread can be estimated for ${single.length > 1 ? 'them' : 'it'} and cross-validation cannot test ${single.length > 1 ? 'them' : 'it'}.`,
      ),
    );
  }
  const small = classes.filter((c) => c.count >= 2 && c.count < features);
  if (small.length > 0) {
    found.push(
      finding(
        'tiny-class',
        'warning',
        `Class${small.length > 1 ? 'es' : ''} ${small.map((c) => `'${c.label}' (${c.count} rows)`).join(', ')} ${small.length > 1 ? 'have' : 'has'} fewer rows than there are features (${features}): ${small.length > 1 ? 'their' : 'its'} covariance is singular and estimates are unstable.`,
      ),
    );
  }
  if (classes.length >= 2) {
    let largest = classes[0]!;
    let smallest = classes[0]!;
    for (const c of classes) {
      if (c.count > largest.count) largest = c;
      if (c.count < smallest.count) smallest = c;
    }
    if (smallest.count > 0 && largest.count / smallest.count >= IMBALANCE_RATIO) {
      found.push(
        finding(
          'class-imbalance',
          'warning',
          `Classes are imbalanced: '${largest.label}' has ${formatCount(largest.count)} rows, '${smallest.label}' ${formatCount(smallest.count)} (ratio ${formatNumber(largest.count / smallest.count, 3)}; flagged from ${IMBALANCE_RATIO}, common practice). Accuracy favours the large class; read the per-class recall.`,
        ),
      );
    }
  }
  return found;
}

// ---- leakage ------------------------------------------------------------------------------------

/** η² from which one feature alone is taken to separate the classes almost perfectly. */
export const LEAKAGE_ETA_SQUARED = 0.99;
/** Classes with fewer rows than this share of all rows (or fewer than 2) are left out of the range check. */
export const LEAKAGE_SMALL_CLASS_SHARE = 0.01;

export interface LeakageFacts {
  feature: string;
  etaSquared: number;
  /** Per class: rows used and [min, max] of the feature over them. */
  ranges: readonly { label: string; count: number; min: number; max: number }[];
}

/** True when no two classes' [min, max] ranges overlap (sorted by min, each max < the next min). */
export function rangesDisjoint(ranges: readonly { min: number; max: number }[]): boolean {
  if (ranges.length < 2) return false;
  const sorted = [...ranges].sort((a, b) => a.min - b.min);
  for (let i = 1; i < sorted.length; i++) if (!(sorted[i - 1]!.max < sorted[i]!.min)) return false;
  return true;
}

/**
 * `possible-leakage`: a single feature that alone separates the classes almost perfectly. Rule:
 * η² ≥ 0.99, or the per-class [min, max] ranges do not overlap. For the range check, classes with
 * fewer than max(2, 1% of the rows) rows are left out (when at least two classes remain): a
 * handful of rows must not hide a feature that sorts all the others into their classes.
 */
export function leakageFindings(facts: readonly LeakageFacts[]): Finding[] {
  const found: Finding[] = [];
  for (const f of facts) {
    const n = f.ranges.reduce((a, r) => a + r.count, 0);
    const floor = Math.max(2, Math.ceil(LEAKAGE_SMALL_CLASS_SHARE * n));
    const large = f.ranges.filter((r) => r.count >= floor);
    const checked = large.length >= 2 ? large : f.ranges;
    const left = f.ranges.filter((r) => !checked.includes(r));
    const disjoint = rangesDisjoint(checked);
    if (!disjoint && !(f.etaSquared >= LEAKAGE_ETA_SQUARED)) continue;
    const leftOut = left.length > 0 ? `; ${listNames(left.map((r) => r.label))} with fewer than ${floor} rows left out` : '';
    const why = disjoint
      ? `the classes' value ranges do not overlap (${[...checked]
          .sort((a, b) => a.min - b.min)
          .slice(0, 6)
          .map((r) => `'${r.label}' ${formatNumber(r.min)}…${formatNumber(r.max)}`)
          .join(', ')}${leftOut})`
      : `it explains ${formatPercent(f.etaSquared, 2)} of its variance by class (η² ≥ ${LEAKAGE_ETA_SQUARED})`;
    found.push(
      finding(
        'possible-leakage',
        'warning',
        `Column '${f.feature}' alone separates the classes almost perfectly: ${why}. If it is recorded after, or derived from, the label, the separability shown here is not real.`,
        [f.feature],
      ),
    );
  }
  return found;
}

// ---- rows ---------------------------------------------------------------------------------------

/** Share of duplicated rows from which `duplicate-rows` is a warning rather than info. */
export const DUPLICATE_WARNING_SHARE = 0.01;

export interface DuplicateFacts {
  /** Rows equal (label and every feature) to an earlier row. */
  count: number;
  /** The first few: [0-based row, 0-based row of its earlier copy]. */
  examples: readonly { row: number; line?: number; firstRow: number; firstLine?: number }[];
  /** Rows compared (the check keeps a bounded set of row hashes). */
  checked: number;
  rowsUsed: number;
}

/** `duplicate-rows`: identical rows (same label and features). */
export function duplicateRowFinding(facts: DuplicateFacts): Finding | null {
  if (facts.count === 0) return null;
  const describe = (row: number, line?: number): string => (line !== undefined ? `line ${line}` : `row ${row}`);
  const shown = facts.examples
    .slice(0, 5)
    .map((e) => `${describe(e.row, e.line)} repeats ${describe(e.firstRow, e.firstLine)}`)
    .join('; ');
  const scope = facts.checked < facts.rowsUsed ? ` among the first ${formatCount(facts.checked)} of ${formatCount(facts.rowsUsed)} rows (the check keeps a bounded set of row hashes)` : '';
  const severity: Severity = facts.count >= DUPLICATE_WARNING_SHARE * Math.min(facts.checked, facts.rowsUsed) ? 'warning' : 'info';
  return finding(
    'duplicate-rows',
    severity,
    `${formatCount(facts.count)} row${facts.count > 1 ? 's repeat' : ' repeats'} an earlier row exactly${scope} (${shown}). Copies inflate accuracy when they fall on both sides of a cross-validation split.`,
    undefined,
    facts.examples.map((e) => e.row),
  );
}

// ---- label --------------------------------------------------------------------------------------

/** `continuous-label`: a numeric label with many distinct or fractional values. */
export function continuousLabelFinding(label: string, classes: number, integral: boolean): Finding {
  return finding(
    'continuous-label',
    'warning',
    `The label '${label}' is numeric with ${integral ? `${formatCount(classes)} distinct values` : 'fractional values'}: it looks like a measurement rather than a class. LDA treats each distinct value as its own class.`,
    [label],
  );
}

// ---- solver and tests ---------------------------------------------------------------------------

/** Condition number of the solved correlation matrix above which half the digits are lost: 1/√ε. */
export const ILL_CONDITIONED = 1 / Math.sqrt(Number.EPSILON);

export function shrinkageFinding(intensity: number, why: string): Finding {
  return finding('shrinkage-used', 'info', `The within-class covariance was shrunk (Ledoit–Wolf intensity ${formatNumber(intensity, 3)}): ${why}`);
}

export function illConditionedFinding(conditionNumber: number, solver: 'exact' | 'shrinkage'): Finding | null {
  if (!(conditionNumber > ILL_CONDITIONED)) return null;
  return finding(
    'ill-conditioned',
    'warning',
    `The pooled within-class correlation matrix solved is ill-conditioned (condition number ${formatNumber(conditionNumber, 3)} > 1/√ε ≈ 6.7e7${solver === 'exact' ? '; the shrinkage solver would stabilise it' : ''}): directions and coefficients carry few reliable digits.`,
  );
}

export function boxMSkippedFinding(reason: string): Finding {
  return finding('box-m-skipped', 'info', `Box's M test of equal class covariances was not computed: ${reason}`);
}

export function cvSkippedFinding(reason: string): Finding {
  return finding('cv-skipped', 'warning', `Cross-validation was not run: ${reason} Only the training (resubstitution) accuracy is shown, which overstates performance.`);
}

/** `tests-undefined`: too few rows within classes for the multivariate tests' F approximations. */
export function testsUndefinedFinding(reason: string): Finding {
  return finding('tests-undefined', 'warning', `${reason} Their F and p are left empty.`);
}

export function approximatePValueFinding(): Finding {
  return finding(
    'approximate-p-values',
    'info',
    'The within-class scatter is singular, so the multivariate tests (Wilks, Pillai, Hotelling–Lawley, Roy, Bartlett) are computed from the shrunk problem: their p-values are approximate.',
  );
}

// ---- passed through -----------------------------------------------------------------------------

/** The reader's notes and the LDA solution's warnings become findings as they are. */
export function passThrough(notes: readonly { code: string; severity: Severity; message: string; columns?: string[] }[]): Finding[] {
  return notes.map((n) => finding(n.code, n.severity, n.message, n.columns ? [...n.columns] : undefined));
}
