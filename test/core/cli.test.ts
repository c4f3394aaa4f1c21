import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { UsageError } from '../../src/cli/args';
import { describeFailure } from '../../src/cli/main';
import { DataError } from '../../src/core/errors';
import type { FitReport } from '../../src/core/types';
import { buildCli, REPOSITORY_ROOT, runCli, type CliRun } from './cliProcess';
import { pumpTable, toCsv, writeTemporary } from './generatedTables';

const root = REPOSITORY_ROOT;

function run(...args: string[]): CliRun {
  return runCli(args, { cwd: root, timeout: 60000 });
}

function sha256(path: string): string {
  return createHash('sha256').update(readFileSync(path)).digest('hex');
}

describe('scatterwise CLI (the real dist/cli.js in a child process)', function () {
  // Each case starts Node a few times; generous for a shared, busy machine.
  this.timeout(120000);

  before(() => {
    buildCli();
  });

  it('--help, help fit and --version exit 0', () => {
    const help = run('--help');
    assert.equal(help.status, 0);
    assert.match(help.stdout, /fit/);
    const fitHelp = run('help', 'fit');
    assert.equal(fitHelp.status, 0);
    for (const option of ['--label', '--features', '--exclude', '--solver', '--priors', '--cv', '--seed', '--missing', '--pca', '--delimiter', '--no-header', '--format', '--out', '--scores']) {
      assert.ok(fitHelp.stdout.includes(option), option);
    }
    assert.match(fitHelp.stdout, /auto\|exact\|shrinkage/);
    const version = run('--version');
    assert.equal(version.status, 0);
    assert.equal(version.stdout.trim(), JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')).version);
  });

  it('fit --format json writes a consistent FitReport and leaves the data file unchanged', () => {
    const data = writeTemporary('pumps.csv', toCsv(pumpTable()));
    const before = { hash: sha256(data), mtime: statSync(data).mtimeMs };
    const result = run('fit', data, '--format', 'json');
    assert.equal(result.status, 0, result.stderr);
    const report = JSON.parse(result.stdout) as FitReport;
    for (const key of ['version', 'source', 'options', 'label', 'rows', 'classes', 'features', 'removedFeatures', 'solver', 'shrinkage', 'conditionNumber', 'discriminant', 'tests', 'univariate', 'centroidDistances', 'accuracy', 'confusion', 'crossValidatedConfusion', 'perClass', 'misclassified', 'misclassifiedTotal', 'pca', 'findings', 'sample', 'timing', 'provisional']) {
      assert.ok(key in report, key);
    }
    assert.equal(report.rows.used + report.rows.dropped, report.rows.total);
    assert.equal(report.confusion.matrix.flat().reduce((a, b) => a + b, 0), report.rows.used);
    assert.ok(Math.abs(report.discriminant.explainedRatio.reduce((a, b) => a + b, 0) - 1) < 1e-12);
    assert.deepEqual({ hash: sha256(data), mtime: statSync(data).mtimeMs }, before);
  });

  it('fit --format text and markdown start with the verdict; --out writes the file', () => {
    const data = writeTemporary('pumps.csv', toCsv(pumpTable()));
    const text = run('fit', data);
    assert.equal(text.status, 0, text.stderr);
    assert.match(text.stdout.split('\n')[2]!, /discriminant.*Cross-validated accuracy/);
    const out = join(dirname(data), 'report.md');
    const markdown = run('fit', data, '--format', 'markdown', '--out', out);
    assert.equal(markdown.status, 0, markdown.stderr);
    assert.equal(markdown.stdout, '');
    const written = readFileSync(out, 'utf8');
    assert.match(written, /^## Separability/);
    assert.match(written, /### Cautions/);
    assert.deepEqual(readdirSync(dirname(data)).sort(), ['pumps.csv', 'report.md'], 'no temporary file left behind');
  });

  it('--scores writes one line per data row, empty for dropped rows', () => {
    const table = pumpTable();
    table.rows[4]![2] = 'NA';
    table.rows[9]![3] = 'oops';
    const data = writeTemporary('pumps.csv', toCsv(table));
    const scores = join(dirname(data), 'scores.csv');
    const result = run('fit', data, '--format', 'json', '--scores', scores);
    assert.equal(result.status, 0, result.stderr);
    const report = JSON.parse(result.stdout) as FitReport;
    const lines = readFileSync(scores, 'utf8').split('\n');
    assert.equal(lines.pop(), '', 'ends with a newline');
    assert.equal(lines[0], 'LD1,LD2');
    assert.equal(lines.length - 1, report.rows.total);
    assert.equal(lines[1 + 4], ',');
    assert.equal(lines[1 + 9], ',');
    assert.equal(lines.filter((l) => l === ',').length, 2);
    assert.ok(lines.slice(1).every((l) => l === ',' || l.split(',').every((v) => Number.isFinite(Number(v)))));
  });

  it('--no-header names the columns column_1, column_2, … and --delimiter takes a name', () => {
    const rows = pumpTable().rows.map((r) => r.slice(1).join(';'));
    const data = writeTemporary('pumps.txt', `${rows.join('\n')}\n`);
    const result = run('fit', data, '--no-header', '--delimiter', 'semicolon', '--label', 'column_5', '--format', 'json');
    assert.equal(result.status, 0, result.stderr);
    const report = JSON.parse(result.stdout) as FitReport;
    assert.deepEqual(report.features, ['column_1', 'column_2', 'column_3', 'column_4']);
    assert.equal(report.rows.total, 120);
    assert.equal(report.source.delimiter, ';');
  });

  it('fit, moments and script take their options from the project config for the file, the command line on top, none with --no-config', () => {
    const data = writeTemporary('pumps.csv', toCsv(pumpTable()));
    const folder = dirname(data);
    writeFileSync(join(folder, 'scatterwise.config.json'), JSON.stringify({ datasets: [{ files: ['*.csv'], label: 'fault', exclude: ['pump_id', 'feature_2'], cv: 'loo' }] }));
    const inFolder = (...args: string[]): FitReport => {
      const result = runCli(['fit', 'pumps.csv', '--format', 'json', ...args], { cwd: folder, timeout: 60000 });
      assert.equal(result.status, 0, result.stderr);
      return JSON.parse(result.stdout) as FitReport;
    };
    const configured = inFolder();
    assert.deepEqual(configured.features, ['feature_1', 'feature_3', 'feature_4']);
    assert.equal(configured.options.cv, 'loo');
    assert.deepEqual(inFolder('--exclude', 'pump_id').features, ['feature_1', 'feature_2', 'feature_3', 'feature_4'], 'the command line replaces the config\'s exclusions');
    assert.deepEqual(inFolder('--no-config').features, ['feature_1', 'feature_2', 'feature_3', 'feature_4']);
    const given = run('fit', data, '--format', 'json', '--config', join(folder, 'scatterwise.config.json'));
    assert.equal(given.status, 0, given.stderr);
    assert.deepEqual((JSON.parse(given.stdout) as FitReport).features, configured.features, '--config from another folder');
    // The other commands that read one data file take the same options.
    const moments = runCli(['moments', 'pumps.csv'], { cwd: folder, timeout: 60000 });
    assert.equal(moments.status, 0, moments.stderr);
    assert.deepEqual((JSON.parse(moments.stdout) as { features: string[] }).features, configured.features);
    const script = runCli(['script', 'pumps.csv', '--lang', 'python'], { cwd: folder, timeout: 60000 });
    assert.equal(script.status, 0, script.stderr);
    assert.match(script.stdout, /'feature_1', 'feature_3', 'feature_4'/);
    assert.doesNotMatch(script.stdout, /'feature_2'/);
  });

  it('refuses an output that is the data file, also through a link', () => {
    const data = writeTemporary('pumps.csv', toCsv(pumpTable()));
    const before = sha256(data);
    const link = join(dirname(data), 'alias.csv');
    symlinkSync(data, link);
    for (const args of [['--out', data], ['--scores', data], ['--scores', link]]) {
      const result = run('fit', data, ...args);
      assert.equal(result.status, 2);
      assert.match(result.stderr, /never writes to a data file/);
    }
    assert.equal(sha256(data), before);
    const intoFolder = run('fit', data, '--out', dirname(data));
    assert.equal(intoFolder.status, 2, intoFolder.stderr);
    assert.match(intoFolder.stderr, /cannot be written/);
    assert.deepEqual(readdirSync(dirname(data)).sort(), ['alias.csv', 'pumps.csv'], 'no temporary file left behind');
  });

  it('exits 2 with a message naming the file, line and column for bad input, never a stack trace', () => {
    const oneClass = writeTemporary('one.csv', 'pump_id,feature_1,fault\na,1,healthy\nb,2,healthy\nc,4,healthy\n');
    const result = run('fit', oneClass);
    assert.equal(result.status, 2);
    assert.match(result.stderr, /one\.csv.*single class/);
    assert.doesNotMatch(result.stderr, /\n\s+at /, 'no stack trace');

    const empty = writeTemporary('empty.csv', '');
    const emptyRun = run('fit', empty);
    assert.equal(emptyRun.status, 2);
    assert.match(emptyRun.stderr, /empty\.csv/);

    const unknown = run('fit', writeTemporary('pumps.csv', toCsv(pumpTable())), '--label', 'faults');
    assert.equal(unknown.status, 2);
    assert.match(unknown.stderr, /no column 'faults'.*'pump_id', 'feature_1'/);

    const ragged = writeTemporary('ragged.csv', 'feature_1,feature_2,fault\n1,2,a\n3,4,b\n5,6\n7,8,a\n');
    const raggedRun = run('fit', ragged);
    assert.equal(raggedRun.status, 2);
    assert.match(raggedRun.stderr, /ragged\.csv.*line 4/);

    const missing = run('fit', join(root, 'no-such-file.csv'));
    assert.equal(missing.status, 2);
    assert.match(missing.stderr, /no-such-file\.csv: no such file/);
  });

  it('exits 2 on bad usage with a pointer to the help', () => {
    for (const args of [['fit'], ['fit', 'a.csv', '--solver', 'magic'], ['fit', 'a.csv', '--cv', 'kfold:1'], ['fit', 'a.csv', '--colour'], ['frobnicate'], []]) {
      const result = run(...args);
      assert.equal(result.status, 2, args.join(' '));
      assert.ok(result.stderr.length > 0);
      assert.doesNotMatch(result.stderr, /\n\s+at /);
    }
    assert.match(run('fit', 'a.csv', '--solver', 'magic').stderr, /one of auto, exact, shrinkage/);
    assert.ok(!existsSync(join(root, 'a.csv')));
  });

  it('turns what a command throws into one message and an exit code', () => {
    const data = describeFailure(new DataError('one-class', 'pumps.csv: a single class.', { file: 'pumps.csv' }, 'Check the label.'));
    assert.deepEqual(data, { text: 'scatterwise: pumps.csv: a single class.\n  Check the label.\n', code: 2 });
    assert.equal(describeFailure(new UsageError('bad', 'fit')).code, 2);
    const bug = describeFailure(new TypeError('x is undefined\n    at somewhere'));
    assert.equal(bug.code, 1);
    assert.match(bug.text, /^scatterwise: unexpected error: TypeError: x is undefined\n.*please report/);
    assert.doesNotMatch(bug.text, /at somewhere/);
  });
});
