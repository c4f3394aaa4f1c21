/**
 * Per-column summaries of the sampled rows (what `inspect` reports): kind, distinct values (capped),
 * whether the numbers are integers, missing cells.
 */
import type { ColumnKind, ColumnSummary } from './types';

const DISTINCT_CAP = 1000;
/** A column is numeric when at least this share of its non-missing sampled cells are numbers. */
const NUMERIC_SHARE = 0.9;

export class ColumnSample {
  private numbers = 0;
  private texts = 0;
  private missing = 0;
  private integral = true;
  private readonly distinct = new Set<number | string>();

  constructor(
    readonly name: string,
    readonly index: number,
  ) {}

  addMissing(): void {
    this.missing++;
  }

  addNumber(value: number): void {
    this.numbers++;
    if (!Number.isInteger(value)) this.integral = false;
    if (this.distinct.size < DISTINCT_CAP) this.distinct.add(value);
  }

  addText(text: string): void {
    this.texts++;
    if (this.distinct.size < DISTINCT_CAP) this.distinct.add(text);
  }

  summary(kind?: ColumnKind): ColumnSummary {
    const present = this.numbers + this.texts;
    const guessed: ColumnKind = present === 0 ? 'empty' : this.numbers > 0 && this.numbers >= NUMERIC_SHARE * present ? 'numeric' : 'text';
    return {
      name: this.name,
      index: this.index,
      kind: kind ?? guessed,
      distinct: this.distinct.size,
      integral: this.numbers > 0 && this.integral,
      missing: this.missing,
    };
  }
}
