/**
 * An outside check of number reading: DuckDB (npm @duckdb/node-api, a dev dependency) parses a
 * generated CSV with its own parser and writes the doubles to Parquet; our CSV reader on the text
 * and our Parquet reader on DuckDB's file must give the same doubles bit for bit, and the same
 * labels and missing cells. Invented data (a property test), written to os.tmpdir().
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { inspectTable, scanTable } from '../../../src/core/read/index';
import { openFileSource } from '../../../src/node/fileSource';

function randomGenerator(seed: number): () => number {
  let state = seed;
  return () => {
    state = (state * 48271) % 2147483647;
    return (state - 1) / 2147483646;
  };
}

/** Numbers in the forms DuckDB and we both read: plain, exponent, long mantissas, tiny and huge. */
function numberText(random: () => number): string {
  const digits = (n: number): string => Array.from({ length: n }, () => String(Math.floor(random() * 10))).join('');
  const sign = random() < 0.3 ? '-' : '';
  switch (Math.floor(random() * 7)) {
    case 0:
      return `${sign}${digits(1 + Math.floor(random() * 6))}.${digits(1 + Math.floor(random() * 8))}`;
    case 1:
      return `${sign}${digits(1)}.${digits(5)}e${random() < 0.5 ? '-' : ''}${Math.floor(random() * 40)}`;
    case 2:
      return `${sign}${digits(17 + Math.floor(random() * 6))}.${digits(3)}`;
    case 3:
      return `${sign}0.${'0'.repeat(Math.floor(random() * 20))}${digits(1 + Math.floor(random() * 17))}`;
    case 4:
      return `${sign}${digits(1 + Math.floor(random() * 3))}e${random() < 0.5 ? '-3' : '3'}0${Math.floor(random() * 8)}`;
    case 5:
      return String((random() - 0.5) * 10 ** Math.floor(random() * 40 - 20));
    default:
      return '';
  }
}

async function readAll(path: string): Promise<{ values: number[]; labels: string[] }> {
  const source = await openFileSource(path);
  try {
    const inspection = await inspectTable(source);
    const label = inspection.columns.findIndex((column) => column.name === 'fault');
    const features = inspection.columns.map((column) => column.index).filter((index) => index !== label);
    const values: number[] = [];
    const labels: string[] = [];
    await scanTable({
      source,
      inspection,
      plan: { label, features },
      onBatch: (batch, dictionary) => {
        values.push(...batch.values);
        for (const id of batch.labels) labels.push(id < 0 ? '<missing>' : dictionary[id]);
      },
    });
    return { values, labels };
  } finally {
    await source.close();
  }
}

describe('numbers against DuckDB', function () {
  this.timeout(120_000);
  let folder: string;
  before(() => {
    folder = mkdtempSync(join(tmpdir(), 'scatterwise-duckdb-'));
  });
  after(() => rmSync(folder, { recursive: true, force: true }));

  it('our CSV reader and our Parquet reader of DuckDB’s conversion agree bit for bit', async () => {
    const random = randomGenerator(99);
    const faults = ['healthy', 'bearing, outer race', 'cavitation', ''];
    const lines = ['vibration_rms,kurtosis,acoustic_db,spectral_centroid,fault'];
    for (let row = 0; row < 20_000; row++) {
      const fault = faults[row % faults.length];
      lines.push([numberText(random), numberText(random), numberText(random), numberText(random), fault.includes(',') ? `"${fault}"` : fault].join(','));
    }
    const csv = join(folder, 'pumps.csv');
    const parquet = join(folder, 'pumps.parquet');
    writeFileSync(csv, lines.join('\n') + '\n');
    const { DuckDBInstance } = await import('@duckdb/node-api');
    const connection = await (await DuckDBInstance.create(':memory:')).connect();
    const quoted = (path: string): string => `'${path.replace(/'/g, "''")}'`;
    await connection.run(
      `COPY (SELECT * FROM read_csv(${quoted(csv)}, header = true, columns = {'vibration_rms': 'DOUBLE', 'kurtosis': 'DOUBLE', 'acoustic_db': 'DOUBLE', 'spectral_centroid': 'DOUBLE', 'fault': 'VARCHAR'})) TO ${quoted(parquet)} (FORMAT parquet)`,
    );
    connection.closeSync();
    const fromText = await readAll(csv);
    const fromParquet = await readAll(parquet);
    assert.equal(fromText.values.length, 80_000);
    assert.equal(fromParquet.values.length, 80_000);
    for (let i = 0; i < fromText.values.length; i++) {
      assert.ok(Object.is(fromText.values[i], fromParquet.values[i]), `value ${i} (row ${Math.floor(i / 4) + 2}): ours ${fromText.values[i]}, DuckDB ${fromParquet.values[i]}`);
    }
    assert.deepEqual(fromParquet.labels, fromText.labels);
    assert.ok(fromText.values.some((value) => Number.isNaN(value)), 'the data hold missing cells');
  });
});
