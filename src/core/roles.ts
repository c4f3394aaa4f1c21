/**
 * Column roles: which column holds the class label and which columns are the features.
 *
 * Label, in this order:
 *  1. the column named by `options.label` (exact name);
 *  2. else the first column whose name is, ignoring case, one of LABEL_NAMES (in that list's order);
 *  3. else the single text column of low cardinality: distinct sampled values ≤ max(20, 5% of the
 *     sampled rows); a text column whose sampled values are all different (an identifier such as a
 *     serial number) is passed over when another candidate has repeated values;
 *  4. else a DataError listing the candidates (or saying there are none) and suggesting `--label`.
 * Features: `options.features` in the order given, else every numeric column but the label, in file
 * order; `options.exclude` removes columns from either. Text columns that end up unused are listed
 * so the pipeline can report them (finding `non-numeric-column`).
 */
import { DataError } from './errors';
import type { ColumnSummary, TableInspection } from './read/types';
import type { RoleOptions } from './types';

/** Column names read as the label when no `--label` is given (compared ignoring case). */
export const LABEL_NAMES = ['label', 'class', 'target', 'y', 'category', 'outcome'] as const;

export interface ColumnRoles {
  label: ColumnSummary;
  /** How the label was chosen. */
  labelChosenBy: 'option' | 'name' | 'only-text-column';
  features: ColumnSummary[];
  /** Text columns neither the label nor excluded: not usable as features. */
  unusedText: ColumnSummary[];
  /** Columns with no value in the sampled rows, neither the label nor excluded. */
  unusedEmpty: ColumnSummary[];
  /** Parquet groups/lists, ignored. */
  unusedNested: ColumnSummary[];
  /** Numeric label column with many distinct or fractional values: probably a regression target. */
  labelLooksContinuous: boolean;
}

/** Most distinct values a text column may have to be taken for the label. */
export function labelCardinalityLimit(sampledRows: number): number {
  return Math.max(20, Math.floor(0.05 * sampledRows));
}

function listNames(columns: readonly ColumnSummary[]): string {
  return columns.map((c) => `'${c.name}'`).join(', ');
}

function findColumn(inspection: TableInspection, name: string, what: string): ColumnSummary {
  const column = inspection.columns.find((c) => c.name === name);
  if (column) return column;
  throw new DataError(
    'unknown-column',
    `${inspection.source}: there is no column '${name}' (asked for as ${what}). Columns: ${listNames(inspection.columns)}.`,
    { file: inspection.source, column: name },
    'Check the spelling and case of the column name; names are compared exactly.',
  );
}

function chooseLabel(inspection: TableInspection, options: RoleOptions, excluded: Set<string>): Pick<ColumnRoles, 'label' | 'labelChosenBy'> {
  if (options.label !== undefined) {
    const label = findColumn(inspection, options.label, 'the label');
    if (excluded.has(label.name)) {
      throw new DataError('label-excluded', `${inspection.source}: column '${label.name}' is both the label and excluded.`, { file: inspection.source, column: label.name }, 'Remove it from the excluded columns or choose another label.');
    }
    if (label.kind === 'nested') {
      throw new DataError('nested-label', `${inspection.source}: column '${label.name}' is a nested (group or list) column and cannot be the label.`, { file: inspection.source, column: label.name }, 'Choose a flat column as the label.');
    }
    return { label, labelChosenBy: 'option' };
  }
  const candidates = inspection.columns.filter((c) => !excluded.has(c.name) && c.kind !== 'nested');
  for (const name of LABEL_NAMES) {
    const named = candidates.find((c) => c.name.toLowerCase() === name);
    if (named) return { label: named, labelChosenBy: 'name' };
  }
  const limit = labelCardinalityLimit(inspection.sampledRows);
  const text = candidates.filter((c) => c.kind === 'text' && c.distinct <= limit);
  const repeating = text.filter((c) => c.distinct < inspection.sampledRows - c.missing);
  if (repeating.length === 1) return { label: repeating[0]!, labelChosenBy: 'only-text-column' };
  if (repeating.length === 0 && text.length === 1) return { label: text[0]!, labelChosenBy: 'only-text-column' };
  const why =
    text.length === 0
      ? `no column is named ${LABEL_NAMES.map((n) => `'${n}'`).join('/')} and no text column has at most ${limit} distinct values`
      : `several text columns could be the label: ${listNames(text)}`;
  throw new DataError(
    text.length === 0 ? 'no-label-column' : 'ambiguous-label',
    `${inspection.source}: cannot tell which column is the class label: ${why}.`,
    { file: inspection.source },
    `Name the label column with --label (columns: ${listNames(inspection.columns)}).`,
  );
}

/** Decide the label and feature columns of a table. Throws DataError on unknown or conflicting names. */
export function assignRoles(inspection: TableInspection, options: RoleOptions = {}): ColumnRoles {
  const excluded = new Set<string>();
  for (const name of options.exclude ?? []) excluded.add(findColumn(inspection, name, 'a column to exclude').name);
  const { label, labelChosenBy } = chooseLabel(inspection, options, excluded);

  let features: ColumnSummary[];
  if (options.features !== undefined && options.features.length > 0) {
    const seen = new Set<string>();
    features = [];
    for (const name of options.features) {
      const column = findColumn(inspection, name, 'a feature');
      if (seen.has(name)) {
        throw new DataError('repeated-feature', `${inspection.source}: feature '${name}' is listed twice.`, { file: inspection.source, column: name }, 'List each feature once.');
      }
      seen.add(name);
      if (column.name === label.name) {
        throw new DataError('label-as-feature', `${inspection.source}: column '${name}' is the label and cannot also be a feature.`, { file: inspection.source, column: name }, 'Remove it from the features or choose another label.');
      }
      if (column.kind !== 'numeric') {
        throw new DataError(
          'non-numeric-feature',
          `${inspection.source}: column '${name}' was asked for as a feature but its sampled cells are ${column.kind === 'text' ? 'text, not numbers' : column.kind === 'empty' ? 'all missing' : 'nested (groups or lists)'}.`,
          { file: inspection.source, column: name },
          'Give only numeric columns as features.',
        );
      }
      if (!excluded.has(name)) features.push(column);
    }
  } else {
    features = inspection.columns.filter((c) => c.kind === 'numeric' && c.name !== label.name && !excluded.has(c.name));
  }
  if (features.length === 0) {
    throw new DataError(
      'no-features',
      `${inspection.source}: no numeric feature columns remain besides the label '${label.name}'.`,
      { file: inspection.source },
      'A separability analysis needs at least one numeric column; check the delimiter, the header, and --features/--exclude.',
    );
  }
  const unused = (kind: ColumnSummary['kind']): ColumnSummary[] =>
    inspection.columns.filter((c) => c.kind === kind && c.name !== label.name && !excluded.has(c.name));
  const limit = labelCardinalityLimit(inspection.sampledRows);
  return {
    label,
    labelChosenBy,
    features,
    unusedText: unused('text'),
    unusedEmpty: unused('empty'),
    unusedNested: unused('nested'),
    labelLooksContinuous: label.kind === 'numeric' && (!label.integral || label.distinct > limit),
  };
}
