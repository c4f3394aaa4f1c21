/**
 * Hostile names through the real interpreters: every literal and identifier quoting.ts writes is
 * read back by Python, R, SQLite, DuckDB and PostgreSQL and must come back code point for code
 * point, and no injected statement may run.
 */
import * as assert from 'node:assert/strict';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DuckDBInstance } from '@duckdb/node-api';
import { pythonString, rString, sqlIdentifier, sqlString, type SqlDialect } from '../../src/core/scripts/quoting';
import { PYTHON, R, SQLITE, POSTGRES_MISSING, requireOrSkip, requireTool, run, startPostgres, type Postgres } from './scriptsSupport';

/**
 * Names a data file may hold; some are code that would leave the file TRACE in the working folder
 * if it ran. Each stays under PostgreSQL's 63-byte identifier limit.
 */
const TRACE = 'trace.txt';
function hostileNames(trace = TRACE): string[] {
  return [
    `it's "quoted"`,
    'back\\slash\\n and \\\\ double',
    '  spaced  out  ',
    'line\nbreak',
    'carriage\r\nreturn\tand tab',
    'Ünïcødé 数据 данные',
    'emoji 🙂 and 𝔘',
    `'); open(${JSON.stringify(trace)}, 'w').write('x') #`,
    `"); file.create(${JSON.stringify(trace)}); #`,
    `'; CREATE TABLE injected (x int); --`,
    '`backtick` $HOME $(id) ${x}',
    '-- comment /* block */',
    'bidi \u202e override \u2066 isolate',
    'zero\u200bwidth \ufeff bom \u00ad soft',
    'control \u0001 \u007f \u0085 \u2028 sep',
  ];
}

const codePoints = (s: string): number[] => Array.from(s, (c) => c.codePointAt(0)!);

describe('quoting through the real interpreters', function () {
  this.timeout(120_000);
  let folder: string;
  let trace: string;
  before(() => {
    folder = mkdtempSync(join(tmpdir(), 'scatterwise-quoting-'));
    trace = join(folder, TRACE);
  });
  after(() => rmSync(folder, { recursive: true, force: true }));

  it('Python string literals read back exactly', function () {
    requireTool(this, PYTHON);
    const names = hostileNames();
    const script = join(folder, 'names.py');
    writeFileSync(script, `import json, sys\nnames = [\n${names.map((n) => `    ${pythonString(n)},`).join('\n')}\n]\nsys.stdout.write(json.dumps([[ord(c) for c in n] for n in names]))\n`);
    const out = run(PYTHON.command, [script], { cwd: folder });
    assert.equal(out.status, 0, out.stderr);
    assert.deepEqual(JSON.parse(out.stdout), names.map(codePoints));
    assert.equal(existsSync(trace), false, 'an injected statement ran');
  });

  it('R string literals read back exactly, in the C locale too', function () {
    requireTool(this, R);
    const names = hostileNames();
    const script = join(folder, 'names.R');
    writeFileSync(script, `names <- c(\n${names.map((n) => `  ${rString(n)}`).join(',\n')}\n)\ncat(vapply(names, function(s) paste(utf8ToInt(enc2utf8(s)), collapse = " "), ""), sep = "\\n")\n`);
    for (const locale of ['C', 'C.UTF-8']) {
      const out = run(R.command, [script], { cwd: folder, env: { ...process.env, LC_ALL: locale, LANG: locale } });
      assert.equal(out.status, 0, out.stderr);
      assert.deepEqual(out.stdout.trimEnd().split('\n').map((line) => line.split(' ').map(Number)), names.map(codePoints), `locale ${locale}`);
    }
    assert.equal(existsSync(trace), false, 'an injected statement ran');
  });

  /** SELECT of every name as a literal and a table whose columns are the names, per dialect. */
  function probeSql(dialect: SqlDialect, names: string[]): { literals: string; table: string } {
    const literals = `SELECT ${names.map((n, i) => `${sqlString(n, dialect)} AS ${sqlIdentifier(`v${i}`, dialect)}`).join(', ')};`;
    const table = `CREATE TABLE probe (${names.map((n) => `${sqlIdentifier(n, dialect)} DOUBLE PRECISION`).join(', ')});`;
    return { literals, table };
  }

  it('SQLite literals and identifiers read back exactly', function () {
    requireTool(this, SQLITE);
    const names = hostileNames();
    const { table } = probeSql('sqlite', names);
    const hexOf = (expression: string) => `hex(CAST(${expression} AS BLOB))`;
    const sql = [
      `SELECT ${names.map((n) => hexOf(sqlString(n, 'sqlite'))).join(' || \',\' || ')};`,
      table,
      `SELECT group_concat(hex(name), ',') FROM (SELECT name FROM pragma_table_info('probe') ORDER BY cid);`,
      `SELECT count(*) FROM sqlite_master WHERE name = 'injected';`,
    ].join('\n');
    const out = run(SQLITE.command, [':memory:'], { input: sql });
    assert.equal(out.status, 0, out.stderr);
    const [literalHex, columnHex, injected] = out.stdout.trimEnd().split('\n');
    const expectedHex = names.map((n) => Buffer.from(n, 'utf8').toString('hex').toUpperCase());
    assert.deepEqual(literalHex!.split(','), expectedHex);
    // The sqlite3 shell reads its input line by line and drops a carriage return before a line feed
    // (which is why literals spell control characters as char(N)); identifiers have no escape syntax.
    const shellHex = names.map((n) => Buffer.from(n.replaceAll('\r\n', '\n'), 'utf8').toString('hex').toUpperCase());
    assert.deepEqual(columnHex!.split(','), shellHex);
    assert.equal(injected, '0');
  });

  it('DuckDB literals and identifiers read back exactly', async function () {
    const names = hostileNames();
    const { literals, table } = probeSql('duckdb', names);
    const instance = await DuckDBInstance.create(':memory:');
    const connection = await instance.connect();
    try {
      const row = (await connection.runAndReadAll(literals)).getRows()[0]!;
      assert.deepEqual(row, names);
      await connection.run(table);
      const columns = (await connection.runAndReadAll(`SELECT column_name FROM information_schema.columns WHERE table_name = 'probe' ORDER BY ordinal_position`)).getRows().map((r) => r[0]);
      assert.deepEqual(columns, names);
      const injected = (await connection.runAndReadAll(`SELECT count(*) FROM information_schema.tables WHERE table_name = 'injected'`)).getRows()[0]![0];
      assert.equal(Number(injected), 0);
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

    it('literals and identifiers read back exactly, with and without standard_conforming_strings', function () {
      requireOrSkip(this, postgres ? null : POSTGRES_MISSING);
      const names = hostileNames();
      const { literals, table } = probeSql('postgres', names);
      const hex = (expression: string) => `encode(convert_to(${expression}, 'UTF8'), 'hex')`;
      for (const conforming of ['on', 'off']) {
        const out = postgres!.sql(
          [
            `SET standard_conforming_strings = ${conforming};`,
            `SELECT ${names.map((n) => hex(sqlString(n, 'postgres'))).join(` || ',' || `)} AS literals;`,
          ].join('\n'),
        );
        const literalHex = out.trimEnd().split('\n')[1]!.replace(/^"|"$/g, '');
        assert.deepEqual(literalHex.split(','), names.map((n) => Buffer.from(n, 'utf8').toString('hex')), `standard_conforming_strings=${conforming}`);
      }
      assert.ok(literals.length > 0);
      const columns = postgres!.sql(
        [`${table}`, `SELECT ${hex('attname::text')} FROM pg_attribute WHERE attrelid = 'probe'::regclass AND attnum > 0 ORDER BY attnum;`, `SELECT count(*) FROM pg_class WHERE relname = 'injected';`].join('\n'),
      );
      const lines = columns.trimEnd().split('\n');
      const injectedAt = lines.lastIndexOf('count');
      assert.deepEqual(lines.slice(1, injectedAt), names.map((n) => Buffer.from(n, 'utf8').toString('hex')));
      assert.equal(lines[injectedAt + 1], '0');
      // The ANSI form (U&'…' for control characters) read by PostgreSQL, which implements it.
      const ansi = postgres!.sql(`SELECT ${names.map((n) => hex(sqlString(n, 'ansi'))).join(` || ',' || `)} AS literals;`);
      assert.deepEqual(ansi.trimEnd().split('\n')[1]!.replace(/^"|"$/g, '').split(','), names.map((n) => Buffer.from(n, 'utf8').toString('hex')));
    });
  });
});
