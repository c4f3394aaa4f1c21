/**
 * The outside programs the script suites run: Debian's Python (pandas, scikit-learn), R (MASS),
 * the sqlite3 shell, a throwaway PostgreSQL cluster, and DuckDB from its npm package.
 *
 * When a program is missing: under CI (process.env.CI set) the test fails and names the Debian
 * package `.ci/run` must install; elsewhere it is marked pending with the same message.
 */
import * as assert from 'node:assert/strict';
import { spawnSync, type SpawnSyncReturns } from 'node:child_process';
import { chownSync, existsSync, mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { analyze } from '../../src/core/analyze';
import { reproductionScript } from '../../src/core/scripts/index';
import type { ExpectedFigures } from '../../src/core/scripts/plan';
import type { FitOptions, FitReport } from '../../src/core/types';
import { fileSha256 } from '../../src/node/fileSha256';
import { openFileSource } from '../../src/node/fileSource';

export interface Tool {
  name: string;
  command: string;
  probe: string[];
  missing: string;
}

export const PYTHON: Tool = {
  name: 'Python',
  command: '/usr/bin/python3',
  probe: ['-c', 'import numpy, scipy, sklearn, pandas'],
  missing: '/usr/bin/python3 with pandas and scikit-learn is needed: .ci/run must install python3-sklearn python3-pandas python3-scipy python3-numpy',
};

export const R: Tool = {
  name: 'R',
  command: 'Rscript',
  probe: ['-e', 'suppressPackageStartupMessages(library(MASS))'],
  missing: 'Rscript with MASS is needed: .ci/run must install r-base-core r-cran-mass',
};

export const SQLITE: Tool = {
  name: 'SQLite',
  command: 'sqlite3',
  probe: ['-version'],
  missing: 'the sqlite3 shell is needed: .ci/run must install sqlite3',
};

const probed = new Map<string, boolean>();

export function available(tool: Tool): boolean {
  let ok = probed.get(tool.name);
  if (ok === undefined) {
    ok = spawnSync(tool.command, tool.probe, { encoding: 'utf8', timeout: 60_000 }).status === 0;
    probed.set(tool.name, ok);
  }
  return ok;
}

/** Fails under CI, else marks the test pending, when `missing` is a reason. */
export function requireOrSkip(context: Mocha.Context, missing: string | null): void {
  if (missing === null) return;
  if (process.env.CI) assert.fail(missing);
  context.skip();
}

export function requireTool(context: Mocha.Context, tool: Tool): void {
  requireOrSkip(context, available(tool) ? null : tool.missing);
}

export function run(command: string, args: string[], options: { input?: string; cwd?: string; env?: NodeJS.ProcessEnv } = {}): SpawnSyncReturns<string> {
  return spawnSync(command, args, { encoding: 'utf8', timeout: 600_000, maxBuffer: 256 * 1024 * 1024, ...options });
}

// ---- PostgreSQL: a throwaway cluster in os.tmpdir(), reached over a Unix socket only -------------

export interface Postgres {
  /** Runs SQL (statements separated by `;`) with psql; returns its CSV output. Throws on error. */
  sql(text: string): string;
  stop(): void;
}

function postgresBin(): string | null {
  const root = '/usr/lib/postgresql';
  if (!existsSync(root)) return null;
  const versions = readdirSync(root)
    .filter((v) => existsSync(join(root, v, 'bin', 'initdb')))
    .sort((a, b) => Number(b) - Number(a));
  return versions.length > 0 ? join(root, versions[0]!, 'bin') : null;
}

export const POSTGRES_MISSING = 'PostgreSQL (initdb, pg_ctl, psql) is needed: .ci/run must install postgresql';

/**
 * Starts a new cluster owned by the `postgres` user when running as root (initdb refuses root),
 * else by the current user; listens on a socket in its own folder, no TCP. Null when PostgreSQL is
 * not installed.
 */
export function startPostgres(): Postgres | null {
  const bin = postgresBin();
  if (bin === null || spawnSync('psql', ['--version']).status !== 0) return null;
  const folder = mkdtempSync(join(tmpdir(), 'scatterwise-pg-'));
  const asRoot = process.getuid?.() === 0;
  let owner: string[] = [];
  if (asRoot) {
    const uid = Number(run('id', ['-u', 'postgres']).stdout.trim());
    const gid = Number(run('id', ['-g', 'postgres']).stdout.trim());
    chownSync(folder, uid, gid);
    owner = ['runuser', '-u', 'postgres', '--'];
  }
  const as = (command: string, args: string[]) => (asRoot ? run(owner[0]!, [...owner.slice(1), command, ...args]) : run(command, args));
  const data = join(folder, 'data');
  const init = as(join(bin, 'initdb'), ['-D', data, '-U', 'postgres', '--auth=trust', '-E', 'UTF8', '--locale=C.UTF-8']);
  if (init.status !== 0) throw new Error(`initdb failed: ${init.stderr}`);
  const port = String(20000 + Math.floor(Math.random() * 20000));
  const start = as(join(bin, 'pg_ctl'), ['-D', data, '-o', `-c listen_addresses='' -k ${folder} -p ${port}`, '-w', '-l', join(folder, 'log'), 'start']);
  if (start.status !== 0) throw new Error(`pg_ctl start failed: ${start.stderr}${start.stdout}`);
  return {
    sql(text: string): string {
      const out = run('psql', ['-X', '-q', '-v', 'ON_ERROR_STOP=1', '--csv', '-h', folder, '-p', port, '-U', 'postgres', '-d', 'postgres', '-f', '-'], { input: text });
      if (out.status !== 0) throw new Error(`psql failed: ${out.stderr}`);
      return out.stdout;
    },
    stop(): void {
      as(join(bin, 'pg_ctl'), ['-D', data, '-m', 'immediate', '-w', 'stop']);
      rmSync(folder, { recursive: true, force: true });
    },
  };
}

// ---- generated scripts: write, run, compare with the core ---------------------------------------

/** Relative tolerance of script figures against the core's (the acceptance figure). */
const SCRIPT_TOLERANCE = 1e-8;

/** The report of `path` with its SHA-256, and the script in `language` written to `folder`. */
export async function fitAndWriteScript(path: string, options: Partial<FitOptions>, language: 'python' | 'r', folder: string): Promise<{ report: FitReport; script: string }> {
  const source = await openFileSource(path);
  let text: string;
  let report: FitReport;
  try {
    const result = await analyze(source, options);
    report = { ...result.report, source: { ...result.report.source, sha256: await fileSha256(path) } };
    text = reproductionScript(language, report, result.inspection, 'scatterwise (test)', path);
  } finally {
    await source.close();
  }
  const script = join(folder, language === 'python' ? 'fit.py' : 'fit.R');
  writeFileSync(script, text);
  return { report, script };
}

export function runScript(tool: Tool, script: string, args: string[], cwd: string): { status: number | null; stdout: string; stderr: string } {
  const out = run(tool.command, [script, ...args], { cwd, env: { ...process.env, LC_ALL: 'C', LANG: 'C' } });
  return { status: out.status, stdout: out.stdout, stderr: out.stderr };
}

function close(actual: number, expected: number, scale: number, what: string): void {
  assert.ok(Math.abs(actual - expected) <= SCRIPT_TOLERANCE * Math.max(Math.abs(expected), 1e-6 * scale), `${what}: script ${actual}, core ${expected}`);
}

/** The script's printed figures against the core's report. */
export function assertFiguresMatch(printed: ExpectedFigures, report: FitReport): void {
  assert.equal(printed.rowsUsed, report.rows.used, 'rows used');
  assert.deepEqual(printed.labels, report.classes.map((c) => c.label), 'class labels and order');
  assert.deepEqual(printed.counts, report.classes.map((c) => c.count), 'class counts');
  const eigen = report.discriminant.eigenvalues;
  assert.equal(printed.eigenvalues.length, eigen.length, 'number of discriminants');
  const top = Math.max(...eigen.map(Math.abs));
  printed.eigenvalues.forEach((v, i) => close(v, eigen[i]!, top, `eigenvalue ${i + 1}`));
  printed.explainedRatio.forEach((v, i) => close(v, report.discriminant.explainedRatio[i]!, 1, `explained ratio ${i + 1}`));
  close(printed.shrinkage, report.shrinkage, 1, 'shrinkage intensity');
  close(printed.trainingAccuracy, report.accuracy.training, 1, 'training accuracy');
  assert.deepEqual(printed.confusion, report.confusion.matrix, 'training confusion');
  const cv = report.accuracy.crossValidated;
  if (cv === null) assert.equal(printed.crossValidation, null, 'no cross-validation');
  else {
    assert.ok(printed.crossValidation, 'cross-validation figures');
    close(printed.crossValidation.accuracy, cv.value, 1, `cross-validated accuracy (${cv.method})`);
    assert.deepEqual(printed.crossValidation.confusion, report.crossValidatedConfusion!.matrix, 'cross-validated confusion');
  }
}

