import { strict as assert } from 'node:assert';
import { analyze } from '../../src/core/analyze';
import { toMarkdown } from '../../src/core/format/markdown';
import { formatPercent } from '../../src/core/format/numbers';
import { markdownTable, printable } from '../../src/core/format/table';
import { toText } from '../../src/core/format/text';
import { significantDiscriminants, verdict, worstConfusedPair } from '../../src/core/format/verdict';
import type { FitReport } from '../../src/core/types';
import { pumpTable, sourceOf, toCsv } from './generatedTables';

describe('report formatting', function () {
  this.timeout(20000);
  let report: FitReport;

  before(async () => {
    report = (await analyze(sourceOf(toCsv(pumpTable([60, 45, 70], 5, 31))))).report;
  });

  it('the verdict counts the leading significant Bartlett tests and names the worst pair', () => {
    const significant = report.tests.bartlett.findIndex((t) => !(t.p < 0.05));
    assert.equal(significantDiscriminants(report), significant < 0 ? report.tests.bartlett.length : significant);
    const line = verdict(report);
    assert.match(line, new RegExp(`${significantDiscriminants(report)} of ${report.discriminant.eigenvalues.length} discriminants`));
    assert.ok(line.includes(formatPercent(report.discriminant.explainedRatio[0]!)), line);
    assert.ok(line.includes(`Cross-validated accuracy ${formatPercent(report.accuracy.crossValidated!.value)} (leave-one-out)`), line);
    const pair = worstConfusedPair(report.crossValidatedConfusion!);
    if (pair) assert.ok(line.includes(`${pair.a} ↔ ${pair.b}`), line);
    assert.ok(!line.includes('\n'));
  });

  it('worstConfusedPair adds both directions', () => {
    const pair = worstConfusedPair({ labels: ['a', 'b', 'c'], matrix: [[5, 2, 0], [1, 6, 2], [0, 2, 9]] });
    assert.deepEqual(pair, { a: 'b', b: 'c', rows: 4 });
    assert.equal(worstConfusedPair({ labels: ['a', 'b'], matrix: [[5, 0], [0, 6]] }), null);
  });

  it('text: verdict first, then the figures of the report', () => {
    const text = toText(report);
    const lines = text.split('\n');
    assert.match(lines[0]!, /pumps\.csv/);
    assert.equal(lines[2], verdict(report));
    for (const c of report.classes) assert.ok(text.includes(c.label));
    assert.ok(text.includes(`Wilks' lambda`));
    for (const f of report.findings) assert.ok(text.includes(f.code));
  });

  it('markdown: verdict first, classes, statistics, features, confusion, findings, cautions last', () => {
    const markdown = toMarkdown(report);
    const order = ['## Separability', '### Classes', '### Key statistics', '### Top features', '### Confusion matrix', '### Findings', '### Cautions'].map((h) => markdown.indexOf(h));
    assert.ok(order.every((i, k) => i >= 0 && (k === 0 || i > order[k - 1]!)), order.join(','));
    assert.ok(markdown.indexOf('Cross-validated accuracy') < markdown.indexOf('### Classes'), 'verdict before the tables');
    assert.match(markdown, /not the same as how a model will do on new data/);
  });

  it('names from the data cannot break a table or the terminal', () => {
    assert.equal(printable('a\nb\u001b[31m'), 'a\\nb\\u001b[31m');
    const table = markdownTable(['class', 'rows'], [['bad|name\nnext', '3']], ['left', 'right']);
    const lines = table.split('\n');
    assert.equal(lines.length, 3);
    // The newline shows as a backslash-escaped `\n`, which Markdown renders as the two characters.
    assert.equal(lines[2], '| bad\\|name\\\\nnext | 3 |');
  });
});
