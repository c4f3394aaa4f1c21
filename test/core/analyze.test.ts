import { strict as assert } from 'node:assert';
import { EigenvalueDecomposition, Matrix, inverse } from 'ml-matrix';
import { analyze, PROVISIONAL_ROWS_MAX } from '../../src/core/analyze';
import { CancelledError, DataError } from '../../src/core/errors';
import { verdict } from '../../src/core/format/verdict';
import type { FitOptions, FitReport } from '../../src/core/types';
import { addColumn, FAULTS, normal, numericColumn, pumpTable, sourceOf, toCsv, uniform } from './generatedTables';
import type { Table } from './generatedTables';

async function fit(table: Table | string, options: Partial<FitOptions> = {}): Promise<FitReport> {
  const text = typeof table === 'string' ? table : toCsv(table);
  return (await analyze(sourceOf(text), options)).report;
}

async function dataError(promise: Promise<unknown>): Promise<DataError> {
  try {
    await promise;
  } catch (error) {
    assert.ok(error instanceof DataError, `expected a DataError, got ${String(error)}`);
    return error;
  }
  assert.fail('expected a DataError');
}

function codes(report: FitReport): string[] {
  return report.findings.map((f) => f.code);
}

function sum(values: readonly number[]): number {
  return values.reduce((a, b) => a + b, 0);
}

/**
 * Eigenvalues of S_W⁻¹ S_B computed straight from the rows with ml-matrix's general eigensolver:
 * an independent route from the pipeline's streaming moments and whitened small problem.
 */
function eigenvaluesFromRows(rows: number[][], labels: string[]): number[] {
  const d = rows[0]!.length;
  const classes = [...new Set(labels)];
  const mean = (rs: number[][]): number[] => Array.from({ length: d }, (_, j) => sum(rs.map((r) => r[j]!)) / rs.length);
  const overall = mean(rows);
  const within = Matrix.zeros(d, d);
  const between = Matrix.zeros(d, d);
  for (const c of classes) {
    const members = rows.filter((_, i) => labels[i] === c);
    const m = mean(members);
    for (const r of members) {
      const z = Matrix.columnVector(r.map((v, j) => v - m[j]!));
      within.add(z.mmul(z.transpose()));
    }
    const b = Matrix.columnVector(m.map((v, j) => v - overall[j]!));
    between.add(b.mmul(b.transpose()).mul(members.length));
  }
  const values = new EigenvalueDecomposition(inverse(within).mmul(between)).realEigenvalues;
  return values.sort((a, b) => b - a).slice(0, Math.min(d, classes.length - 1));
}

describe('analyze: the pipeline end to end', function () {
  this.timeout(20000);

  it('gives a consistent report on a clean three-class table', async () => {
    const table = pumpTable();
    const report = await fit(table);
    assert.equal(report.version, 1);
    assert.equal(report.label, 'fault');
    assert.deepEqual(report.classes.map((c) => c.label), [...FAULTS]);
    assert.deepEqual(report.classes.map((c) => c.count), [40, 30, 50]);
    assert.deepEqual(report.features, ['feature_1', 'feature_2', 'feature_3', 'feature_4']);
    assert.equal(report.rows.total, 120);
    assert.equal(report.rows.used + report.rows.dropped, report.rows.total);
    assert.equal(report.rows.dropped, report.rows.droppedMissing + report.rows.droppedNonFinite + report.rows.droppedRagged);
    assert.ok(Math.abs(sum(report.discriminant.explainedRatio) - 1) < 1e-12);
    assert.ok(Math.abs(sum(report.pca.explainedRatio) - 1) < 1e-12);
    report.discriminant.eigenvalues.forEach((lambda, j) => {
      assert.ok(Math.abs(report.discriminant.canonicalCorrelations[j]! - Math.sqrt(lambda / (1 + lambda))) < 1e-12);
    });
    assert.equal(sum(report.confusion.matrix.flat()), report.rows.used);
    assert.equal(sum(report.crossValidatedConfusion!.matrix.flat()), report.rows.used);
    report.confusion.matrix.forEach((row, c) => assert.equal(sum(row), report.classes[c]!.count));
    assert.equal(report.accuracy.crossValidated?.method, 'loo', 'auto picks leave-one-out on a small table');
    const cvCorrect = sum(report.crossValidatedConfusion!.matrix.map((row, i) => row[i]!));
    assert.equal(report.accuracy.crossValidated!.value, cvCorrect / report.rows.used);
    assert.equal(report.misclassifiedTotal, report.rows.used - cvCorrect);
    assert.equal(report.misclassified.length, Math.min(report.misclassifiedTotal, 100));
    for (const m of report.misclassified) {
      assert.notEqual(m.label, m.predicted);
      assert.equal(table.rows[m.row]![table.header.length - 1], m.label, 'row numbers point at the right data row');
      assert.equal(m.line, m.row + 2, 'line = row + 2 below a one-line header');
    }
    assert.equal(report.sample.total, 120);
    assert.equal(report.sample.rows.length, 120, 'all rows fit the default plot budget');
    assert.equal(report.sample.ld[0]!.length, 2);
    assert.equal(report.sample.topFeatures.names.length, 4);
    assert.deepEqual(report.findings.map((f) => f.code), ['non-numeric-column'], 'only the pump_id column is worth a note');
    assert.equal(report.provisional, false);
    assert.ok(report.timing.total >= report.timing.moments);
  });

  it('lists the misclassified rows in file order up to the limit, past the first size of the list, and none with a limit of 0', async () => {
    const table = pumpTable([800, 600, 1000]);
    const all = await fit(table, { misclassifiedLimit: 10_000 });
    assert.ok(all.misclassifiedTotal > 256, `${all.misclassifiedTotal} misclassified: enough to grow the list twice`);
    assert.equal(all.misclassified.length, all.misclassifiedTotal);
    all.misclassified.forEach((m, i) => {
      assert.notEqual(m.label, m.predicted);
      assert.equal(table.rows[m.row]![table.header.length - 1], m.label);
      assert.equal(m.line, m.row + 2);
      assert.ok(m.posterior > 0 && m.posterior <= 1, `posterior ${m.posterior}`);
      if (i > 0) assert.ok(m.row > all.misclassified[i - 1]!.row, 'file order');
    });
    const some = await fit(table, { misclassifiedLimit: 150 });
    assert.equal(some.misclassifiedTotal, all.misclassifiedTotal);
    assert.deepEqual(some.misclassified, all.misclassified.slice(0, 150));
    const none = await fit(table, { misclassifiedLimit: 0 });
    assert.equal(none.misclassifiedTotal, all.misclassifiedTotal);
    assert.deepEqual(none.misclassified, []);
  });

  it('matches eigenvalues computed from the used rows by an independent dense route', async () => {
    let table = pumpTable([60, 45, 70], 5, 21);
    table = { ...table, rows: table.rows.map((r, i) => (i % 17 === 3 ? r.map((v, j) => (j === 2 ? 'NA' : v)) : r)) };
    const report = await fit(table);
    const used = table.rows.filter((r) => !r.includes('NA'));
    const reference = eigenvaluesFromRows(
      used.map((r) => r.slice(1, -1).map(Number)),
      used.map((r) => r[r.length - 1]!),
    );
    assert.equal(report.rows.used, used.length);
    reference.forEach((lambda, j) => assert.ok(Math.abs(report.discriminant.eigenvalues[j]! - lambda) <= 1e-9 * reference[0]!, `λ${j + 1}`));
  });

  it('plants each defect and finds it by its code', async () => {
    let table = pumpTable([60, 45, 70], 4, 3);
    const a = numericColumn(table, 'feature_1');
    const b = numericColumn(table, 'feature_2');
    const jitter = uniform(5);
    const faultIndex = (row: string[]): number => FAULTS.indexOf(row[row.length - 1] as (typeof FAULTS)[number]);
    table = addColumn(table, 'site_constant', () => '5');
    table = addColumn(table, 'feature_1_copy', (_, i) => String(a[i]));
    table = addColumn(table, 'combined', (_, i) => String(2 * a[i]! - b[i]!));
    table = addColumn(table, 'work_order_code', (row) => String(100 * faultIndex(row) + Math.floor(10 * jitter())));
    table = addColumn(table, 'mostly_zero', (_, i) => (i === 7 ? '1' : '0'));
    table = { ...table, rows: [...table.rows, table.rows[10]!, table.rows[11]!] }; // duplicate rows
    table.rows[20]![2] = 'NA';
    table.rows[21]![3] = '';
    table.rows[22]![1] = 'abc';
    table.rows[23]![4] = 'Inf';
    const report = await fit(table);
    const found = codes(report);
    for (const code of ['constant-column', 'duplicate-column', 'dependent-columns', 'possible-leakage', 'missing-values', 'non-numeric-cells', 'infinite-values', 'duplicate-rows', 'non-numeric-column', 'near-constant-column']) {
      assert.ok(found.includes(code), `${code} in ${found.join(', ')}`);
    }
    const byCode = (code: string) => report.findings.find((f) => f.code === code)!;
    assert.deepEqual(byCode('constant-column').columns, ['site_constant']);
    assert.match(byCode('dependent-columns').message, /combined = 2·feature_1 − feature_2/);
    assert.deepEqual(byCode('possible-leakage').columns, ['work_order_code']);
    assert.match(byCode('non-numeric-cells').message, /line 24: 'abc'/);
    assert.deepEqual(byCode('near-constant-column').columns, ['mostly_zero']);
    assert.match(byCode('duplicate-rows').message, /2 rows repeat/);
    assert.equal(report.rows.droppedMissing, 3);
    assert.equal(report.rows.droppedNonFinite, 1);
    assert.equal(report.rows.total, 177);
    assert.deepEqual(
      report.removedFeatures.map((r) => r.reason).sort(),
      ['constant-column', 'dependent-columns', 'duplicate-column'],
    );
    const severities = report.findings.map((f) => ['error', 'warning', 'info'].indexOf(f.severity));
    assert.deepEqual(severities, [...severities].sort((x, y) => x - y), 'sorted by severity');
  });

  it('finds a column constant within classes, an ill-conditioned pair, skipped ragged rows and an empty column', async () => {
    let table = pumpTable([50, 40, 60], 3, 15);
    const a = numericColumn(table, 'feature_1');
    const tiny = normal(8);
    const faultIndex = (row: string[]): number => FAULTS.indexOf(row[row.length - 1] as (typeof FAULTS)[number]);
    table = addColumn(table, 'shift_code', (row) => String(7 * faultIndex(row)));
    table = addColumn(table, 'feature_1_rounded', (_, i) => String(a[i]! + 1e-4 * tiny()));
    table = addColumn(table, 'notes', () => '');
    const lines = toCsv(table).split('\n');
    lines.splice(5, 0, 'PU-x,1,2'); // a short row at line 6
    const report = await fit(lines.join('\n'), { solver: 'exact', read: { skipRaggedRows: true } });
    const found = codes(report);
    for (const code of ['constant-within-classes', 'ill-conditioned', 'empty-column', 'ragged-rows-skipped']) assert.ok(found.includes(code), `${code} in ${found.join(', ')}`);
    assert.deepEqual(report.findings.find((f) => f.code === 'constant-within-classes')!.columns, ['shift_code']);
    assert.ok(!found.includes('perfect-separation'), 'the solver warning on the same column is not repeated');
    assert.equal(report.rows.droppedRagged, 1);
    assert.equal(report.rows.total, 151);
    assert.equal(report.rows.used + report.rows.dropped, report.rows.total);
  });

  it('auto switches to shrinkage when there are few rows per feature, with exact tests when S_W is nonsingular', async () => {
    const table = pumpTable([6, 6, 6], 6, 19); // n − K = 15 < 3·6 within-class degrees of freedom
    const report = await fit(table);
    assert.equal(report.solver, 'shrinkage');
    assert.ok(codes(report).includes('shrinkage-used'));
    const exact = await fit(table, { solver: 'exact' });
    assert.deepEqual(report.tests.wilks, exact.tests.wilks, 'tests from the exact problem on the same features');
    assert.ok(!codes(report).includes('approximate-p-values'));
    // A duplicated column keeps S_W singular: shrinkage solves with it, the tests come from the shrunk problem.
    const copied = addColumn(table, 'feature_1_copy', (row) => row[1]!);
    const shrunk = await fit(copied, { solver: 'shrinkage' });
    assert.ok(codes(shrunk).includes('approximate-p-values'), codes(shrunk).join(', '));
    assert.ok(Number.isFinite(shrunk.tests.wilks.p));
    // More features than within-class degrees of freedom: the tests have no degrees of freedom.
    const wide = await fit(pumpTable([5, 5, 5], 14, 23));
    assert.equal(wide.solver, 'shrinkage');
    assert.equal(wide.features.length, 14);
    assert.ok(codes(wide).includes('tests-undefined'), codes(wide).join(', '));
    assert.ok(wide.discriminant.eigenvalues.every(Number.isFinite));
    assert.match(verdict(wide), /cannot be tested/);
  });

  it('reports tiny classes, imbalance, a skipped Box M and a skipped cross-validation', async () => {
    let table = pumpTable([200, 2, 12], 4, 9);
    table = { ...table, rows: [...table.rows, ['PU-9', '1', '2', '3', '4', 'seized']] };
    const report = await fit(table);
    const tiny = report.findings.filter((f) => f.code === 'tiny-class');
    assert.deepEqual(tiny.map((f) => f.severity), ['error', 'warning']);
    for (const code of ['class-imbalance', 'box-m-skipped', 'cv-skipped']) assert.ok(codes(report).includes(code), code);
    assert.equal(report.accuracy.crossValidated, null);
    assert.equal(report.crossValidatedConfusion, null);
    assert.equal(report.tests.boxM, null);
    assert.ok(report.perClass.every((p) => p.cvRecall === null));
  });

  it('k-fold cross-validation when asked, with a clear skip when a class is smaller than k', async () => {
    const report = await fit(pumpTable(), { cv: 'kfold:5', seed: 3 });
    assert.deepEqual(report.accuracy.crossValidated && { method: report.accuracy.crossValidated.method, folds: report.accuracy.crossValidated.folds }, { method: 'kfold:5', folds: 5 });
    assert.equal(sum(report.crossValidatedConfusion!.matrix.flat()), report.rows.used);
    const again = await fit(pumpTable(), { cv: 'kfold:5', seed: 3 });
    assert.deepEqual(again.crossValidatedConfusion, report.crossValidatedConfusion, 'same seed, same folds');
    const skipped = await fit(pumpTable([40, 30, 8]), { cv: 'kfold:10' });
    const f = skipped.findings.find((x) => x.code === 'cv-skipped');
    assert.match(f!.message, /class 'healthy' has 8/);
  });

  it('drop-columns drops the columns with missing cells instead of the rows', async () => {
    const table = pumpTable();
    table.rows[5]![2] = 'NA';
    table.rows[9]![2] = 'NA';
    const report = await fit(table, { missing: 'drop-columns' });
    assert.equal(report.rows.used, 120);
    assert.deepEqual(report.features, ['feature_1', 'feature_3', 'feature_4']);
    assert.deepEqual(report.removedFeatures, [{ feature: 'feature_2', reason: 'missing-values' }]);
    assert.match(report.findings.find((f) => f.code === 'missing-values')!.message, /'feature_2' 2; policy drop-columns/);
    const byRows = await fit(table);
    assert.equal(byRows.rows.used, 118);
    assert.equal(byRows.rows.droppedMissing, 2);
  });

  it('uses the shrinkage solver when asked and says so', async () => {
    const report = await fit(pumpTable(), { solver: 'shrinkage' });
    assert.equal(report.solver, 'shrinkage');
    assert.ok(report.shrinkage > 0 && report.shrinkage <= 1);
    assert.ok(codes(report).includes('shrinkage-used'));
    assert.ok(Math.abs(sum(report.discriminant.explainedRatio) - 1) < 1e-12);
  });

  it('flags a numeric label with fractional values as continuous', async () => {
    const draw = normal(4);
    const rows = Array.from({ length: 60 }, (_, i) => [String(draw()), String(draw() + (i % 3)), String((i % 3) + 0.5)]);
    const report = await fit(toCsv({ header: ['x1', 'x2', 'y'], rows }));
    assert.equal(report.label, 'y');
    assert.ok(codes(report).includes('continuous-label'));
  });

  it('raises DataErrors that name the file and the column', async () => {
    const header = 'pump_id,feature_1,feature_2,fault\n';
    assert.match((await dataError(fit(''))).message, /pumps\.csv/);
    const headerOnly = await dataError(fit(header));
    assert.match(headerOnly.message, /pumps\.csv/);
    const one = await dataError(fit(header + 'a,1,2,healthy\nb,2,3,healthy\nc,3,5,healthy\n'));
    assert.equal(one.code, 'one-class');
    assert.match(one.message, /pumps\.csv.*'fault'.*'healthy'/);
    const unknown = await dataError(fit(pumpTable(), { label: 'faults' }));
    assert.equal(unknown.code, 'unknown-column');
    assert.match(unknown.message, /'faults'.*'pump_id', 'feature_1'/);
    const missingLabel = await dataError(fit(header + 'a,1,2,NA\nb,2,3,\nc,3,5,NA\n', { label: 'fault' }));
    assert.equal(missingLabel.code, 'label-missing');
    const badOption = await dataError(fit(pumpTable(), { cv: 'kfold:1' as FitOptions['cv'] }));
    assert.match(badOption.hint ?? '', /kfold:N needs 2 ≤ N ≤ the smallest class count/);
  });

  it('draws the same plot sample on every run, within the budget, stratified', async () => {
    const table = pumpTable([300, 150, 50], 4, 13);
    const first = await fit(table, { plotBudget: 100, cv: 'none' });
    const second = await fit(table, { plotBudget: 100, cv: 'none' });
    assert.equal(first.sample.rows.length, 100);
    assert.deepEqual(second.sample, first.sample);
    const perClass = [0, 0, 0];
    for (const c of first.sample.classIndex) perClass[c]! += 1;
    assert.ok(perClass.every((n) => n >= 16), `every class keeps ⌊100/6⌋ points: ${perClass.join(', ')}`);
    first.sample.rows.forEach((row, i) => assert.equal(FAULTS[first.sample.classIndex[i]!], table.rows[row]![5]));
  });

  it('gives a provisional answer from the first bytes, and stops when cancelled', async () => {
    const text = toCsv(pumpTable([4000, 4000, 4000], 4, 17));
    const { report } = await analyze(sourceOf(text), { cv: 'none' }, { provisionalBytes: 64 * 1024 });
    assert.equal(report.provisional, true);
    assert.ok(report.rows.total < 12000 && report.rows.total > 0, `${report.rows.total} rows`);
    assert.equal(sum(report.confusion.matrix.flat()), report.rows.used);
    // Many short rows in the bytes allowed: at most PROVISIONAL_ROWS_MAX of them.
    const short = `reading,fault\n${Array.from({ length: 60_000 }, (_, i) => `${i % 97},${FAULTS[i % 3]}`).join('\n')}\n`;
    const capped = await analyze(sourceOf(short), { cv: 'none' }, { provisionalBytes: short.length / 2 });
    assert.equal(capped.report.provisional, true);
    assert.equal(capped.report.rows.total, PROVISIONAL_ROWS_MAX);
    const abort = new AbortController();
    abort.abort();
    await assert.rejects(analyze(sourceOf(text), {}, { signal: abort.signal }), CancelledError);
    // Cancelled in the middle of the second pass: the caller's cancellation is not taken for an early stop.
    const midway = new AbortController();
    const passes = new Set<string>();
    const onProgress = (p: { pass: string }): void => void passes.add(p.pass);
    const onScores = (): void => midway.abort(); // during the first batch of pass 2
    await assert.rejects(analyze(sourceOf(text), { cv: 'none' }, { signal: midway.signal, onProgress, onScores }), CancelledError);
    assert.ok(passes.has('inspect') && passes.has('moments'), [...passes].join(', '));
  });

  it('hands the discriminant scores of every row to the caller, empty for dropped rows', async () => {
    const table = pumpTable();
    table.rows[3]![2] = 'NA';
    const scored: { row: number; first: number }[] = [];
    const { report } = await analyze(sourceOf(toCsv(table)), {}, {
      onScores: (batch) => {
        for (let i = 0; i < batch.rows; i++) scored.push({ row: batch.firstRow + i, first: batch.scores[i * batch.k]! });
      },
    });
    assert.equal(scored.length, report.rows.total);
    assert.ok(Number.isNaN(scored[3]!.first));
    assert.equal(scored.filter((s) => Number.isNaN(s.first)).length, 1);
    // Scores are whitened: their pooled within-class variance (divisor n − K) is 1 on each axis.
    const byClass = new Map<string, number[]>();
    scored.forEach((s, i) => {
      if (Number.isNaN(s.first)) return;
      const label = table.rows[i]![5]!;
      byClass.set(label, [...(byClass.get(label) ?? []), s.first]);
    });
    let within = 0;
    for (const values of byClass.values()) {
      const m = sum(values) / values.length;
      within += sum(values.map((v) => (v - m) ** 2));
    }
    assert.ok(Math.abs(within / (report.rows.used - 3) - 1) < 1e-9);
  });
});

describe('analyze: the same table as CSV, TSV and Parquet', function () {
  this.timeout(30000);

  it('gives the same figures from each format of the sample pump table', async () => {
    const { openFileSource } = await import('../../src/node/fileSource');
    const { resolve } = await import('node:path');
    const reports: FitReport[] = [];
    for (const name of ['pump-faults.csv', 'pump-faults.tsv', 'pump-faults.parquet']) {
      const source = await openFileSource(resolve(__dirname, '../../../sample-workspace/data', name));
      try {
        reports.push((await analyze(source, {})).report);
      } finally {
        await source.close();
      }
    }
    const [csv, tsv, parquet] = reports as [FitReport, FitReport, FitReport];
    assert.equal(parquet.source.format, 'parquet');
    for (const other of [tsv, parquet]) {
      assert.deepEqual(other.classes, csv.classes);
      assert.deepEqual(other.features, csv.features);
      other.discriminant.eigenvalues.forEach((lambda, j) => assert.ok(Math.abs(lambda - csv.discriminant.eigenvalues[j]!) <= 1e-12 * csv.discriminant.eigenvalues[0]!));
      assert.deepEqual(other.confusion, csv.confusion);
      assert.deepEqual(other.crossValidatedConfusion, csv.crossValidatedConfusion);
      assert.deepEqual(other.misclassified.map((m) => m.row), csv.misclassified.map((m) => m.row));
    }
    assert.equal(parquet.misclassified[0]!.line, undefined, 'Parquet has rows, not lines');
    assert.equal(parquet.sample.lines, undefined);
  });
});

describe('analyze: options and the choice of cross-validation', () => {
  it('fills defaults and rejects bad values with what to do', async () => {
    const { resolveOptions } = await import('../../src/core/analyze');
    const options = resolveOptions({ label: 'fault' });
    assert.equal(options.cv, 'auto');
    assert.equal(options.solver, 'auto');
    assert.equal(options.label, 'fault');
    for (const bad of [{ solver: 'fast' }, { cv: 'kfold:1' }, { cv: 'loocv' }, { seed: -1 }, { seed: 1.5 }, { missing: 'impute' }, { read: { delimiter: ':' } }, { label: 'x', exclude: ['x'] }]) {
      assert.throws(() => resolveOptions(bad as Partial<FitOptions>), (e: unknown) => e instanceof DataError && e.code === 'bad-option' && (e.hint ?? '').length > 0, JSON.stringify(bad));
    }
  });

  it('auto: leave-one-out while n·d² ≤ 2e9, else 10 folds; skips with a reason when classes are too small', async () => {
    const { autoMethod, foldsToCollect, planCrossValidation } = await import('../../src/core/pipeline/crossValidation');
    assert.equal(autoMethod(5_000_000, 20), 'loo');
    assert.equal(autoMethod(5_000_001, 20), 'kfold:10');
    assert.equal(foldsToCollect('auto', 1000, 20), undefined);
    // n·d² against the limit 2e9: 4.7e6 · 400 = 1.88e9 (6% below), 4.8e6 · 400 = 1.92e9 (4% below).
    assert.equal(foldsToCollect('auto', 4_700_000, 20), undefined, 'not collected more than 5% below the limit');
    assert.equal(foldsToCollect('auto', 4_800_000, 20), 10, 'collected within 5% of the limit');
    assert.equal(foldsToCollect('kfold:4', 10, 2), 4);
    const classes = [{ label: 'a', count: 5 }, { label: 'b', count: 1 }];
    const loo = planCrossValidation('loo', classes, 3);
    assert.equal(loo.method, 'none');
    assert.match((loo as { reason: string }).reason, /class 'b' has 1/);
    assert.deepEqual(planCrossValidation('kfold:3', [{ label: 'a', count: 5 }, { label: 'b', count: 3 }], 3), { method: 'kfold:3', folds: 3 });
  });
});
