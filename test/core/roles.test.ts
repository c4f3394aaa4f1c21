import { strict as assert } from 'node:assert';
import { DataError } from '../../src/core/errors';
import type { ColumnSummary, TableInspection } from '../../src/core/read/types';
import { DEFAULT_MISSING_TOKENS } from '../../src/core/read/types';
import { assignRoles, labelCardinalityLimit } from '../../src/core/roles';

/** A hand-described table: [name, kind, distinct, integral]. */
function table(columns: [string, ColumnSummary['kind'], number, boolean?][], sampledRows = 200): TableInspection {
  return {
    source: 'pumps.csv',
    format: 'csv',
    delimiter: ',',
    header: true,
    columns: columns.map(([name, kind, distinct, integral], index) => ({ name, index, kind, distinct, integral: integral ?? false, missing: 0 })),
    sampledRows,
    estimatedRows: sampledRows,
    splittable: true,
    options: { missingTokens: DEFAULT_MISSING_TOKENS },
  };
}

function dataError(fn: () => unknown): DataError {
  try {
    fn();
  } catch (error) {
    assert.ok(error instanceof DataError, `expected a DataError, got ${String(error)}`);
    return error;
  }
  assert.fail('expected a DataError');
}

describe('roles', () => {
  const pumps = table([
    ['pump_id', 'text', 150],
    ['rms_velocity', 'numeric', 200],
    ['kurtosis', 'numeric', 200],
    ['fault', 'text', 4],
    ['temperature', 'numeric', 180],
  ]);

  it('takes the single low-cardinality text column as the label and every numeric column as a feature', () => {
    const roles = assignRoles(pumps);
    assert.equal(roles.label.name, 'fault');
    assert.equal(roles.labelChosenBy, 'only-text-column');
    assert.deepEqual(roles.features.map((c) => c.name), ['rms_velocity', 'kurtosis', 'temperature']);
    assert.deepEqual(roles.unusedText.map((c) => c.name), ['pump_id']);
  });

  it('prefers a column named like a label, in any case, even when numeric', () => {
    const roles = assignRoles(table([['a', 'numeric', 50], ['Class', 'numeric', 3, true], ['kind', 'text', 3]]));
    assert.equal(roles.label.name, 'Class');
    assert.equal(roles.labelChosenBy, 'name');
    assert.deepEqual(roles.features.map((c) => c.name), ['a']);
    assert.equal(roles.labelLooksContinuous, false);
  });

  it('flags a numeric label with many distinct values as continuous', () => {
    const roles = assignRoles(table([['a', 'numeric', 50], ['target', 'numeric', 180, true]]));
    assert.equal(roles.labelLooksContinuous, true);
    const fractional = assignRoles(table([['a', 'numeric', 50], ['y', 'numeric', 5, false]]));
    assert.equal(fractional.labelLooksContinuous, true);
  });

  it('the cardinality limit is max(20, 5% of the sampled rows)', () => {
    assert.equal(labelCardinalityLimit(100), 20);
    assert.equal(labelCardinalityLimit(1000), 50);
    assert.equal(assignRoles(table([['x', 'numeric', 900], ['kind', 'text', 50]], 1000)).label.name, 'kind');
    const error = dataError(() => assignRoles(table([['x', 'numeric', 900], ['kind', 'text', 51]], 1000)));
    assert.equal(error.code, 'no-label-column');
  });

  it('an explicit label wins, and features/exclude select columns in the order given', () => {
    const roles = assignRoles(pumps, { label: 'pump_id', features: ['temperature', 'rms_velocity'] });
    assert.equal(roles.label.name, 'pump_id');
    assert.deepEqual(roles.features.map((c) => c.name), ['temperature', 'rms_velocity']);
    const excluded = assignRoles(pumps, { exclude: ['kurtosis'] });
    assert.deepEqual(excluded.features.map((c) => c.name), ['rms_velocity', 'temperature']);
  });

  it('passes over an identifier column whose sampled values are all different', () => {
    const roles = assignRoles(table([['serial', 'text', 12], ['x', 'numeric', 12], ['fault', 'text', 3]], 12));
    assert.equal(roles.label.name, 'fault');
  });

  it('lists the candidates when two text columns could be the label', () => {
    const error = dataError(() => assignRoles(table([['x', 'numeric', 100], ['site', 'text', 3], ['fault', 'text', 4]])));
    assert.equal(error.code, 'ambiguous-label');
    assert.match(error.message, /pumps\.csv/);
    assert.match(error.message, /'site', 'fault'/);
    assert.match(error.hint ?? '', /--label/);
  });

  it('names the unknown column and lists the available ones', () => {
    for (const options of [{ label: 'fualt' }, { features: ['rms'] }, { exclude: ['nope'] }]) {
      const error = dataError(() => assignRoles(pumps, options));
      assert.equal(error.code, 'unknown-column');
      assert.equal(error.where.file, 'pumps.csv');
      assert.match(error.message, /'pump_id', 'rms_velocity', 'kurtosis', 'fault', 'temperature'/);
    }
  });

  it('refuses the label as a feature, a text feature, and a table without numeric features', () => {
    assert.equal(dataError(() => assignRoles(pumps, { features: ['fault', 'kurtosis'] })).code, 'label-as-feature');
    assert.equal(dataError(() => assignRoles(pumps, { label: 'fault', features: ['pump_id'] })).code, 'non-numeric-feature');
    const error = dataError(() => assignRoles(table([['name', 'text', 100], ['fault', 'text', 3]]), { label: 'fault' }));
    assert.equal(error.code, 'no-features');
    assert.match(error.message, /pumps\.csv/);
  });

  it('an excluded column is never picked as the label', () => {
    const roles = assignRoles(table([['x', 'numeric', 100], ['label', 'text', 3], ['fault', 'text', 4]]), { exclude: ['label'] });
    assert.equal(roles.label.name, 'fault');
  });
});
