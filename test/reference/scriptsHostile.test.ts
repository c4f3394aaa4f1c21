/**
 * A table whose column names, label column name, class labels and table name hold quotes,
 * backslashes, newlines, non-Latin letters and text written as code: the generated Python and R
 * scripts must run, pass `--check` and reproduce the fit; the SQL query must run on DuckDB and
 * PostgreSQL and its result must fit like the file; and nothing the names spell may run (each
 * injection would create the file TRACE in the working folder).
 */
import * as assert from 'node:assert/strict';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { analyze } from '../../src/core/analyze';
import { fitFromMoments } from '../../src/core/momentsFit';
import { readMomentsInputs, type MomentsInput } from '../../src/core/momentsIO';
import { momentsQueryStatementsForTable, shiftsFromMoments } from '../../src/core/scripts/index';
import type { ExpectedFigures } from '../../src/core/scripts/plan';
import { sqlIdentifier, sqlString, type SqlDialect } from '../../src/core/scripts/quoting';
import { tableMoments } from '../../src/core/tableMoments';
import type { FitOptions, FitReport } from '../../src/core/types';
import { openFileSource } from '../../src/node/fileSource';
import { assertFiguresMatch, fitAndWriteScript, POSTGRES_MISSING, PYTHON, R, requireOrSkip, requireTool, runScript, startPostgres, type Postgres } from './scriptsSupport';

const TRACE = 'trace.txt';

const FEATURES = [
  `it's "quoted"`,
  'back\\slash\\n',
  'line\nbreak',
  'Ünïcødé 数据 данные',
  `'); open("${TRACE}", "w").write("x") #`,
  `"); file.create("${TRACE}"); #`,
];
const LABEL = 'fault; DROP TABLE x; --';
const CLASSES = [`"); file.create("${TRACE}"); #`, 'Ünïcødé 🙂', 'a,b "c"', `'); open("${TRACE}", "w") #`, 'multi\nline'];
const TABLE = 'pump "faults"; --';

const csvCell = (text: string) => (/[",\n\r]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text);

/** Invented rows (a property check): five classes with shifted means, correlated features. */
function hostileCsv(): string {
  let x = 2024;
  const next = () => (x = (48271 * x) % 2147483647) / 2147483647 - 0.5;
  const lines = [['pump_id', ...FEATURES, LABEL].map(csvCell).join(',')];
  for (let t = 0; t < 250; t++) {
    const c = t % CLASSES.length;
    const load = next();
    const values = FEATURES.map((_, j) => (10 + c * ((j + c) % 3) * 0.4 + load * (j + 1) * 0.3 + next()).toPrecision(6));
    lines.push([`PU-${1000 + t}`, ...values, CLASSES[c]!].map(csvCell).join(','));
  }
  return lines.join('\n') + '\n';
}

describe('hostile column names and labels', function () {
  this.timeout(600_000);
  let folder: string;
  let path: string;
  const options: Partial<FitOptions> = { label: LABEL, cv: 'kfold:5' };
  before(() => {
    folder = mkdtempSync(join(tmpdir(), 'scatterwise-hostile-'));
    path = join(folder, 'hostile names.csv');
    writeFileSync(path, hostileCsv());
  });
  after(() => rmSync(folder, { recursive: true, force: true }));
  afterEach(() => assert.equal(existsSync(join(folder, TRACE)), false, 'a name was run as code'));

  it('the core reads every name as written', async () => {
    const source = await openFileSource(path);
    try {
      const { report } = await analyze(source, options);
      assert.deepEqual(report.features, FEATURES);
      assert.deepEqual([...report.classes.map((c) => c.label)].sort(), [...CLASSES].sort());
    } finally {
      await source.close();
    }
  });

  for (const [tool, language] of [
    [PYTHON, 'python'],
    [R, 'r'],
  ] as const) {
    for (const cv of ['kfold:5', 'loo'] as const) {
      it(`${tool.name}: the script runs, passes --check and reproduces the figures (${cv})`, async function () {
        requireTool(this, tool);
        const { report, script } = await fitAndWriteScript(path, { ...options, cv }, language, folder);
        const out = runScript(tool, script, ['--check'], folder);
        assert.equal(out.status, 0, `--check failed:\n${out.stderr}`);
        assertFiguresMatch(JSON.parse(out.stdout) as ExpectedFigures, report);
      });
    }
  }

  async function statementsFor(dialect: SqlDialect): Promise<string[]> {
    const source = await openFileSource(path);
    try {
      const { moments, label } = await tableMoments(source, options);
      return momentsQueryStatementsForTable(label, moments.features, shiftsFromMoments(moments, moments.features), { dialect, table: TABLE, generator: 'test', fileDescription: 'hostile names.csv' });
    } finally {
      await source.close();
    }
  }

  async function fileReport(): Promise<FitReport> {
    const source = await openFileSource(path);
    try {
      return (await analyze(source, options)).report;
    } finally {
      await source.close();
    }
  }

  function assertSameFigures(inputs: MomentsInput[], report: FitReport): void {
    const { moments, label } = readMomentsInputs(inputs);
    assert.equal(label, LABEL);
    assert.deepEqual(moments.features, FEATURES);
    const fromMoments = fitFromMoments(moments, 'result', options, 0, label);
    assert.deepEqual(fromMoments.classes.map((c) => [c.label, c.count]), report.classes.map((c) => [c.label, c.count]));
    const top = Math.max(...report.discriminant.eigenvalues);
    fromMoments.discriminant.eigenvalues.forEach((v, i) => {
      const e = report.discriminant.eigenvalues[i]!;
      assert.ok(Math.abs(v - e) <= 1e-9 * Math.max(Math.abs(e), 1e-6 * top), `eigenvalue ${i + 1}: ${v} vs ${e}`);
    });
  }

  const columnsDdl = (dialect: SqlDialect) =>
    [`${sqlIdentifier('pump_id', dialect)} TEXT`, ...FEATURES.map((f) => `${sqlIdentifier(f, dialect)} DOUBLE PRECISION`), `${sqlIdentifier(LABEL, dialect)} TEXT`].join(', ');

  it('DuckDB: the query runs on a table with these names and fits like the file', async () => {
    const instance = await DuckDBInstance.create(':memory:');
    const connection = await instance.connect();
    try {
      await connection.run(`CREATE TABLE ${sqlIdentifier(TABLE, 'duckdb')} (${columnsDdl('duckdb')})`);
      await connection.run(`COPY ${sqlIdentifier(TABLE, 'duckdb')} FROM ${sqlString(path, 'duckdb')} (FORMAT csv, HEADER)`);
      const inputs: MomentsInput[] = [];
      for (const [i, statement] of (await statementsFor('duckdb')).entries()) {
        const out = join(folder, `duck-${i}.csv`);
        await connection.run(`COPY (${statement.replace(/;$/, '')}) TO ${sqlString(out, 'duckdb')} (FORMAT csv, HEADER)`);
        inputs.push({ name: out, text: readFileSync(out, 'utf8') });
      }
      assertSameFigures(inputs, await fileReport());
    } finally {
      connection.closeSync();
      instance.closeSync();
    }
  });

  describe('PostgreSQL', () => {
    let postgres: Postgres | null = null;
    before(() => {
      postgres = startPostgres();
    });
    after(() => postgres?.stop());

    it('the query runs on a table with these names and fits like the file', async function () {
      requireOrSkip(this, postgres ? null : POSTGRES_MISSING);
      const table = sqlIdentifier(TABLE, 'postgres');
      postgres!.sql(`CREATE TABLE ${table} (${columnsDdl('postgres')});\n\\copy ${table} FROM ${sqlString(path, 'postgres')} WITH (FORMAT csv, HEADER true)\n`);
      const inputs = (await statementsFor('postgres')).map((s, i) => ({ name: `pg-${i}.csv`, text: postgres!.sql(s) }));
      assertSameFigures(inputs, await fileReport());
      assert.equal(postgres!.sql(`SELECT count(*) FROM pg_class WHERE relname = 'x';`).trim().split('\n')[1], '0');
    });
  });
});
