/**
 * `scatterwise script`, `scatterwise moments` and `scatterwise fit --moments` through the real CLI
 * bundle in a child process: the scripts carry the file's SHA-256 and the fit's figures, outputs
 * never replace the data file, and moments of four shards merged by `fit --moments` give the
 * figures of `fit` on the whole file. (The scripts themselves run in test/reference/scripts*.)
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FitReport } from '../../src/core/types';
import { buildCli, REPOSITORY_ROOT, runCli } from './cliProcess';

const root = REPOSITORY_ROOT;
const data = join(root, 'sample-workspace', 'data', 'pump-faults.csv');

const sha256 = (path: string) => createHash('sha256').update(readFileSync(path)).digest('hex');

describe('scatterwise script, moments and fit --moments (the real CLI bundle)', function () {
  this.timeout(120_000);
  let folder: string;
  let cli: string;
  const run = (...args: string[]) => runCli(args, { cli, cwd: folder, timeout: 60_000 });

  before(() => {
    folder = mkdtempSync(join(tmpdir(), 'scatterwise-cli-scripts-'));
    cli = buildCli(folder);
  });
  after(() => rmSync(folder, { recursive: true, force: true }));

  it('script --lang python writes a script carrying the SHA-256, the options and the fit\'s figures', () => {
    const before = sha256(data);
    const out = run('script', data, '--lang', 'python', '--cv', 'kfold:5', '--seed', '3');
    assert.equal(out.status, 0, out.stderr);
    assert.match(out.stdout, /^#!\/usr\/bin\/env python3\n/);
    assert.ok(out.stdout.includes(`DATA_SHA256 = '${before}'`));
    assert.match(out.stdout, /CROSS_VALIDATION = \{\n\s+'method': 'kfold',\n\s+'folds': 5,\n\s+'seed': 3,/);
    const fit = run('fit', data, '--format', 'json', '--cv', 'kfold:5', '--seed', '3');
    const report = JSON.parse(fit.stdout) as FitReport;
    assert.ok(out.stdout.includes(`'eigenvalues': [${report.discriminant.eigenvalues.map(String).join(', ')}]`), 'the expected eigenvalues are the fit\'s');
    assert.equal(sha256(data), before, 'the data file is only read');
  });

  it('script --lang r --out writes the file, and refuses to write over the data file', () => {
    const target = join(folder, 'fit.R');
    const out = run('script', data, '--lang', 'r', '--out', target);
    assert.equal(out.status, 0, out.stderr);
    assert.match(readFileSync(target, 'utf8'), /^#!\/usr\/bin\/env Rscript\n/);
    const before = sha256(data);
    const refused = run('script', data, '--lang', 'r', '--out', data);
    assert.equal(refused.status, 2);
    assert.match(refused.stderr, /never writes to a data file/);
    assert.equal(sha256(data), before);
  });

  it('script --lang sql quotes for the chosen dialect; SQL options are refused for other languages', () => {
    const spark = run('script', data, '--lang', 'sql', '--dialect', 'spark', '--table', 'pump `faults`');
    assert.equal(spark.status, 0, spark.stderr);
    assert.match(spark.stdout, /FROM `pump ``faults```/);
    assert.match(spark.stdout, /CAST\(`rms_velocity_mm_s` AS DOUBLE\)/);
    const postgres = run('script', data, '--lang', 'sql', '--dialect', 'postgres');
    assert.match(postgres.stdout, /FROM "pump-faults"/);
    assert.match(postgres.stdout, /AS "cross_9_9"/);
    const wrong = run('script', data, '--lang', 'python', '--dialect', 'duckdb');
    assert.equal(wrong.status, 2);
    assert.match(wrong.stderr, /--dialect applies to --lang sql only/);
    const missing = run('script', data);
    assert.equal(missing.status, 2);
    assert.match(missing.stderr, /--lang/);
  });

  it('moments of four shards, merged by fit --moments, give the figures of fit on the whole file', () => {
    const [header, ...rows] = readFileSync(data, 'utf8').trimEnd().split('\n');
    const quarter = Math.ceil(rows.length / 4);
    const parts = [0, 1, 2, 3].map((i) => {
      const shard = join(folder, `shard-${i}.csv`);
      writeFileSync(shard, [header, ...rows.slice(i * quarter, (i + 1) * quarter)].join('\n') + '\n');
      const part = join(folder, `part-${i}.json`);
      const out = run('moments', shard, '--out', part);
      assert.equal(out.status, 0, out.stderr);
      return part;
    });
    const merged = run('fit', '--moments', ...parts, '--format', 'json');
    assert.equal(merged.status, 0, merged.stderr);
    const fromMoments = JSON.parse(merged.stdout) as FitReport & { accuracy: { training: number | null } };
    const whole = JSON.parse(run('fit', data, '--format', 'json').stdout) as FitReport;
    assert.equal(fromMoments.label, 'fault');
    assert.deepEqual(fromMoments.classes.map((c) => c.count), whole.classes.map((c) => c.count));
    const close = (a: number[], b: number[], what: string) =>
      a.forEach((v, i) => assert.ok(Math.abs(v - b[i]!) <= 1e-9 * Math.max(Math.abs(b[i]!), 1e-6 * Math.max(...b.map(Math.abs))), `${what}[${i}]: ${v} vs ${b[i]}`));
    close(fromMoments.discriminant.eigenvalues, whole.discriminant.eigenvalues, 'eigenvalues');
    close(fromMoments.pca.explainedRatio, whole.pca.explainedRatio, 'PCA explained ratio');
    close([fromMoments.tests.wilks.statistic, fromMoments.tests.wilks.F], [whole.tests.wilks.statistic, whole.tests.wilks.F], 'Wilks');
    assert.equal(fromMoments.accuracy.training, null);
    assert.equal(fromMoments.confusion, null);
    assert.ok(fromMoments.findings.some((f) => f.code === 'rows-not-available'));
    for (const format of ['text', 'markdown']) {
      const text = run('fit', '--moments', ...parts, '--format', format);
      assert.equal(text.status, 0, text.stderr);
      assert.match(text.stdout, /per-class moments/);
      assert.match(text.stdout, /Accuracy:? +not available/);
      assert.doesNotMatch(text.stdout, /NaN/);
      assert.ok(text.stdout.includes(whole.discriminant.eigenvalues[0]!.toPrecision(4)), 'the first eigenvalue is shown');
    }
  });

  it('fit --moments refuses --scores and names a bad moments file', () => {
    const part = join(folder, 'part.json');
    assert.equal(run('moments', data, '--out', part).status, 0);
    const scores = run('fit', '--moments', part, '--scores', join(folder, 's.csv'));
    assert.equal(scores.status, 2);
    assert.match(scores.stderr, /--scores needs the rows/);
    const bad = join(folder, 'bad.json');
    writeFileSync(bad, readFileSync(part, 'utf8').replace('"count":', '"count": -'));
    const failed = run('fit', '--moments', bad);
    assert.equal(failed.status, 2);
    assert.match(failed.stderr, /bad\.json/);
  });
});
