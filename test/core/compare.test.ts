/**
 * `scatterwise compare` end to end: the real dist/cli.js in a child process, on a real git
 * repository with several commits of the sample table (a leaking column added, a class relabelled,
 * rows removed). Checks the deltas against the fits of each version and against class counts read
 * here from the committed text, the words of each notable change, and the exit code of each gate.
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import * as path from 'node:path';
import type { FitReport } from '../../src/core/types';
import { buildCli, REPOSITORY_ROOT, runCli, type CliRun } from './cliProcess';
import { buildCaseRepository, classCounts, DATA_FILE, git, type CaseRepository } from './compareRepository';

const root = REPOSITORY_ROOT;

interface ComparisonJson {
  passed: boolean;
  files: {
    status: string;
    base?: { name: string; commit?: string };
    head?: { name: string };
    changes: { topic: string; text: string }[];
    gates: { passed: boolean; defaults: boolean; outcomes: { rule: string; passed: boolean; detail: string }[] };
    deltas?: any;
  }[];
}

describe('scatterwise compare on a real git repository', function () {
  this.timeout(120_000);
  let repository: CaseRepository;
  const fits = new Map<string, FitReport>();

  function run(args: readonly string[], cwd = repository.folder): CliRun {
    return runCli(args, { cwd, timeout: 90_000 });
  }

  function compareJson(args: readonly string[], expectedStatus: number): ComparisonJson {
    const result = run(['compare', ...args, '--format', 'json']);
    assert.equal(result.status, expectedStatus, `exit ${result.status}\n${result.stderr}\n${result.stdout.slice(0, 2000)}`);
    return JSON.parse(result.stdout) as ComparisonJson;
  }

  /** The fit of one tagged version, by `fit --format json` on the file as committed at that tag. */
  function fitOf(tag: string): FitReport {
    const known = fits.get(tag);
    if (known) return known;
    const file = path.join(repository.folder, `.fit-${tag}.csv`);
    writeFileSync(file, git(repository.folder, ['show', `${tag}:${DATA_FILE}`]));
    const result = run(['fit', file, '--label', 'fault', '--exclude', 'pump_id', '--format', 'json']);
    assert.equal(result.status, 0, result.stderr);
    const report = JSON.parse(result.stdout) as FitReport;
    fits.set(tag, report);
    return report;
  }

  before(() => {
    buildCli();
    repository = buildCaseRepository();
  });

  after(() => repository?.remove());

  it('a leaking column: columns added, accuracy up with the column named as the reason, a new possible-leakage finding', () => {
    const result = compareJson(['base:data/pump-faults.csv', 'leak:data/pump-faults.csv', '--no-config', '--label', 'fault', '--exclude', 'pump_id'], 0);
    const file = result.files[0]!;
    const base = fitOf('base');
    const head = fitOf('leak');
    assert.equal(file.status, 'compared');
    assert.equal(file.base!.commit, git(repository.folder, ['rev-parse', 'base^{commit}']).trim());
    assert.deepEqual(file.deltas.features.added, ['repair_ticket']);
    assert.deepEqual(file.deltas.columns.added, ['repair_ticket']);
    assert.deepEqual(file.deltas.features.removed, []);
    // Deltas equal the difference of the two versions' own fits.
    assert.equal(file.deltas.accuracy.crossValidated.base, base.accuracy.crossValidated!.value);
    assert.equal(file.deltas.accuracy.crossValidated.head, head.accuracy.crossValidated!.value);
    assert.equal(file.deltas.accuracy.crossValidated.delta, head.accuracy.crossValidated!.value - base.accuracy.crossValidated!.value);
    file.deltas.discriminants.forEach((d: any, j: number) => {
      assert.equal(d.eigenvalue.base, base.discriminant.eigenvalues[j] ?? null);
      assert.equal(d.eigenvalue.head, head.discriminant.eigenvalues[j] ?? null);
      assert.equal(d.explainedRatio.head, head.discriminant.explainedRatio[j] ?? null);
    });
    assert.ok(head.accuracy.crossValidated!.value > base.accuracy.crossValidated!.value + 0.05, 'the leaking column must lift the accuracy');
    const leak = file.deltas.findings.added.find((f: any) => f.code === 'possible-leakage');
    assert.ok(leak, 'a new possible-leakage finding');
    assert.deepEqual(leak.columns, ['repair_ticket']);
    const accuracy = file.changes.find((c) => c.topic === 'accuracy');
    assert.ok(accuracy, JSON.stringify(file.changes, null, 1));
    assert.match(accuracy.text, /^Cross-validated accuracy rose from \d+\.\d% to \d+\.\d%.*the new column 'repair_ticket' alone separates the classes almost perfectly \(possible leakage/);
    // Leakage is a warning: the default gates (class-lost, new error finding) pass …
    assert.ok(file.gates.defaults);
    assert.deepEqual(file.gates.outcomes.map((o) => [o.rule, o.passed]), [['new-finding=error', true], ['class-lost', true]]);
    // … and a rule at warning fails, naming the finding.
    const strict = compareJson(['base:data/pump-faults.csv', 'leak:data/pump-faults.csv', '--no-config', '--label', 'fault', '--fail-on', 'new-finding=warning'], 1);
    const failed = strict.files[0]!.gates.outcomes.find((o) => !o.passed)!;
    assert.equal(failed.rule, 'new-finding=warning');
    assert.match(failed.detail, /warning possible-leakage \(repair_ticket\)/);
  });

  it('a relabelled class: lost and gained with the same rows, called a probable relabelling, and the default gate fails', () => {
    const text = run(['compare', 'base:data/pump-faults.csv', 'relabel:data/pump-faults.csv', '--no-config', '--label', 'fault']);
    assert.equal(text.status, 1, text.stderr);
    assert.match(text.stdout, /gates FAIL/);
    assert.match(text.stdout, /FAIL {2}class-lost: 'cavitation' \(300 rows in the base\) has no rows now/);
    const result = compareJson(['base:data/pump-faults.csv', 'relabel:data/pump-faults.csv', '--no-config', '--label', 'fault'], 1);
    const file = result.files[0]!;
    // Class counts read here from the committed text.
    const before = classCounts(repository.versions.base);
    const after = classCounts(repository.versions.relabel);
    assert.deepEqual(file.deltas.classes.lost, [{ label: 'cavitation', base: before.get('cavitation'), head: 0 }]);
    assert.deepEqual(file.deltas.classes.gained, [{ label: 'suction-cavitation', base: 0, head: after.get('suction-cavitation') }]);
    assert.equal(file.changes[0]!.topic, 'class-lost');
    assert.match(file.changes[0]!.text, /'cavitation' was probably relabelled 'suction-cavitation'/);
    assert.equal(result.passed, false);
    // Explicit rules replace the defaults: only the minimum accuracy is checked, and it passes.
    const lenient = compareJson(['base:data/pump-faults.csv', 'relabel:data/pump-faults.csv', '--no-config', '--label', 'fault', '--fail-on', 'min-accuracy=0.5'], 0);
    assert.deepEqual(lenient.files[0]!.gates.outcomes.map((o) => o.rule), ['min-accuracy=0.5']);
  });

  it('rows removed: the row and class deltas match the committed text, and min-accuracy says by how much it missed', () => {
    const base = fitOf('base');
    const head = fitOf('rows-removed');
    const before = classCounts(repository.versions.base);
    const after = classCounts(repository.versions['rows-removed']);
    const totalBefore = [...before.values()].reduce((a, b) => a + b, 0);
    const totalAfter = [...after.values()].reduce((a, b) => a + b, 0);
    const result = compareJson(['base:data/pump-faults.csv', 'rows-removed:data/pump-faults.csv', '--no-config', '--label', 'fault', '--fail-on', 'min-accuracy=0.97'], 1);
    const file = result.files[0]!;
    assert.deepEqual(file.deltas.rows.total, { base: totalBefore, head: totalAfter, delta: totalAfter - totalBefore });
    for (const kept of file.deltas.classes.kept) assert.deepEqual(kept, { label: kept.label, base: before.get(kept.label), head: after.get(kept.label) });
    const rows = file.changes.find((c) => c.topic === 'rows')!;
    const removed = before.get('healthy')! - after.get('healthy')!;
    assert.equal(
      rows.text,
      `Rows used fell from ${totalBefore.toLocaleString('en-US')} to ${totalAfter.toLocaleString('en-US')} (−${removed}, −${((100 * removed) / totalBefore).toFixed(1)}%); by class: 'healthy' −${removed}.`,
    );
    const gate = file.gates.outcomes[0]!;
    const cv = head.accuracy.crossValidated!.value;
    assert.ok(cv < 0.97);
    assert.equal(gate.detail, `cross-validated accuracy ${(100 * cv).toFixed(1)}% is ${((0.97 - cv) * 100).toFixed(1)} points below the minimum 97.0%`);
    assert.notEqual(base.rows.used, head.rows.used);
    // An accuracy-drop gate measures base − head.
    const drop = compareJson(['base:data/pump-faults.csv', 'rows-removed:data/pump-faults.csv', '--no-config', '--label', 'fault', '--fail-on', 'accuracy-drop=0'], base.accuracy.crossValidated!.value > cv ? 1 : 0);
    assert.equal(drop.files[0]!.gates.outcomes[0]!.passed, !(base.accuracy.crossValidated!.value > cv));
  });

  it('the working tree against a ref (file path as head), and identical versions have nothing notable', () => {
    git(repository.folder, ['stash', 'push', '-q', '--include-untracked']);
    try {
      git(repository.folder, ['checkout', '-q', 'base']);
      const same = run(['compare', 'HEAD:data/pump-faults.csv', DATA_FILE, '--no-config', '--label', 'fault']);
      assert.equal(same.status, 0, same.stderr);
      assert.match(same.stdout, /nothing notable: the fits agree/);
    } finally {
      git(repository.folder, ['checkout', '-q', 'feature']);
      git(repository.folder, ['stash', 'pop', '-q']);
    }
  });

  it('--changed-since: the configured data files the branch touched, added and removed ones included', () => {
    const configHash = createHash('sha256').update(readFileSync(path.join(repository.folder, DATA_FILE))).digest('hex');
    const result = compareJson(['--changed-since', 'main'], 1);
    assert.deepEqual(
      result.files.map((f) => [f.status, f.head?.name ?? f.base?.name]),
      [
        ['added', 'data/new-pumps.csv'],
        ['compared', 'data/pump-faults.csv'],
        ['removed', 'main:data/seal-leak.csv'],
      ],
    );
    const [added, compared, removed] = result.files as [ComparisonJson['files'][0], ComparisonJson['files'][0], ComparisonJson['files'][0]];
    // The config's gates apply (min-accuracy 0.5 and class-lost); the removed table loses its classes.
    assert.deepEqual(compared.gates.outcomes.map((o) => [o.rule, o.passed]), [['min-accuracy=0.5', true], ['class-lost', true]]);
    assert.deepEqual(added.gates.outcomes.map((o) => o.rule), ['min-accuracy=0.5']);
    assert.deepEqual(removed.gates.outcomes.map((o) => [o.rule, o.passed]), [['class-lost', false]]);
    assert.match(removed.gates.outcomes[0]!.detail, /'leak' \(180 rows in the base\), 'no-leak' \(420 rows in the base\) have no rows now/);
    assert.deepEqual(compared.deltas.features.added, ['repair_ticket']);
    assert.equal(compared.base!.commit, git(repository.folder, ['merge-base', 'main', 'HEAD']).trim());
    // The Markdown for the pull request says which gate failed first.
    const markdown = run(['compare', '--changed-since', 'main', '--format', 'markdown']);
    assert.equal(markdown.status, 1);
    assert.match(markdown.stdout, /^## Scatterwise comparison\n\n\*\*Gates FAIL\*\* for 1 of 3 data files:\n\n- `main:data\/seal-leak.csv`: class-lost: /);
    // Nothing in the work tree was written.
    assert.equal(createHash('sha256').update(readFileSync(path.join(repository.folder, DATA_FILE))).digest('hex'), configHash);
    assert.equal(git(repository.folder, ['status', '--porcelain']).split('\n').filter((l) => l.includes('.partial')).length, 0);
  });

  it('exits 2 for an unknown ref, a path absent at the ref, a bad rule, or one side only', () => {
    const unknown = run(['compare', 'no-such-branch:data/pump-faults.csv', DATA_FILE, '--no-config', '--label', 'fault']);
    assert.equal(unknown.status, 2);
    assert.match(unknown.stderr, /'no-such-branch' is not a branch, tag or commit in this repository/);
    const absent = run(['compare', 'base:data/missing.csv', DATA_FILE, '--no-config', '--label', 'fault']);
    assert.equal(absent.status, 2);
    assert.match(absent.stderr, /base:data\/missing\.csv: 'base' has no file data\/missing\.csv/);
    const badRule = run(['compare', 'base:data/pump-faults.csv', DATA_FILE, '--fail-on', 'min-accuracy=high']);
    assert.equal(badRule.status, 2);
    assert.match(badRule.stderr, /'min-accuracy=high' needs a fraction from 0 to 1 or a percentage/);
    const oneSide = run(['compare', DATA_FILE]);
    assert.equal(oneSide.status, 2);
    assert.match(oneSide.stderr, /compare needs two sides/);
    const optionRef = run(['compare', '--changed-since', '--output=x']);
    assert.equal(optionRef.status, 2);
    assert.match(optionRef.stderr, /'--output=x' is not a usable git ref: it starts with '-'/);
    const notRepository = run(['compare', 'HEAD:x.csv', 'x.csv'], root.startsWith('/') ? path.parse(root).root : root);
    assert.equal(notRepository.status, 2);
  });
});
