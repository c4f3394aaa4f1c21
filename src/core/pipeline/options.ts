/**
 * Analysis options: defaults filled in and every value checked before any byte is read, so a bad
 * option fails at once with a message that says what to do.
 */
import { DataError } from '../errors';
import type { CvMethod, FitOptions } from '../types';
import { DEFAULT_FIT_OPTIONS, MISSING_POLICIES, PCA_SCALES, PRIORS, SOLVERS } from '../types';

/** Delimiters the readers accept. */
export const DELIMITERS = [',', '\t', ';', '|'] as const;
/** Largest seed: the fold generator works modulo 2³¹ − 1. */
export const MAX_SEED = 2 ** 31 - 2;
/** Most folds accepted (each fold keeps its own moments). */
export const MAX_FOLDS = 1000;

function bad(option: string, message: string, hint: string): DataError {
  return new DataError('bad-option', `Option ${option}: ${message}`, {}, hint);
}

function oneOf<T extends string>(option: string, value: unknown, allowed: readonly T[]): T {
  if (typeof value === 'string' && (allowed as readonly string[]).includes(value)) return value as T;
  throw bad(option, `'${String(value)}' is not allowed.`, `Use one of: ${allowed.join(', ')}.`);
}

function names(option: string, value: unknown): string[] | undefined {
  if (value === undefined) return undefined;
  if (!Array.isArray(value) || !value.every((v) => typeof v === 'string' && v.length > 0)) {
    throw bad(option, 'expected a list of column names.', 'Give column names separated by commas.');
  }
  return [...value];
}

function integer(option: string, value: unknown, min: number, max: number): number {
  if (typeof value === 'number' && Number.isInteger(value) && value >= min && value <= max) return value;
  throw bad(option, `'${String(value)}' is not a whole number from ${min} to ${max}.`, `Give a whole number from ${min} to ${max}.`);
}

/** `kfold:N` → N, else undefined. */
export function foldCount(cv: CvMethod | string): number | undefined {
  const match = /^kfold:(\d+)$/.exec(cv);
  return match ? Number(match[1]) : undefined;
}

/** Checks a cross-validation method's spelling; the class sizes are checked after pass 1 (`cv-skipped`). */
export function parseCvMethod(value: unknown): CvMethod {
  if (value === 'auto' || value === 'none' || value === 'loo') return value;
  if (typeof value === 'string') {
    const k = foldCount(value);
    if (k !== undefined && k >= 2 && k <= MAX_FOLDS) return `kfold:${k}`;
  }
  throw bad(
    'cv',
    `'${String(value)}' is not a cross-validation method.`,
    `Use auto, none, loo or kfold:N; kfold:N needs 2 ≤ N ≤ the smallest class count (and N ≤ ${MAX_FOLDS}).`,
  );
}

/** Defaults filled in, every value checked. Throws DataError (code `bad-option`) saying what to do. */
export function resolveOptions(partial: Partial<FitOptions> = {}): FitOptions {
  const merged = { ...DEFAULT_FIT_OPTIONS, ...partial, read: { ...DEFAULT_FIT_OPTIONS.read, ...(partial.read ?? {}) } };
  const options: FitOptions = {
    solver: oneOf('solver', merged.solver, SOLVERS),
    priors: oneOf('priors', merged.priors, PRIORS),
    cv: parseCvMethod(merged.cv),
    seed: integer('seed', merged.seed, 0, MAX_SEED),
    missing: oneOf('missing', merged.missing, MISSING_POLICIES),
    pcaScale: oneOf('pca', merged.pcaScale, PCA_SCALES),
    misclassifiedLimit: integer('misclassifiedLimit', merged.misclassifiedLimit, 0, 10_000_000),
    plotBudget: integer('plotBudget', merged.plotBudget, 0, 10_000_000),
    read: { ...merged.read },
  };
  if (merged.label !== undefined) {
    if (typeof merged.label !== 'string' || merged.label.length === 0) throw bad('label', 'expected a column name.', 'Give the name of the label column.');
    options.label = merged.label;
  }
  const features = names('features', merged.features);
  if (features !== undefined) options.features = features;
  const exclude = names('exclude', merged.exclude);
  if (exclude !== undefined) options.exclude = exclude;
  if (options.label !== undefined && options.exclude?.includes(options.label)) {
    throw bad('exclude', `the label '${options.label}' is also excluded.`, 'Remove the label from the excluded columns.');
  }
  const read = options.read;
  if (read.delimiter !== undefined && !(DELIMITERS as readonly string[]).includes(read.delimiter)) {
    throw bad('delimiter', `'${read.delimiter}' is not a supported delimiter.`, 'Use a comma, a tab, a semicolon or a pipe.');
  }
  if (read.decimalComma && read.delimiter === ',') {
    throw bad('decimalComma', 'a decimal comma needs a delimiter other than the comma.', 'Use a tab, semicolon or pipe delimiter with decimal commas.');
  }
  return options;
}
