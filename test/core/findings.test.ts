import { strict as assert } from 'node:assert';
import {
  classFindings,
  duplicateRowFinding,
  finding,
  leakageFindings,
  missingValueFinding,
  nearConstantFindings,
  rangesDisjoint,
  removedFeatureFindings,
  sortFindings,
} from '../../src/core/findings';
import { formatCombination, formatNumber, formatPValue, listNames } from '../../src/core/format/numbers';

// Unit checks of the rules that turn facts into findings. That each finding is triggered by a
// planted defect in a real file, through the whole pipeline, is checked in analyze.test.ts.
describe('findings', () => {
  it('sorts errors, then warnings, then info, by code within a severity', () => {
    const sorted = sortFindings([
      finding('b-code', 'info', 'x'),
      finding('z-code', 'warning', 'x'),
      finding('a-code', 'info', 'x'),
      finding('m-code', 'error', 'x'),
      finding('c-code', 'warning', 'x'),
    ]);
    assert.deepEqual(sorted.map((f) => `${f.severity}:${f.code}`), ['error:m-code', 'warning:c-code', 'warning:z-code', 'info:a-code', 'info:b-code']);
  });

  it('names a dependent column as the combination of the others', () => {
    assert.equal(formatCombination([{ feature: 'a', coefficient: 2 }, { feature: 'b', coefficient: -1 }]), '2·a − b');
    const [dependent] = removedFeatureFindings([{ feature: 'c', reason: 'dependent', combination: [{ feature: 'a', coefficient: 2 }, { feature: 'b', coefficient: -1 }] }]);
    assert.equal(dependent!.code, 'dependent-columns');
    assert.match(dependent!.message, /c = 2·a − b/);
    assert.deepEqual(dependent!.columns, ['c', 'a', 'b']);
  });

  it('tiny-class is an error under 2 rows and a warning under the feature count', () => {
    const found = classFindings([{ label: 'a', count: 100 }, { label: 'b', count: 1 }, { label: 'c', count: 3 }], 5);
    const tiny = found.filter((f) => f.code === 'tiny-class');
    assert.deepEqual(tiny.map((f) => f.severity), ['error', 'warning']);
    assert.match(tiny[0]!.message, /'b'/);
    assert.match(tiny[1]!.message, /'c' \(3 rows\)/);
    assert.ok(found.some((f) => f.code === 'class-imbalance'), 'ratio 100 ≥ 10');
    assert.deepEqual(classFindings([{ label: 'a', count: 90 }, { label: 'b', count: 9 }], 2).map((f) => f.code), ['class-imbalance'], 'ratio exactly 10');
    assert.equal(classFindings([{ label: 'a', count: 89 }, { label: 'b', count: 9 }], 2).length, 0, 'ratio 9.9');
  });

  it('leakage: disjoint class ranges, or η² ≥ 0.99', () => {
    assert.equal(rangesDisjoint([{ min: 5, max: 6 }, { min: 0, max: 1 }, { min: 2, max: 4 }]), true);
    assert.equal(rangesDisjoint([{ min: 0, max: 2 }, { min: 2, max: 4 }]), false, 'touching ranges overlap');
    const ranges = [{ label: 'a', count: 50, min: 0, max: 1 }, { label: 'b', count: 50, min: 0.5, max: 2 }];
    assert.equal(leakageFindings([{ feature: 'x', etaSquared: 0.5, ranges }]).length, 0);
    assert.equal(leakageFindings([{ feature: 'x', etaSquared: 0.995, ranges }])[0]!.code, 'possible-leakage');
    // A class of 2 rows in 300 (under 1%) does not hide ranges that sort every other row.
    const withTiny = [{ label: 'a', count: 148, min: 0, max: 1 }, { label: 'b', count: 150, min: 2, max: 3 }, { label: 'c', count: 2, min: 0.4, max: 0.6 }];
    const [leak] = leakageFindings([{ feature: 'code', etaSquared: 0.9, ranges: withTiny }]);
    assert.match(leak!.message, /'c' with fewer than 3 rows left out/);
    const notTiny = withTiny.map((r) => (r.label === 'c' ? { ...r, count: 30 } : r));
    assert.equal(leakageFindings([{ feature: 'code', etaSquared: 0.9, ranges: notTiny }]).length, 0);
  });

  it('near-constant: one value in 99% of rows, or spread below √ε of the mean', () => {
    const found = nearConstantFindings(
      [
        { feature: 'mostly_zero', mean: 0.01, standardDeviation: 0.1, mode: { value: 0, count: 995 } },
        { feature: 'varied', mean: 3, standardDeviation: 1, mode: { value: 2, count: 500 } },
        { feature: 'offset', mean: 1e9, standardDeviation: 1e-3 },
      ],
      1000,
    );
    assert.deepEqual(found.map((f) => f.columns?.[0]), ['mostly_zero', 'offset']);
  });

  it('missing-values reports per column counts and the policy', () => {
    const f = missingValueFinding({
      label: 'fault',
      labelMissing: 2,
      features: [{ feature: 'a', missing: 3, nonNumeric: 0, nonNumericExamples: [], positiveInfinity: 0, negativeInfinity: 0 }],
      policy: 'drop-rows',
      rowsDropped: 5,
      columnsDropped: [],
    });
    assert.match(f!.message, /label 'fault' 2, 'a' 3; policy drop-rows: 5 rows dropped/);
  });

  it('duplicate-rows names the rows and their earlier copies', () => {
    const f = duplicateRowFinding({ count: 1, examples: [{ row: 9, line: 11, firstRow: 2, firstLine: 4 }], checked: 1000, rowsUsed: 1000 });
    assert.match(f!.message, /line 11 repeats line 4/);
    assert.deepEqual(f!.rows, [9]);
  });

  it('formats numbers and p-values readably', () => {
    assert.equal(formatNumber(1234.5678), '1235');
    assert.equal(formatNumber(0.000012346), '1.235e-5');
    assert.equal(formatNumber(2.5e12, 3), '2.5e12');
    assert.equal(formatPValue(0), '< 1e-307');
    assert.equal(formatPValue(3.2e-45), '3.2e-45');
    assert.equal(listNames(['a', 'b', 'c']), "'a', 'b' and 'c'");
  });
});
