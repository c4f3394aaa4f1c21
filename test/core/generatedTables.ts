/**
 * Invented tables for the pipeline's behaviour tests (pump-fleet style: vibration and acoustic
 * features, labelled by fault type), from a seeded generator so every run sees the same bytes.
 * Each test plants the defect it checks on top of a clean table.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { memorySource } from '../../src/core/source';
import type { ByteSource } from '../../src/core/source';

/** Park–Miller minimal standard generator in (0, 1). */
export function uniform(seed: number): () => number {
  let x = seed % 2147483647 || 1;
  return () => {
    x = (48271 * x) % 2147483647;
    return x / 2147483647;
  };
}

/** Standard normal draws by Box–Muller over `uniform`. */
export function normal(seed: number): () => number {
  const u = uniform(seed);
  return () => Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
}

export const FAULTS = ['bearing-defect', 'cavitation', 'healthy'] as const;

export interface Table {
  header: string[];
  rows: string[][];
}

/**
 * A clean table: `features` numeric columns whose class means differ, a `pump_id` text column and
 * the label `fault`. Class sizes in `counts` (order of FAULTS), rows interleaved by class.
 */
export function pumpTable(counts: readonly number[] = [40, 30, 50], features = 4, seed = 7): Table {
  const draw = normal(seed);
  const header = ['pump_id', ...Array.from({ length: features }, (_, j) => `feature_${j + 1}`), 'fault'];
  const left = [...counts];
  const rows: string[][] = [];
  let c = 0;
  while (left.some((n) => n > 0)) {
    c = (c + 1) % counts.length;
    if (left[c]! === 0) continue;
    left[c]! -= 1;
    const values = Array.from({ length: features }, (_, j) => (j < 3 ? 1.5 * (c === j ? 1 : 0) + (c === 2 ? 0.8 : 0) : 0) + draw());
    // A little correlation between the first two features, as real sensor channels have.
    values[1] = values[1]! + 0.4 * values[0]!;
    rows.push([`PU-${1000 + rows.length}`, ...values.map((v) => v.toPrecision(6)), FAULTS[c % FAULTS.length]!]);
  }
  return { header, rows };
}

/** Appends a column computed from each row (the other cells as numbers where they parse). */
export function addColumn(table: Table, name: string, value: (row: string[], i: number) => string): Table {
  return { header: [...table.header.slice(0, -1), name, table.header[table.header.length - 1]!], rows: table.rows.map((r, i) => [...r.slice(0, -1), value(r, i), r[r.length - 1]!]) };
}

export function toCsv(table: Table, delimiter = ','): string {
  return [table.header, ...table.rows].map((r) => r.join(delimiter)).join('\n') + '\n';
}

export function sourceOf(text: string, name = 'pumps.csv'): ByteSource {
  return memorySource(name, new TextEncoder().encode(text));
}

/** Folders made by writeTemporary, removed when the test process exits. */
const temporaryFolders: string[] = [];

/** Writes a file into a fresh folder under the system temporary directory (removed when the test process exits). */
export function writeTemporary(name: string, text: string): string {
  const folder = mkdtempSync(join(tmpdir(), 'scatterwise-test-'));
  if (temporaryFolders.push(folder) === 1) {
    process.once('exit', () => {
      for (const made of temporaryFolders) rmSync(made, { recursive: true, force: true });
    });
  }
  const path = join(folder, name);
  writeFileSync(path, text);
  return path;
}

/** Column j of the table as numbers (column index into the header). */
export function numericColumn(table: Table, name: string): number[] {
  const j = table.header.indexOf(name);
  return table.rows.map((r) => Number(r[j]));
}
