/**
 * The generated Python and R scripts, run by Debian's Python (pandas, scikit-learn) and R (MASS):
 * on the sample workspace's tables and on Iris they must pass `--check`, and the figures they print
 * must equal the core's to 1e-8 relative (eigenvalues, explained ratios, shrinkage, training and
 * cross-validated accuracy) and exactly (class counts, confusion matrices). A changed data file
 * must fail the check with a readable list of differences. Hostile column names and labels are in
 * scriptsHostile.test.ts.
 */
import * as assert from 'node:assert/strict';
import { copyFileSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { ExpectedFigures } from '../../src/core/scripts/plan';
import type { FitOptions } from '../../src/core/types';
import { fileSha256 } from '../../src/node/fileSha256';
import { repoPath } from './compare';
import { assertFiguresMatch, fitAndWriteScript, PYTHON, R, requireTool, runScript } from './scriptsSupport';

interface Case {
  name: string;
  file: string[];
  options: Partial<FitOptions>;
}

const CASES: Case[] = [
  { name: 'pump faults, defaults (exact, leave-one-out)', file: ['sample-workspace', 'data', 'pump-faults.csv'], options: {} },
  { name: 'pump faults TSV, kfold:5, uniform priors', file: ['sample-workspace', 'data', 'pump-faults.tsv'], options: { cv: 'kfold:5', priors: 'uniform', seed: 7 } },
  { name: 'seal leak, shrinkage, kfold:10', file: ['sample-workspace', 'data', 'seal-leak.csv'], options: { solver: 'shrinkage', cv: 'kfold:10' } },
  { name: 'seal leak, shrinkage, leave-one-out', file: ['sample-workspace', 'data', 'seal-leak.csv'], options: { solver: 'shrinkage', cv: 'loo' } },
  { name: 'planted defects, defaults', file: ['sample-workspace', 'data', 'pump-faults-defects.csv'], options: {} },
  { name: 'planted defects, drop-columns', file: ['sample-workspace', 'data', 'pump-faults-defects.csv'], options: { missing: 'drop-columns', cv: 'kfold:2' } },
  { name: 'iris, leave-one-out', file: ['test', 'fixtures', 'iris', 'iris.csv'], options: { label: 'species', cv: 'loo' } },
  { name: 'iris, kfold:10 seed 7, uniform priors', file: ['test', 'fixtures', 'iris', 'iris.csv'], options: { label: 'species', cv: 'kfold:10', seed: 7, priors: 'uniform' } },
];

for (const [tool, language] of [
  [PYTHON, 'python'],
  [R, 'r'],
] as const) {
  describe(`generated ${tool.name} scripts reproduce the fit`, function () {
    this.timeout(600_000);
    let folder: string;
    beforeEach(() => {
      folder = mkdtempSync(join(tmpdir(), `scatterwise-${language}-`));
    });
    afterEach(() => rmSync(folder, { recursive: true, force: true }));

    for (const c of CASES) {
      it(`${c.name}: --check passes and the printed figures equal the core's`, async function () {
        requireTool(this, tool);
        const path = repoPath(...c.file);
        const before = await fileSha256(path);
        const { report, script } = await fitAndWriteScript(path, c.options, language, folder);
        const out = runScript(tool, script, ['--check'], folder);
        assert.equal(out.status, 0, `--check failed:\n${out.stderr}`);
        assert.match(out.stderr, /check passed/);
        assertFiguresMatch(JSON.parse(out.stdout) as ExpectedFigures, report);
        assert.equal(await fileSha256(path), before, 'the data file must not change');
      });
    }

    it('a file with a byte-order mark, and one without a header row, reproduce too', async function () {
      requireTool(this, tool);
      const iris = readFileSync(repoPath('test', 'fixtures', 'iris', 'iris.csv'));
      const withMark = join(folder, 'with mark.csv');
      writeFileSync(withMark, Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), iris]));
      const headerless = join(folder, 'headerless.csv');
      writeFileSync(headerless, iris.toString('utf8').split('\n').slice(1).join('\n'));
      for (const [path, options] of [
        [withMark, { label: 'species', cv: 'loo' }],
        [headerless, { label: 'column_5', cv: 'kfold:3', read: { header: false } }],
      ] as [string, Partial<FitOptions>][]) {
        const { report, script } = await fitAndWriteScript(path, options, language, folder);
        const out = runScript(tool, script, ['--check'], folder);
        assert.equal(out.status, 0, `${path}: --check failed:\n${out.stderr}`);
        assertFiguresMatch(JSON.parse(out.stdout) as ExpectedFigures, report);
      }
    });

    it('--check fails with a readable list of differences when the data changed', async function () {
      requireTool(this, tool);
      const path = repoPath('sample-workspace', 'data', 'seal-leak.csv');
      const { script } = await fitAndWriteScript(path, { cv: 'loo' }, language, folder);
      const changed = join(folder, 'seal-leak-changed.csv');
      copyFileSync(path, changed);
      const lines = readFileSync(changed, 'utf8').split('\n');
      // Swap the label of the third data row: every figure moves a little.
      lines[3] = lines[3]!.endsWith(',leak') ? lines[3]!.replace(/,leak$/, ',no-leak') : lines[3]!.replace(/,no-leak$/, ',leak');
      writeFileSync(changed, lines.join('\n'));
      const out = runScript(tool, script, ['--check', '--data', changed], folder);
      assert.equal(out.status, 1, out.stderr);
      assert.match(out.stderr, /check failed/);
      assert.match(out.stderr, /SHA-256/);
      assert.match(out.stderr, /counts|eigenvalues/);
    });

    it('a Parquet source either reproduces or says which package reading it needs', async function () {
      requireTool(this, tool);
      const path = repoPath('sample-workspace', 'data', 'pump-faults.parquet');
      const { report, script } = await fitAndWriteScript(path, { cv: 'kfold:5' }, language, folder);
      const out = runScript(tool, script, ['--check'], folder);
      if (out.status === 0) assertFiguresMatch(JSON.parse(out.stdout) as ExpectedFigures, report);
      else {
        assert.equal(out.status, 2, out.stderr);
        assert.match(out.stderr, language === 'python' ? /needs pyarrow or fastparquet/ : /needs the arrow or nanoparquet package/);
      }
    });
  });
}
