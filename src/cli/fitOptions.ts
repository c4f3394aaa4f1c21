/**
 * The options of an analysis on the command line, declared once with their allowed values (read
 * from src/core/types.ts) and turned into `Partial<FitOptions>`. Shared by every subcommand that
 * runs or reproduces a fit (`fit`, and generators that take "the same options as fit").
 */
import { parseCvMethod } from '../core/pipeline/options';
import type { ReadOptions } from '../core/read/types';
import type { FitOptions } from '../core/types';
import { MISSING_POLICIES, PCA_SCALES, PRIORS, SOLVERS } from '../core/types';
import type { OptionSpec, ParsedArgs } from './args';
import { listOf, UsageError, valueOf } from './args';

/** Names a user may type for the delimiter, besides the character itself. */
const DELIMITER_NAMES: Record<string, string> = { ',': ',', comma: ',', '\t': '\t', '\\t': '\t', tab: '\t', ';': ';', semicolon: ';', '|': '|', pipe: '|' };

function wholeNumber(value: string): string | null {
  return /^\d+$/.test(value) ? null : 'expected a whole number';
}

export const FIT_OPTION_SPECS: readonly OptionSpec[] = [
  { name: 'label', value: 'COL', describe: 'the class label column (default: a column named label/class/target/y/category/outcome, else the only low-cardinality text column)' },
  { name: 'features', value: 'A,B,…', repeatable: true, describe: 'feature columns, in this order (default: every numeric column but the label)' },
  { name: 'exclude', value: 'A,B,…', repeatable: true, describe: 'columns never used as features' },
  { name: 'solver', value: 'SOLVER', values: SOLVERS, describe: 'exact, shrinkage (Ledoit–Wolf), or auto: exact unless the problem is ill-conditioned' },
  { name: 'priors', value: 'PRIORS', values: PRIORS, describe: 'class priors for classification: class shares (empirical) or equal (uniform)' },
  {
    name: 'cv',
    value: 'auto|none|loo|kfold:N',
    check: (v) => {
      try {
        parseCvMethod(v);
        return null;
      } catch {
        return 'expected auto, none, loo or kfold:N with N ≥ 2';
      }
    },
    describe: 'cross-validation: leave-one-out, stratified N-fold, or auto (loo while n·d² ≤ 2e9, else kfold:10)',
  },
  { name: 'seed', value: 'N', check: wholeNumber, describe: 'seed of the fold generator (default 1)' },
  { name: 'missing', value: 'POLICY', values: MISSING_POLICIES, describe: 'drop rows with a missing value, or drop every feature column that has one' },
  { name: 'pca', value: 'SCALE', values: PCA_SCALES, describe: 'PCA of the covariance or of the correlation (standardized) matrix' },
  { name: 'delimiter', value: 'C', check: (v) => (v in DELIMITER_NAMES ? null : 'expected , tab ; or |'), describe: 'field delimiter of a text file: , tab ; | (default: sniffed)' },
  { name: 'no-header', describe: 'the first row is data, not column names (columns are then named column_1, column_2, …)' },
  { name: 'skip-ragged-rows', describe: 'skip rows with the wrong number of fields (counted in the report) instead of stopping' },
];

/** The analysis options given on the command line (unset ones are left to the defaults). */
export function fitOptionsFromArgs(args: ParsedArgs, command: string): Partial<FitOptions> {
  const options: Partial<FitOptions> = {};
  const label = valueOf(args, 'label');
  if (label !== undefined) options.label = label;
  const features = listOf(args, 'features');
  if (features !== undefined) {
    if (features.length === 0) throw new UsageError("'--features' needs at least one column name", command);
    options.features = features;
  }
  const exclude = listOf(args, 'exclude');
  if (exclude !== undefined) options.exclude = exclude;
  const solver = valueOf(args, 'solver');
  if (solver !== undefined) options.solver = solver as FitOptions['solver'];
  const priors = valueOf(args, 'priors');
  if (priors !== undefined) options.priors = priors as FitOptions['priors'];
  const cv = valueOf(args, 'cv');
  if (cv !== undefined) options.cv = parseCvMethod(cv);
  const seed = valueOf(args, 'seed');
  if (seed !== undefined) options.seed = Number(seed);
  const missing = valueOf(args, 'missing');
  if (missing !== undefined) options.missing = missing as FitOptions['missing'];
  const pca = valueOf(args, 'pca');
  if (pca !== undefined) options.pcaScale = pca as FitOptions['pcaScale'];
  const read: ReadOptions = {};
  const delimiter = valueOf(args, 'delimiter');
  if (delimiter !== undefined) read.delimiter = DELIMITER_NAMES[delimiter];
  if (args.flags.has('no-header')) read.header = false;
  if (args.flags.has('skip-ragged-rows')) read.skipRaggedRows = true;
  options.read = read;
  return options;
}
