/**
 * Test helpers: the table a delimited text should give, computed by a pure csv-parse path that
 * shares no code with the reader (its own cell rules, written from the spec), and the table our
 * scanner gives, collected from its batches.
 */
import { parse } from 'csv-parse/sync';
import type { ScanSummary } from '../../../src/core/read/types';

export interface CollectedTable {
  rows: number[];
  lines: number[];
  labels: string[];
  /** Label id per row. */
  labelIds: number[];
  /** Row-major values. */
  values: number[];
  nonNumeric: number[];
  /** Data rows seen, ragged ones included. */
  rowsSeen: number;
  raggedRows: number;
}

export interface ReferenceDialect {
  delimiter: string;
  header: boolean;
  comment?: string;
  missingTokens: readonly string[];
  decimalComma: boolean;
  thousandsSeparator?: string;
  label: number;
  features: number[];
}

const escapeRegExp = (text: string): string => text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** The spec's reading of a feature cell: trim spaces, missing token, number grammar, infinity token, else text. */
export function referenceNumber(cell: string, dialect: ReferenceDialect): { value: number; text: boolean } {
  const trimmed = cell.replace(/^ +| +$/g, '');
  if (dialect.missingTokens.includes(trimmed)) return { value: NaN, text: false };
  const decimal = dialect.decimalComma ? ',' : '\\.';
  const integer = dialect.thousandsSeparator ? `\\d+(?:${escapeRegExp(dialect.thousandsSeparator)}\\d+)*` : '\\d+';
  const grammar = new RegExp(`^[+-]?(?:${integer}(?:${decimal}\\d*)?|${decimal}\\d+)(?:[eE][+-]?\\d+)?$`);
  if (grammar.test(trimmed)) {
    let plain = trimmed;
    if (dialect.thousandsSeparator) plain = plain.split(dialect.thousandsSeparator).join('');
    if (dialect.decimalComma) plain = plain.replace(',', '.');
    return { value: Number(plain), text: false };
  }
  const infinity = /^([+-]?)(inf|infinity)$/i.exec(trimmed);
  if (infinity) return { value: infinity[1] === '-' ? -Infinity : Infinity, text: false };
  return { value: NaN, text: true };
}

/**
 * 1-based start line of each record, by walking the text as RFC 4180 describes (csv-parse's own
 * line count is not used: it counts a CR LF inside quotes as two lines).
 */
export function recordStartLines(text: string, comment: string | undefined): number[] {
  const starts: number[] = [];
  let line = 1;
  let p = text.startsWith('\uFEFF') ? 1 : 0;
  while (p < text.length) {
    if (text[p] === '\n' || text.startsWith('\r\n', p)) {
      line++;
      p = text.indexOf('\n', p) + 1;
      continue;
    }
    if (comment !== undefined && text.startsWith(comment, p)) {
      const next = text.indexOf('\n', p);
      line++;
      p = next < 0 ? text.length : next + 1;
      continue;
    }
    starts.push(line);
    let inQuotes = false;
    for (; p < text.length; p++) {
      if (text[p] === '"') inQuotes = !inQuotes;
      else if (text[p] === '\n') {
        line++;
        if (!inQuotes) break;
      }
    }
    p++;
  }
  return starts;
}

/** The table by csv-parse alone over the whole text. */
export function referenceTable(text: string, dialect: ReferenceDialect): CollectedTable {
  const parsed = parse(text, {
    delimiter: dialect.delimiter,
    quote: '"',
    escape: '"',
    record_delimiter: ['\r\n', '\n'],
    relax_column_count: true,
    skip_empty_lines: true,
    comment: dialect.comment,
    comment_no_infix: dialect.comment !== undefined ? true : undefined,
    bom: true,
  }) as string[][];
  const startLines = recordStartLines(text, dialect.comment);
  if (startLines.length !== parsed.length) throw new Error(`reference: ${startLines.length} record starts for ${parsed.length} records`);
  const records = dialect.header ? parsed.slice(1) : parsed;
  const recordLines = dialect.header ? startLines.slice(1) : startLines;
  const columnCount = parsed[0].length;
  const table: CollectedTable = { rows: [], lines: [], labels: [], labelIds: [], values: [], nonNumeric: dialect.features.map(() => 0), rowsSeen: 0, raggedRows: 0 };
  const ids = new Map<string, number>();
  records.forEach((record, row) => {
    table.rowsSeen++;
    if (record.length !== columnCount) {
      table.raggedRows++;
      return;
    }
    table.rows.push(row);
    table.lines.push(recordLines[row]);
    const label = record[dialect.label].replace(/^ +| +$/g, '');
    if (dialect.missingTokens.includes(label)) table.labelIds.push(-1);
    else {
      if (!ids.has(label)) {
        ids.set(label, table.labels.length);
        table.labels.push(label);
      }
      table.labelIds.push(ids.get(label)!);
    }
    dialect.features.forEach((column, slot) => {
      const { value, text } = referenceNumber(record[column], dialect);
      table.values.push(value);
      if (text) table.nonNumeric[slot]++;
    });
  });
  return table;
}

/** Collects a scan's batches (copying them: their arrays are reused). */
export class TableCollector {
  readonly table: CollectedTable = { rows: [], lines: [], labels: [], labelIds: [], values: [], nonNumeric: [], rowsSeen: 0, raggedRows: 0 };

  readonly onBatch = (batch: { rows: number; firstRow: number; values: Float64Array; labels: Int32Array; lines?: Int32Array }, labels: readonly string[]): void => {
    for (let i = 0; i < batch.rows; i++) {
      this.table.rows.push(batch.firstRow + i);
      if (batch.lines) this.table.lines.push(batch.lines[i]);
      this.table.labelIds.push(batch.labels[i]);
    }
    for (let i = 0; i < batch.values.length; i++) this.table.values.push(batch.values[i]);
    this.table.labels = labels.slice();
  };

  finish(summary: ScanSummary): CollectedTable {
    this.table.labels = summary.labels.slice();
    this.table.nonNumeric = summary.nonNumeric.slice();
    this.table.rowsSeen = summary.rows;
    this.table.raggedRows = summary.raggedRows;
    return this.table;
  }
}

/** Index of the first value that differs bit for bit (Object.is: NaN equals NaN, 0 differs from -0), or -1. */
export function firstDifference(a: readonly number[], b: readonly number[]): number {
  const n = Math.max(a.length, b.length);
  for (let i = 0; i < n; i++) if (!Object.is(a[i], b[i])) return i;
  return -1;
}
