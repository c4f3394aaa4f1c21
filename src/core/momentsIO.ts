/**
 * Per-class moments from outside the row reader: the result of the SQL moments query
 * (scripts/sql.ts), saved as CSV with a header, and the JSON parts written by
 * `scatterwise moments` (moments.ts's momentsToJSON). Several inputs are merged exactly
 * (mergeMoments), so shards computed on different machines or engines give one fit.
 *
 * The query result has one row per class and these columns (j, i ≤ j index the features, 0-based):
 *   label, n                 the class and its row count
 *   label_column             the name of the label column (first statement only)
 *   feature_j, shift_j       feature j's name and the constant c_j subtracted before summing
 *   sum_j                    Σ y_j            with y = x − c
 *   min_j, max_j             the raw minimum and maximum of x_j
 *   cubic_j                  Σ q·y_j          with q = ‖y‖²
 *   quartic                  Σ q²
 *   cross_i_j                Σ y_i·y_j
 * A wide table's query is split into statements: the first statement's result holds label_column,
 * feature_j and shift_j, and every result holds label, n and some of the statistics. A new part
 * starts at every result that has feature_0; the results of one part must hold each statistic once.
 *
 * From these, with ȳ = Σy/n, c = ‖ȳ‖², S₂ = Σyyᵀ, T = tr S₂, C = Σq·y, the class moments centred
 * on the class mean (z = y − ȳ) are exactly (expand ‖z‖² = q − 2yᵀȳ + c):
 *   mean    = c_shift + ȳ
 *   scatter = S₂ − n·ȳȳᵀ
 *   cubic   = Σ‖z‖²z = C − T·ȳ − 2·S₂ȳ + 2n·c·ȳ
 *   quartic = Σ‖z‖⁴  = Σq² + 4·ȳᵀS₂ȳ − 4·ȳᵀC + 2c·T − 3n·c²
 */
import { parse } from 'csv-parse/browser/esm/sync';
import { DataError } from './errors';
import type { ClassMoments, Moments } from './moments';
import { mergeMoments, momentsFromJSON } from './moments';

/** One input: its name (for messages) and its text. */
export interface MomentsInput {
  name: string;
  text: string;
}

interface ResultRow {
  line: number;
  cells: Map<string, string>;
}

interface ResultTable {
  name: string;
  columns: string[];
  rows: ResultRow[];
}

function readResultTable(input: MomentsInput): ResultTable {
  let records: { record: string[]; info: { lines: number } }[];
  try {
    records = parse(input.text.replace(/^\uFEFF/, ''), { relax_column_count: false, skip_empty_lines: true, info: true }) as unknown as { record: string[]; info: { lines: number } }[];
  } catch (error) {
    const line = (error as { lines?: number }).lines;
    throw new DataError('bad-moments-table', `${input.name}: not a readable CSV table (${(error as Error).message}).`, { file: input.name, ...(line ? { line } : {}) }, 'Save the query result as CSV with a header row.');
  }
  if (records.length < 2) {
    throw new DataError('bad-moments-table', `${input.name}: the moments table has no class rows.`, { file: input.name }, 'Save the whole query result, header included.');
  }
  const columns = records[0]!.record.map((c) => c.trim());
  // A record starts on the line after the previous one ended (a quoted name may hold line breaks).
  const rows = records.slice(1).map(({ record }, i) => ({ line: records[i]!.info.lines + 1, cells: new Map(columns.map((c, j) => [c, record[j]!])) }));
  return { name: input.name, columns, rows };
}

function numberCell(table: ResultTable, row: ResultRow, column: string): number {
  const text = row.cells.get(column);
  if (text === undefined) {
    throw new DataError('bad-moments-table', `${table.name}: column '${column}' is missing.`, { file: table.name, column }, 'Pass the results of every statement of the moments query, in order.');
  }
  const value = text.trim() === '' ? NaN : Number(text);
  if (!Number.isFinite(value)) {
    throw new DataError('bad-moments-table', `${table.name}, line ${row.line}: '${text}' in column '${column}' is not a finite number.`, { file: table.name, line: row.line, column }, 'Check that the query ran unchanged and its result was saved as CSV.');
  }
  return value;
}

/** Columns holding a number per class (everything but the label, count and names). */
function isStatistic(column: string): boolean {
  return column !== 'label' && column !== 'n' && column !== 'label_column' && !column.startsWith('feature_');
}

/** The sums of one class, gathered from the blocks of one part. */
interface ClassSums {
  label: string;
  count: number;
  line: number;
  values: Map<string, number>;
}

function partFromTables(tables: ResultTable[]): { moments: Moments; label?: string } {
  const head = tables[0]!;
  const d = head.columns.filter((c) => /^feature_\d+$/.test(c)).length;
  const where = { file: head.name };
  for (let j = 0; j < d; j++) {
    if (!head.columns.includes(`feature_${j}`)) throw new DataError('bad-moments-table', `${head.name}: column 'feature_${j}' is missing.`, where, 'Save the query result unchanged.');
  }
  const features = Array.from({ length: d }, (_, j) => head.rows[0]!.cells.get(`feature_${j}`)!);
  const classes = new Map<string, ClassSums>();
  const seen = new Set<string>();
  for (const table of tables) {
    for (const row of table.rows) {
      const label = row.cells.get('label');
      if (label === undefined) throw new DataError('bad-moments-table', `${table.name}: column 'label' is missing.`, { file: table.name, column: 'label' }, 'Save the query result unchanged.');
      const count = numberCell(table, row, 'n');
      let sums = classes.get(label);
      if (sums === undefined) {
        if (table !== head) throw new DataError('bad-moments-table', `${table.name}, line ${row.line}: class '${label}' is not in ${head.name}.`, { file: table.name, line: row.line }, 'Pass the results of one run of the query, in order.');
        sums = { label, count, line: row.line, values: new Map() };
        classes.set(label, sums);
      } else if (sums.count !== count) {
        throw new DataError('bad-moments-table', `${table.name}, line ${row.line}: class '${label}' has ${count} rows here and ${sums.count} in ${head.name}; the statements did not read the same rows.`, { file: table.name, line: row.line }, 'Run every statement of the query on the same, unchanged table.');
      }
      for (const column of table.columns) {
        if (!isStatistic(column)) continue;
        sums.values.set(column, numberCell(table, row, column));
      }
    }
    for (const column of table.columns) {
      if (!isStatistic(column)) continue;
      if (seen.has(column)) throw new DataError('bad-moments-table', `${table.name}: column '${column}' appears in two results of the same part.`, { file: table.name, column }, 'Pass each statement\'s result once.');
      seen.add(column);
    }
  }
  const result: ClassMoments[] = [];
  for (const sums of classes.values()) result.push(centredClassMoments(head.name, sums, d));
  const label = head.rows[0]!.cells.get('label_column');
  return { moments: { features, classes: result }, ...(label !== undefined ? { label } : {}) };
}

function centredClassMoments(file: string, sums: ClassSums, d: number): ClassMoments {
  const value = (column: string): number => {
    const v = sums.values.get(column);
    if (v === undefined) throw new DataError('bad-moments-table', `${file}: column '${column}' is missing for class '${sums.label}'.`, { file, column }, 'Pass the results of every statement of the moments query, in order.');
    return v;
  };
  const n = sums.count;
  if (!Number.isInteger(n) || n < 1) throw new DataError('bad-moments-table', `${file}, line ${sums.line}: class '${sums.label}' has count ${n}.`, { file, line: sums.line, column: 'n' }, 'Counts must be positive whole numbers.');
  const shift = Float64Array.from({ length: d }, (_, j) => value(`shift_${j}`));
  const ybar = Float64Array.from({ length: d }, (_, j) => value(`sum_${j}`) / n);
  const raw = new Float64Array(d * d); // S₂ = Σ y yᵀ
  for (let i = 0; i < d; i++) {
    for (let j = i; j < d; j++) {
      const v = value(`cross_${i}_${j}`);
      raw[i * d + j] = v;
      raw[j * d + i] = v;
    }
  }
  const cubicSums = Float64Array.from({ length: d }, (_, j) => value(`cubic_${j}`));
  const quarticSum = value('quartic');
  let c = 0;
  let trace = 0;
  for (let j = 0; j < d; j++) {
    c += ybar[j]! * ybar[j]!;
    trace += raw[j * d + j]!;
  }
  const rawTimesMean = new Float64Array(d); // S₂ȳ
  for (let i = 0; i < d; i++) {
    let s = 0;
    for (let j = 0; j < d; j++) s += raw[i * d + j]! * ybar[j]!;
    rawTimesMean[i] = s;
  }
  const scatter = new Float64Array(d * d);
  for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) scatter[i * d + j] = raw[i * d + j]! - n * ybar[i]! * ybar[j]!;
  const cubic = new Float64Array(d);
  let meanRawMean = 0;
  let meanCubic = 0;
  for (let j = 0; j < d; j++) {
    cubic[j] = cubicSums[j]! - trace * ybar[j]! - 2 * rawTimesMean[j]! + 2 * n * c * ybar[j]!;
    meanRawMean += ybar[j]! * rawTimesMean[j]!;
    meanCubic += ybar[j]! * cubicSums[j]!;
  }
  const quartic = Math.max(0, quarticSum + 4 * meanRawMean - 4 * meanCubic + 2 * c * trace - 3 * n * c * c);
  return {
    label: sums.label,
    count: n,
    mean: Float64Array.from({ length: d }, (_, j) => shift[j]! + ybar[j]!),
    scatter,
    min: Float64Array.from({ length: d }, (_, j) => value(`min_${j}`)),
    max: Float64Array.from({ length: d }, (_, j) => value(`max_${j}`)),
    cubic,
    quartic,
  };
}

/** The parts in a list of SQL results: a new part at every result with feature_0. */
export function momentsFromQueryResults(inputs: readonly MomentsInput[]): { moments: Moments; label?: string }[] {
  const parts: ResultTable[][] = [];
  for (const input of inputs) {
    const table = readResultTable(input);
    if (table.columns.includes('feature_0')) parts.push([table]);
    else if (parts.length === 0) {
      throw new DataError('bad-moments-table', `${input.name}: holds no feature_0 column, so it is not the first statement's result.`, { file: input.name }, 'Pass the first statement\'s result first.');
    } else parts[parts.length - 1]!.push(table);
  }
  return parts.map(partFromTables);
}

/** Whether the text is a JSON moments part (written by `scatterwise moments`) rather than CSV. */
export function isMomentsJSON(text: string): boolean {
  return /^\uFEFF?\s*\{/.test(text);
}

/**
 * Every input read and merged into one set of moments. JSON parts and SQL results may be mixed;
 * all must describe the same features in the same order. `label` is the label column's name when an
 * input says it (the query's label_column, or a "label" key beside the JSON moments).
 */
export function readMomentsInputs(inputs: readonly MomentsInput[]): { moments: Moments; label?: string } {
  if (inputs.length === 0) throw new DataError('no-moments', 'No moments were given.', {}, 'Pass at least one moments file.');
  const parts: { name: string; moments: Moments; label?: string }[] = [];
  let pendingSql: MomentsInput[] = [];
  const flushSql = () => {
    if (pendingSql.length === 0) return;
    const name = pendingSql[0]!.name;
    for (const part of momentsFromQueryResults(pendingSql)) parts.push({ name, ...part });
    pendingSql = [];
  };
  for (const input of inputs) {
    if (isMomentsJSON(input.text)) {
      flushSql();
      let parsed: unknown;
      try {
        parsed = JSON.parse(input.text.replace(/^\uFEFF/, ''));
      } catch (error) {
        throw new DataError('bad-moments-json', `${input.name}: not valid JSON (${(error as Error).message}).`, { file: input.name }, 'Pass a file written by scatterwise moments.');
      }
      const label = (parsed as { label?: unknown }).label;
      parts.push({ name: input.name, moments: momentsFromJSON(parsed, input.name), ...(typeof label === 'string' ? { label } : {}) });
    } else pendingSql.push(input);
  }
  flushSql();
  const first = parts[0]!;
  let merged = first.moments;
  for (const part of parts.slice(1)) {
    const same = part.moments.features.length === first.moments.features.length && part.moments.features.every((f, j) => f === first.moments.features[j]);
    if (!same) {
      throw new DataError(
        'moments-mismatch',
        `${part.name}: its features (${part.moments.features.join(', ')}) differ from those of ${first.name} (${first.moments.features.join(', ')}).`,
        { file: part.name },
        'Compute every part with the same features in the same order.',
      );
    }
    merged = mergeMoments(merged, part.moments);
  }
  const label = parts.find((p) => p.label !== undefined)?.label;
  return { moments: merged, ...(label !== undefined ? { label } : {}) };
}
