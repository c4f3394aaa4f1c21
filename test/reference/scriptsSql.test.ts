/**
 * The SQL moments query on real engines: tables loaded from the sample files and Iris into DuckDB
 * (its npm package) and a throwaway PostgreSQL cluster, the generated query run there, its CSV
 * result fitted (fit --moments' code path), and every figure the moments determine compared with
 * fitting the file itself, to 1e-9 relative. Also: a wide table whose query is split into several
 * statements, and four shards from different engines merged into the whole.
 */
import * as assert from 'node:assert/strict';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance, type DuckDBConnection } from '@duckdb/node-api';
import { analyze } from '../../src/core/analyze';
import { fitFromMoments, type MomentsFitReport } from '../../src/core/momentsFit';
import { readMomentsInputs, type MomentsInput } from '../../src/core/momentsIO';
import { momentsToJSON } from '../../src/core/moments';
import { momentsQueryStatements } from '../../src/core/scripts/sql';
import { momentsQueryStatementsForTable, shiftsFromMoments } from '../../src/core/scripts/index';
import { sqlIdentifier, sqlString, type SqlDialect } from '../../src/core/scripts/quoting';
import { tableMoments } from '../../src/core/tableMoments';
import type { FitOptions, FitReport } from '../../src/core/types';
import { memorySource } from '../../src/core/source';
import { openFileSource } from '../../src/node/fileSource';
import { repoPath } from './compare';
import { POSTGRES_MISSING, requireOrSkip, startPostgres, type Postgres } from './scriptsSupport';

const TOLERANCE = 1e-9;

async function fitFile(path: string, options: Partial<FitOptions>): Promise<FitReport> {
  const source = await openFileSource(path);
  try {
    return (await analyze(source, options)).report;
  } finally {
    await source.close();
  }
}

/** Label, features and shifts of the query for a file, as `scatterwise script --lang sql` makes them. */
async function queryFor(path: string, options: Partial<FitOptions>, dialect: SqlDialect, table: string, maxAggregates?: number): Promise<string[]> {
  const source = await openFileSource(path);
  try {
    const { moments, label } = await tableMoments(source, options);
    const statements = momentsQueryStatementsForTable(label, moments.features, shiftsFromMoments(moments, moments.features), {
      dialect,
      table,
      generator: 'scatterwise (test)',
      fileDescription: path.split('/').pop()!,
      ...(maxAggregates !== undefined ? { maxAggregates } : {}),
    });
    return statements.map((s) => s.replace(/;$/, ''));
  } finally {
    await source.close();
  }
}

function near(actual: number, expected: number, scale: number, what: string): void {
  if (Number.isNaN(expected)) return assert.ok(Number.isNaN(actual), `${what}: expected NaN, got ${actual}`);
  assert.ok(Math.abs(actual - expected) <= TOLERANCE * Math.max(Math.abs(expected), 1e-6 * scale), `${what}: from moments ${actual}, from the file ${expected}`);
}

function nearAll(actual: readonly number[], expected: readonly number[], what: string): void {
  assert.equal(actual.length, expected.length, `${what}: length`);
  const scale = Math.max(0, ...expected.map((v) => (Number.isFinite(v) ? Math.abs(v) : 0)));
  actual.forEach((v, i) => near(v, expected[i]!, scale, `${what}[${i}]`));
}

/** Every figure the moments determine, from moments against from the file. */
function assertSameFit(fromMoments: MomentsFitReport, fromFile: FitReport): void {
  assert.deepEqual(fromMoments.classes.map((c) => [c.label, c.count]), fromFile.classes.map((c) => [c.label, c.count]));
  assert.deepEqual(fromMoments.features, fromFile.features);
  assert.deepEqual(fromMoments.removedFeatures, fromFile.removedFeatures);
  assert.equal(fromMoments.solver, fromFile.solver);
  near(fromMoments.shrinkage, fromFile.shrinkage, 1, 'shrinkage');
  const d = fromFile.discriminant;
  const m = fromMoments.discriminant;
  nearAll(m.eigenvalues, d.eigenvalues, 'eigenvalues');
  nearAll(m.explainedRatio, d.explainedRatio, 'explained ratio');
  nearAll(m.canonicalCorrelations, d.canonicalCorrelations, 'canonical correlations');
  nearAll(m.coefficients.flat(), d.coefficients.flat(), 'coefficients');
  nearAll(m.structure.flat(), d.structure.flat(), 'structure');
  nearAll(m.centroids.flat(), d.centroids.flat(), 'centroids');
  for (const test of ['wilks', 'pillai', 'hotellingLawley', 'roy'] as const) {
    nearAll([fromMoments.tests[test].statistic, fromMoments.tests[test].F, fromMoments.tests[test].p], [fromFile.tests[test].statistic, fromFile.tests[test].F, fromFile.tests[test].p], test);
  }
  nearAll(fromMoments.tests.bartlett.map((b) => b.chi2), fromFile.tests.bartlett.map((b) => b.chi2), 'Bartlett chi2');
  if (fromFile.tests.boxM) near(fromMoments.tests.boxM!.M, fromFile.tests.boxM.M, 1, "Box's M");
  nearAll(fromMoments.univariate.map((u) => u.F), fromFile.univariate.map((u) => u.F), 'univariate F');
  nearAll(fromMoments.centroidDistances.matrix.flat(), fromFile.centroidDistances.matrix.flat(), 'centroid distances');
  nearAll(fromMoments.pca.explainedRatio, fromFile.pca.explainedRatio, 'PCA explained ratio');
  assert.equal(fromMoments.accuracy.training, null);
  assert.ok(fromMoments.findings.some((f) => f.code === 'rows-not-available'));
}

interface Loaded {
  name: string;
  file: string[];
  table: string;
  options: Partial<FitOptions>;
}

const TABLES: Loaded[] = [
  { name: 'pump faults', file: ['sample-workspace', 'data', 'pump-faults.csv'], table: 'pump_faults', options: {} },
  { name: 'seal leak (shrinkage)', file: ['sample-workspace', 'data', 'seal-leak.csv'], table: 'seal leak', options: { solver: 'shrinkage' } },
  { name: 'iris', file: ['test', 'fixtures', 'iris', 'iris.csv'], table: 'Iris "data"', options: { label: 'species' } },
];

async function duckdbResultCsv(connection: DuckDBConnection, statements: string[], folder: string, prefix: string): Promise<MomentsInput[]> {
  const inputs: MomentsInput[] = [];
  for (const [i, statement] of statements.entries()) {
    const out = join(folder, `${prefix}-${i + 1}.csv`);
    await connection.run(`COPY (${statement}) TO ${sqlString(out, 'duckdb')} (FORMAT csv, HEADER)`);
    inputs.push({ name: out, text: readFileSync(out, 'utf8') });
  }
  return inputs;
}

/** CREATE TABLE + \copy for a CSV whose numeric columns are the given ones (others text). */
function loadIntoPostgres(postgres: Postgres, table: string, path: string, numeric: Set<string>): void {
  const header = readFileSync(path, 'utf8').split('\n')[0]!.split(',');
  const columns = header.map((name) => `${sqlIdentifier(name, 'postgres')} ${numeric.has(name) ? 'DOUBLE PRECISION' : 'TEXT'}`);
  postgres.sql(`CREATE TABLE ${sqlIdentifier(table, 'postgres')} (${columns.join(', ')});\n\\copy ${sqlIdentifier(table, 'postgres')} FROM ${sqlString(path, 'postgres')} WITH (FORMAT csv, HEADER true, NULL 'NA')\n`);
}

describe('the SQL moments query on real engines', function () {
  this.timeout(600_000);
  let folder: string;
  let instance: DuckDBInstance;
  let duck: DuckDBConnection;
  let postgres: Postgres | null = null;
  before(async () => {
    folder = mkdtempSync(join(tmpdir(), 'scatterwise-sql-'));
    instance = await DuckDBInstance.create(':memory:');
    duck = await instance.connect();
    postgres = startPostgres();
  });
  after(() => {
    duck?.closeSync();
    instance?.closeSync();
    postgres?.stop();
    rmSync(folder, { recursive: true, force: true });
  });

  for (const t of TABLES) {
    it(`DuckDB: ${t.name} — fitting the query's result equals fitting the file`, async () => {
      const path = repoPath(...t.file);
      await duck.run(`CREATE OR REPLACE TABLE ${sqlIdentifier(t.table, 'duckdb')} AS SELECT * FROM read_csv(${sqlString(path, 'duckdb')}, header = true, nullstr = 'NA')`);
      const statements = await queryFor(path, t.options, 'duckdb', t.table);
      const inputs = await duckdbResultCsv(duck, statements, folder, `duck-${t.table.replace(/\W/g, '')}`);
      const { moments, label } = readMomentsInputs(inputs);
      assertSameFit(fitFromMoments(moments, 'duckdb result', t.options, 0, label), await fitFile(path, t.options));
    });

    it(`PostgreSQL: ${t.name} — fitting the query's result equals fitting the file`, async function () {
      requireOrSkip(this, postgres ? null : POSTGRES_MISSING);
      const path = repoPath(...t.file);
      const report = await fitFile(path, t.options);
      const numeric = new Set([...report.features, ...report.removedFeatures.map((r) => r.feature)]);
      loadIntoPostgres(postgres!, t.table, path, numeric);
      const statements = await queryFor(path, t.options, 'postgres', t.table);
      const inputs = statements.map((s, i) => ({ name: `pg-${i + 1}.csv`, text: postgres!.sql(`${s};`) }));
      const { moments, label } = readMomentsInputs(inputs);
      assert.equal(label, report.label);
      assertSameFit(fitFromMoments(moments, 'postgres result', t.options, 0, label), report);
    });
  }

  it('a wide table (150 features) is split into statements; DuckDB runs them all and the fit equals the file', async () => {
    // Invented data for a property check: 3 classes, 150 correlated features.
    let x = 12345;
    const next = () => (x = (48271 * x) % 2147483647) / 2147483647 - 0.5;
    const d = 150;
    const names = Array.from({ length: d }, (_, j) => `f${j}`);
    const lines = [[...names, 'class'].join(',')];
    for (let t = 0; t < 600; t++) {
      const c = t % 3;
      const common = next();
      lines.push([...names.map((_, j) => (100 + c * ((j % 7) / 10) + common + next()).toPrecision(8)), `k${c}`].join(','));
    }
    const path = join(folder, 'wide.csv');
    writeFileSync(path, lines.join('\n') + '\n');
    const options: Partial<FitOptions> = { label: 'class', solver: 'shrinkage' };
    await duck.run(`CREATE OR REPLACE TABLE wide AS SELECT * FROM read_csv(${sqlString(path, 'duckdb')}, header = true)`);
    const statements = await queryFor(path, options, 'duckdb', 'wide');
    assert.ok(statements.length >= 5, `${statements.length} statements`);
    const { moments, label } = readMomentsInputs(await duckdbResultCsv(duck, statements, folder, 'wide'));
    assertSameFit(fitFromMoments(moments, 'wide', options, 0, label), await fitFile(path, options));
    // The same statements with a tiny budget still cover every aggregate once.
    assert.ok(momentsQueryStatements({ dialect: 'duckdb', table: 'wide', label: 'class', features: names, shifts: names.map(() => 100), maxAggregates: 500, provenance: [] }).length > statements.length);
  });

  it('four shards from different engines (PostgreSQL, DuckDB, two JSON parts) merge into the whole', async function () {
    requireOrSkip(this, postgres ? null : POSTGRES_MISSING);
    const path = repoPath('sample-workspace', 'data', 'pump-faults.csv');
    const [header, ...rows] = readFileSync(path, 'utf8').trimEnd().split('\n');
    const quarter = Math.ceil(rows.length / 4);
    const shards = [0, 1, 2, 3].map((i) => {
      const shard = join(folder, `shard-${i}.csv`);
      writeFileSync(shard, [header, ...rows.slice(i * quarter, (i + 1) * quarter)].join('\n') + '\n');
      return shard;
    });
    const whole = await fitFile(path, {});
    const numeric = new Set(whole.features);
    const inputs: MomentsInput[] = [];
    // Shard 0 in PostgreSQL.
    loadIntoPostgres(postgres!, 'shard0', shards[0]!, numeric);
    for (const [i, s] of (await queryFor(shards[0]!, {}, 'postgres', 'shard0')).entries()) inputs.push({ name: `pg-${i}.csv`, text: postgres!.sql(`${s};`) });
    // Shard 1 in DuckDB.
    await duck.run(`CREATE OR REPLACE TABLE shard1 AS SELECT * FROM read_csv(${sqlString(shards[1]!, 'duckdb')}, header = true)`);
    inputs.push(...(await duckdbResultCsv(duck, await queryFor(shards[1]!, {}, 'duckdb', 'shard1'), folder, 'shard1')));
    // Shards 2 and 3 as JSON parts (scatterwise moments).
    for (const shard of shards.slice(2)) {
      const source = memorySource(shard, readFileSync(shard));
      const { moments, label } = await tableMoments(source, {});
      inputs.push({ name: shard, text: JSON.stringify({ ...momentsToJSON(moments), label }) });
    }
    const { moments, label } = readMomentsInputs(inputs);
    assert.equal(label, 'fault');
    assertSameFit(fitFromMoments(moments, 'four shards', {}, 0, label), whole);
  });
});
