/**
 * Re-runs the reference scripts with the Python and R installed on this machine, into a temporary
 * folder, and compares what they write with the stored fixtures: a change in Debian's numpy, scipy,
 * scikit-learn, R or MASS that moves a reference figure shows up here (and the stored fixtures, which
 * the engine suites read, are then regenerated on purpose, not by accident).
 *
 * When /usr/bin/python3 with scikit-learn or Rscript with MASS is missing: under CI (process.env.CI
 * set) the tests fail and name the Debian package `.ci/run` must install; elsewhere they are marked
 * pending with the same message.
 */
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { assertClose, loadReference, readReference, repoPath, type Reference } from './compare';

const PYTHON = '/usr/bin/python3';
const RSCRIPT = 'Rscript';

interface Tool {
  name: string;
  command: string;
  probe: string[];
  missing: string;
}

const python: Tool = {
  name: 'Python',
  command: PYTHON,
  probe: ['-c', 'import numpy, scipy, sklearn, pandas'],
  missing:
    '/usr/bin/python3 with numpy, scipy, scikit-learn and pandas is needed: .ci/run must install the Debian packages ' +
    'python3-sklearn python3-pandas python3-scipy python3-numpy',
};

const r: Tool = {
  name: 'R',
  command: RSCRIPT,
  probe: ['-e', 'suppressPackageStartupMessages(library(MASS))'],
  missing: 'Rscript with the MASS package is needed: .ci/run must install the Debian packages r-base-core r-cran-mass',
};

function available(tool: Tool): boolean {
  const run = spawnSync(tool.command, tool.probe, { encoding: 'utf8', timeout: 60_000 });
  return run.status === 0;
}

/** Fail under CI, else mark the test pending, when the tool is missing. */
function requireTool(context: Mocha.Context, tool: Tool): void {
  if (available(tool)) return;
  if (process.env.CI) assert.fail(tool.missing);
  // Mocha shows a pending test's title only: carry the reason in it.
  if (context.test) context.test.title += ` — pending: ${tool.missing}`;
  context.skip();
}

function run(tool: Tool, script: string, args: string[]): void {
  const result = spawnSync(tool.command, [repoPath('test', 'reference', 'scripts', script), ...args], {
    cwd: repoRoot(),
    encoding: 'utf8',
    timeout: 300_000,
  });
  assert.equal(result.status, 0, `${tool.name} ${script} exited with ${result.status}: ${result.stderr}`);
}

function repoRoot(): string {
  return repoPath();
}

const probabilityKeys = new Set(['p', 'pF']);

/** Walks a regenerated reference and the stored one together: sources and texts equal, numbers by the tolerance rule. */
function compareReferences(fresh: unknown, stored: unknown, path: string): void {
  if (typeof stored === 'number') {
    assert.equal(typeof fresh, 'number', `${path}: regenerated is not a number`);
    const key = path.slice(path.lastIndexOf('.') + 1);
    assertClose(fresh, stored, `${path} (regenerated vs stored)`, { relativeOnly: probabilityKeys.has(key) });
    return;
  }
  if (Array.isArray(stored)) {
    assert.ok(Array.isArray(fresh), `${path}: regenerated is not an array`);
    assert.equal(fresh.length, stored.length, `${path}: regenerated has ${fresh.length} entries, stored ${stored.length}`);
    const numeric = stored.every((v) => typeof v === 'number' || (Array.isArray(v) && v.every((w) => typeof w === 'number')));
    if (numeric && stored.length > 0) {
      assertClose(fresh, stored as number[] | number[][], `${path} (regenerated vs stored)`);
      return;
    }
    stored.forEach((v, i) => compareReferences(fresh[i], v, `${path}[${i}]`));
    return;
  }
  if (stored !== null && typeof stored === 'object') {
    assert.ok(fresh !== null && typeof fresh === 'object', `${path}: regenerated is not an object`);
    const f = fresh as Record<string, unknown>;
    const s = stored as Record<string, unknown>;
    assert.deepEqual(Object.keys(f).sort(), Object.keys(s).sort(), `${path}: regenerated and stored figures differ in their keys`);
    for (const key of Object.keys(s)) {
      if (key === 'versions') continue; // library versions may move; the figures must not
      compareReferences(f[key], s[key], path ? `${path}.${key}` : key);
    }
    return;
  }
  assert.equal(fresh, stored, `${path}: regenerated ${JSON.stringify(fresh)}, stored ${JSON.stringify(stored)}`);
}

function versionsNote(fresh: Reference, stored: Reference): string {
  return `stored ${JSON.stringify(stored.versions)}, this machine ${JSON.stringify(fresh.versions)}`;
}

describe('reference scripts re-run on this machine (live)', function () {
  this.timeout(600_000);
  let out: string;

  before(function () {
    out = mkdtempSync(join(tmpdir(), 'scatterwise-reference-'));
  });
  after(function () {
    if (out) rmSync(out, { recursive: true, force: true });
  });

  it('make_iris_csv.py rewrites the Iris and Wine CSVs byte for byte', function () {
    requireTool(this, python);
    run(python, 'make_iris_csv.py', [out]);
    for (const file of ['iris/iris.csv', 'wine/wine.csv', 'wine/wine-ash-scaled.csv']) {
      const fresh = readFileSync(join(out, 'test', 'fixtures', file));
      const stored = readFileSync(repoPath('test', 'fixtures', file));
      assert.ok(fresh.equals(stored), `test/fixtures/${file} differs from what make_iris_csv.py writes from Debian's scikit-learn`);
    }
  });

  for (const dataset of ['iris', 'wine']) {
    it(`${dataset}_reference.py reproduces fixtures/${dataset}.python.json`, function () {
      requireTool(this, python);
      run(python, `${dataset}_reference.py`, [out]);
      const fresh = readReference(join(out, `${dataset}.python.json`));
      const stored = loadReference(`${dataset}.python`);
      try {
        compareReferences(fresh, stored, '');
      } catch (error) {
        throw new Error(`${(error as Error).message}\n(library versions: ${versionsNote(fresh, stored)})`);
      }
    });

    it(`${dataset}_reference.R reproduces fixtures/${dataset}.r.json`, function () {
      requireTool(this, r);
      run(r, `${dataset}_reference.R`, [out]);
      const fresh = readReference(join(out, `${dataset}.r.json`));
      const stored = loadReference(`${dataset}.r`);
      try {
        compareReferences(fresh, stored, '');
      } catch (error) {
        throw new Error(`${(error as Error).message}\n(library versions: ${versionsNote(fresh, stored)})`);
      }
    });
  }
});
