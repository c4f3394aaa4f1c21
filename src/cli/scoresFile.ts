/**
 * The `--scores` CSV: columns LD1..LDk, one line per data row in file order, empty fields for rows
 * the analysis did not use (dropped, or skipped as ragged). Numbers are written in JavaScript's
 * shortest round-trip form, so reading them back gives the same doubles.
 *
 * With a single discriminant a dropped row is an empty line; readers that skip blank lines by
 * default (pandas: `skip_blank_lines=False`) must be told not to.
 */
import type { ScoreBatch } from '../core/analyze';
import { OutputFile } from './files';

export class ScoresFile {
  private readonly file: OutputFile;
  private nextRow = 0;
  private emptyLine = '\n';
  private headerWritten = false;

  constructor(path: string) {
    this.file = new OutputFile(path);
  }

  private header(k: number): void {
    if (this.headerWritten) return;
    this.headerWritten = true;
    this.emptyLine = `${','.repeat(Math.max(0, k - 1))}\n`;
    this.file.write(`${Array.from({ length: k }, (_, j) => `LD${j + 1}`).join(',')}\n`);
  }

  private emptyRows(count: number): void {
    for (let written = 0; written < count; ) {
      const chunk = Math.min(count - written, 65536);
      this.file.write(this.emptyLine.repeat(chunk));
      written += chunk;
    }
  }

  /** Called with each batch of pass 2, in file order. */
  add(batch: ScoreBatch): void {
    this.header(batch.k);
    if (batch.firstRow > this.nextRow) this.emptyRows(batch.firstRow - this.nextRow);
    const lines: string[] = [];
    for (let i = 0; i < batch.rows; i++) {
      const first = batch.scores[i * batch.k];
      if (batch.k === 0 || Number.isNaN(first)) {
        lines.push(this.emptyLine);
        continue;
      }
      const fields: string[] = [];
      for (let j = 0; j < batch.k; j++) fields.push(String(batch.scores[i * batch.k + j]));
      lines.push(`${fields.join(',')}\n`);
    }
    this.file.write(lines.join(''));
    this.nextRow = batch.firstRow + batch.rows;
  }

  /** Pads to `totalRows` lines and renames the file into place. */
  finish(totalRows: number, k: number): void {
    this.header(k);
    if (totalRows > this.nextRow) this.emptyRows(totalRows - this.nextRow);
    this.file.commit();
  }

  discard(): void {
    this.file.discard();
  }
}
