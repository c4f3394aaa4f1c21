/**
 * A SQL query that computes per-class moments inside a database, so a table too large to export
 * (or split across engines) can be fitted from one small result: `scatterwise fit --moments
 * RESULT.csv`. The result has one row per class and the columns described in momentsIO.ts.
 *
 * Numerics: each feature is shifted by a constant near its mean before any product is summed
 * (y = x − shift), so the centred scatter Σyyᵀ − n·ȳȳᵀ loses few digits to cancellation; the
 * shifts travel in the result. The fourth-order terms the Ledoit–Wolf intensity needs come from
 * q = ‖y‖²: Σq·y (d sums) and Σq² — enough to centre them on each class mean exactly (see
 * momentsIO.ts for the algebra).
 *
 * Rows: a row counts when its label is not NULL and every feature is finite (NULL, NaN and ±∞ are
 * dropped: `ABS(v) <= DBL_MAX` is false for all three, NaN sorting above every number in the
 * engines that store it), as the `drop-rows` policy does for a file.
 *
 * Width: one query with d² aggregates crashed DuckDB from about 10 000 aggregates (MEASURED.md), so
 * the aggregates are split into statements of at most `maxAggregates` each; the first statement
 * also carries the label column's name, the feature names and the shifts. Run every statement and
 * pass all their results to `fit --moments` in order.
 */
import { commentText, sqlIdentifier, sqlString, type SqlDialect } from './quoting';

export interface MomentsQueryRequest {
  dialect: SqlDialect;
  /** Table name, quoted as one identifier; `schema` (optional) qualifies it. */
  table: string;
  schema?: string;
  label: string;
  features: string[];
  /** One shift per feature, near its mean (any finite value is correct; a close one is accurate). */
  shifts: number[];
  /** Most aggregate expressions per statement (default 2000). */
  maxAggregates?: number;
  /** Lines for the comment block on top (what generated it, from which file). */
  provenance: string[];
}

const DOUBLE_TYPE: Record<SqlDialect, string> = { postgres: 'DOUBLE PRECISION', duckdb: 'DOUBLE', sqlite: 'REAL', spark: 'DOUBLE', ansi: 'DOUBLE PRECISION' };
const TEXT_TYPE: Record<SqlDialect, string> = { postgres: 'TEXT', duckdb: 'VARCHAR', sqlite: 'TEXT', spark: 'STRING', ansi: 'VARCHAR(4000)' };
/** The largest finite double, printed exactly: `ABS(v) <= DBL_MAX` keeps finite values only. */
const DBL_MAX = '1.7976931348623157e308';

/** A finite double as a SQL numeric literal (shortest round-trip form). */
function numberLiteral(value: number): string {
  if (!Number.isFinite(value)) throw new RangeError(`A shift must be finite, got ${value}.`);
  return String(value);
}

/** The pairs (i, j), i ≤ j, of the upper triangle in row-major order. */
function upperPairs(d: number): [number, number][] {
  const pairs: [number, number][] = [];
  for (let i = 0; i < d; i++) for (let j = i; j < d; j++) pairs.push([i, j]);
  return pairs;
}

/** Every statement, each a complete query ending in `;`, with its comment lines. */
export function momentsQueryStatements(request: MomentsQueryRequest): string[] {
  const { dialect, features, shifts } = request;
  const d = features.length;
  if (d === 0) throw new RangeError('A moments query needs at least one feature.');
  if (shifts.length !== d) throw new RangeError(`Expected ${d} shifts, got ${shifts.length}.`);
  const limit = Math.max(16, request.maxAggregates ?? 2000);
  const id = (name: string) => sqlIdentifier(name, dialect);
  const double = DOUBLE_TYPE[dialect];
  const table = (request.schema !== undefined ? id(request.schema) + '.' : '') + id(request.table);
  const cast = (j: number) => `CAST(${id(features[j]!)} AS ${double})`;
  const shift = (j: number) => `CAST(${numberLiteral(shifts[j]!)} AS ${double})`;

  const where = [`${id(request.label)} IS NOT NULL`, ...features.map((_, j) => `ABS(${cast(j)}) <= ${DBL_MAX}`)];
  const squares = features.map((_, j) => `x_${j} * x_${j}`).join(' + ');
  const ctes = [
    'WITH shifted AS (',
    '  SELECT',
    [`    CAST(${id(request.label)} AS ${TEXT_TYPE[dialect]}) AS class_label`, ...features.flatMap((_, j) => [`    ${cast(j)} AS v_${j}`, `    ${cast(j)} - ${shift(j)} AS x_${j}`])].join(',\n'),
    `  FROM ${table}`,
    `  WHERE ${where.join('\n    AND ')}`,
    '),',
    'squared AS (',
    `  SELECT shifted.*, ${squares} AS q`,
    '  FROM shifted',
    ')',
  ].join('\n');

  // Every aggregate but COUNT (which each statement repeats), in the order the statements take them.
  const aggregates: string[] = [`  SUM(q * q) AS ${id('quartic')}`];
  features.forEach((_, j) => aggregates.push(`  SUM(x_${j}) AS ${id(`sum_${j}`)}`, `  MIN(v_${j}) AS ${id(`min_${j}`)}`, `  MAX(v_${j}) AS ${id(`max_${j}`)}`, `  SUM(q * x_${j}) AS ${id(`cubic_${j}`)}`));
  for (const [i, j] of upperPairs(d)) aggregates.push(`  SUM(x_${i} * x_${j}) AS ${id(`cross_${i}_${j}`)}`);
  const perStatement = limit - 1;
  const count = Math.ceil(aggregates.length / perStatement);

  const statements: string[] = [];
  for (let index = 0; index < count; index++) {
    const head = index === 0;
    const comment = [
      ...request.provenance.map((line) => `-- ${commentText(line)}`),
      `-- Dialect: ${dialect}. Statement ${index + 1} of ${count}${count > 1 ? ': save each result as CSV with a header and pass them all, in order, to scatterwise fit --moments' : ': save the result as CSV with a header and run: scatterwise fit --moments RESULT.csv'}.`,
      `-- Label: ${commentText(request.label)}; ${d} features${head ? ' (feature_j names feature j; shift_j is the constant subtracted before summing products)' : ''}.`,
    ];
    const columns = [`  class_label AS ${id('label')}`, `  COUNT(*) AS ${id('n')}`];
    if (head) {
      columns.push(`  ${sqlString(request.label, dialect)} AS ${id('label_column')}`);
      features.forEach((name, j) => columns.push(`  ${sqlString(name, dialect)} AS ${id(`feature_${j}`)}`, `  ${shift(j)} AS ${id(`shift_${j}`)}`));
    }
    columns.push(...aggregates.slice(index * perStatement, (index + 1) * perStatement));
    statements.push([...comment, ctes, 'SELECT', columns.join(',\n'), 'FROM squared', 'GROUP BY class_label', 'ORDER BY class_label;'].join('\n'));
  }
  return statements;
}

/** All statements as one text, separated by blank lines. */
export function momentsQuery(request: MomentsQueryRequest): string {
  return momentsQueryStatements(request).join('\n\n') + '\n';
}
