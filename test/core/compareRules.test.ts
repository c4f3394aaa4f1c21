/**
 * The pieces of a comparison that need no git: `--fail-on` parsing, which rules are in force,
 * the gates on in-process fits of the sample table and its edits, and the axis alignment that lets
 * two fits be drawn on the same scale.
 */
import { strict as assert } from 'node:assert';
import { analyze } from '../../src/core/analyze';
import { alignedAxisSigns, checkGates, compareReports, effectiveRules, notableChanges, parseFailOn, sharedRange } from '../../src/core/compare/index';
import { memorySource } from '../../src/core/source';
import type { FitReport } from '../../src/core/types';
import { sampleTable, withLeakingColumn, withRelabelledClass } from './compareRepository';

async function fit(name: string, text: string): Promise<FitReport> {
  return (await analyze(memorySource(name, new TextEncoder().encode(text)), { label: 'fault' })).report;
}

describe('gate rules', () => {
  it('reads --fail-on values: fractions, percentages, severities, several per value', () => {
    assert.deepEqual(parseFailOn(['min-accuracy=0.9']), { rules: { minAccuracy: 0.9 } });
    assert.deepEqual(parseFailOn(['min-accuracy=85%,accuracy-drop=2.5%', 'new-finding=warning', 'class-lost']), {
      rules: { minAccuracy: 0.85, maxAccuracyDrop: 0.025, newFindingAtOrAbove: 'warning', classDisappears: true },
    });
    assert.deepEqual(parseFailOn(['none']), { rules: { classDisappears: false } });
  });

  it('refuses what it cannot read, saying what is expected', () => {
    const problem = (values: string[]): string => {
      const parsed = parseFailOn(values);
      assert.ok('problem' in parsed, `accepted ${values.join(' ')}`);
      return parsed.problem;
    };
    assert.match(problem(['min-accuracy=1.5']), /needs a fraction from 0 to 1 or a percentage/);
    assert.match(problem(['min-accuracy=120%']), /needs a fraction/);
    assert.match(problem(['accuracy-drop']), /needs a fraction/);
    assert.match(problem(['new-finding=fatal']), /needs a severity/);
    assert.match(problem(['class-lost=yes']), /takes no value/);
    assert.match(problem(['min-accuracy=0.8', 'min-accuracy=0.9']), /given twice/);
    assert.match(problem(['none', 'class-lost']), /cannot be combined/);
    assert.match(problem(['max-rows=3']), /unknown rule 'max-rows'/);
  });

  it('uses the first rule set that has a rule, else the defaults', () => {
    assert.deepEqual(effectiveRules(undefined, {}), { rules: { classDisappears: true, newFindingAtOrAbove: 'error' }, defaults: true });
    assert.deepEqual(effectiveRules(undefined, { minAccuracy: 0.7 }), { rules: { minAccuracy: 0.7 }, defaults: false });
    assert.deepEqual(effectiveRules({ classDisappears: false }, { minAccuracy: 0.7 }), { rules: { classDisappears: false }, defaults: false });
  });
});

describe('comparing in-process fits', function () {
  this.timeout(120_000);
  let base: FitReport;
  let leak: FitReport;
  let relabel: FitReport;

  before(async () => {
    const text = sampleTable('pump-faults.csv');
    base = await fit('base.csv', text);
    leak = await fit('leak.csv', withLeakingColumn(text));
    relabel = await fit('relabel.csv', withRelabelledClass(text));
  });

  it('a report compared with itself has no delta, no notable change, and passes every gate', () => {
    const deltas = compareReports(base, base);
    assert.deepEqual(notableChanges(deltas), []);
    assert.equal(deltas.accuracy.crossValidated?.delta, 0);
    const verdict = checkGates(deltas, { minAccuracy: 0, maxAccuracyDrop: 0, newFindingAtOrAbove: 'info', classDisappears: true });
    assert.ok(verdict.passed);
    assert.equal(verdict.outcomes.length, 4);
  });

  it('an accuracy gate fails by the difference, and a missing cross-validation fails rather than passing', () => {
    const cv = base.accuracy.crossValidated!.value;
    const gate = checkGates(compareReports(base, base), { minAccuracy: cv + 0.1 }).outcomes[0]!;
    assert.equal(gate.passed, false);
    assert.match(gate.detail, / is 10\.0 points below the minimum /);
    const uncrossed = { ...base, accuracy: { ...base.accuracy, crossValidated: null } };
    const missing = checkGates(compareReports(base, uncrossed), { minAccuracy: 0.1, maxAccuracyDrop: 0.5 });
    assert.deepEqual(missing.outcomes.map((o) => o.passed), [false, false]);
    assert.match(missing.outcomes[0]!.detail, /has no cross-validated accuracy to check/);
  });

  it('the relabelled class is lost and gained; the leaking column raises the accuracy beyond noise', () => {
    const relabelled = compareReports(base, relabel);
    assert.deepEqual(relabelled.classes.lost.map((c) => c.label), ['cavitation']);
    assert.deepEqual(relabelled.classes.gained.map((c) => c.label), ['suction-cavitation']);
    assert.equal(checkGates(relabelled).passed, false);
    const leaked = compareReports(base, leak);
    const accuracy = notableChanges(leaked).find((c) => c.topic === 'accuracy');
    assert.ok(accuracy && accuracy.importance > 80, 'a notable accuracy change');
    assert.deepEqual(leaked.features.added, ['repair_ticket']);
  });

  it('aligns the head axes with the base: a flipped copy gets sign −1 on every axis', () => {
    assert.deepEqual(alignedAxisSigns(base, base), { discriminant: [1, 1, 1], principal: base.pca.loadings[0]!.map(() => 1) });
    const flipped: FitReport = {
      ...base,
      discriminant: { ...base.discriminant, structure: base.discriminant.structure.map((row) => row.map((x) => -x)) },
      pca: { ...base.pca, loadings: base.pca.loadings.map((row) => row.map((x) => -x)) },
    };
    const signs = alignedAxisSigns(base, flipped);
    assert.deepEqual(signs.discriminant, [-1, -1, -1]);
    assert.ok(signs.principal.every((s) => s === -1));
    // The leak version shares ten features with the base: its axes are matched on those.
    assert.equal(alignedAxisSigns(base, leak).discriminant.length, leak.discriminant.eigenvalues.length);
  });

  it('a shared range holds both sides with a 5% margin', () => {
    assert.deepEqual(sharedRange([0, 10], [-10, 5, NaN]), { low: -11, high: 11 });
    assert.deepEqual(sharedRange([3], [3]), { low: 2.5, high: 3.5 });
  });
});
