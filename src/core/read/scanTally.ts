/**
 * What a text scan counts besides the rows it hands on: non-numeric feature cells and rows with
 * the wrong number of fields, each with the first few examples, and the summary built from them.
 */
import { DataError } from '../errors';
import type { CellExample, ReaderNote, ScanSummary } from './types';

/** Examples kept per feature and of ragged rows. */
export const EXAMPLES = 5;
/** Characters of a row or cell quoted in an example. */
export const EXAMPLE_CHARACTERS = 200;

export class ScanTally {
  rowsSeen = 0;
  readonly nonNumeric: number[];
  readonly nonNumericExamples: CellExample[][];
  raggedRows = 0;
  private readonly raggedExamples: CellExample[] = [];
  private readonly raggedFieldCounts: number[] = [];

  constructor(
    private readonly file: string,
    private readonly columnNames: readonly string[],
    featureCount: number,
  ) {
    this.nonNumeric = new Array<number>(featureCount).fill(0);
    this.nonNumericExamples = Array.from({ length: featureCount }, () => []);
  }

  /** Whether the next non-numeric cell of this feature is still quoted as an example. */
  wantsExample(slot: number): boolean {
    return this.nonNumericExamples[slot].length < EXAMPLES;
  }

  nonNumericCell(slot: number, row: number, line: number, text: string): void {
    this.nonNumeric[slot]++;
    if (this.wantsExample(slot)) this.nonNumericExamples[slot].push({ row, line, text: text.slice(0, EXAMPLE_CHARACTERS) });
  }

  /** Counts a ragged row; true when the examples are complete (a scan that does not skip them stops here). */
  raggedRow(row: number, line: number, fields: number, text: string): boolean {
    this.raggedRows++;
    if (this.raggedExamples.length < EXAMPLES) {
      this.raggedExamples.push({ row, line, text: text.slice(0, EXAMPLE_CHARACTERS) });
      this.raggedFieldCounts.push(fields);
    }
    return this.raggedExamples.length >= EXAMPLES;
  }

  raggedError(): DataError {
    const expected = this.columnNames.length;
    const list = this.raggedExamples.map((example, i) => `line ${example.line} (${this.raggedFieldCounts[i]} fields)`).join(', ');
    const first = this.raggedExamples[0];
    const more = this.raggedRows >= EXAMPLES ? ', perhaps more' : '';
    return new DataError(
      'ragged-row',
      `${this.file}: rows with a different number of fields than the ${expected} columns of the header: ${list}${more}.`,
      { file: this.file, line: first.line, row: first.row, column: this.columnNames[Math.min(this.raggedFieldCounts[0], expected - 1)] },
      'Fix those rows, or skip them with the option to skip ragged rows (they are counted in the report).',
    );
  }

  summary(labels: readonly string[], inspectionNotes: readonly ReaderNote[]): ScanSummary {
    const notes: ReaderNote[] = [...inspectionNotes];
    if (this.raggedRows > 0) {
      notes.push({
        code: 'ragged-rows-skipped',
        severity: 'warning',
        message: `${this.raggedRows} rows with a field count other than ${this.columnNames.length} were skipped (first at line ${this.raggedExamples[0].line}).`,
      });
    }
    return {
      rows: this.rowsSeen,
      labels: labels.slice(),
      nonNumeric: this.nonNumeric,
      nonNumericExamples: this.nonNumericExamples,
      raggedRows: this.raggedRows,
      raggedExamples: this.raggedExamples,
      notes,
    };
  }
}
