/**
 * The report as Markdown (a pull-request comment, a note in a repository): verdict first, then the
 * classes, the key statistics, the top features, the confusion matrix and the findings, and the
 * cautions at the end.
 */
import type { FitReport } from '../types';
import { formatCount, formatNumber, formatPEquals, formatPercent, formatPValue } from './numbers';
import { markdownTable, markdownText, printable } from './table';
import { confusionRows, discriminantRows, MISCLASSIFIED_SHOWN, multivariateRows, rowsSentence, solverSentence, TOP_FEATURES_SHOWN } from './text';
import { describeCvMethod, verdict } from './verdict';

/** The closing cautions, in our words. */
export const CAUTIONS = [
  'These figures describe how well the classes separate in this table, which is not the same as how a model will do on new data: the cross-validated accuracy is the nearer guide, and only data collected later can confirm it.',
  'A feature that separates the classes too well may have been recorded after, or derived from, the label; read the possible-leakage findings before trusting a high accuracy.',
  'When the rows describe people, follow the data-protection and ethics rules that apply where you work, and have a qualified person review any decision built on these results.',
];

/** `cautions: false` leaves the closing cautions out (a page of several reports states them once). */
export function toMarkdown(report: FitReport, options: { cautions?: boolean } = {}): string {
  const out: string[] = [];
  out.push(`## Separability of \`${printable(report.source.name).replace(/`/g, "'")}\``);
  out.push('');
  if (report.provisional) {
    out.push('> **Provisional:** computed from the first part of the file only.');
    out.push('');
  }
  out.push(`**${markdownText(verdict(report))}**`);
  out.push('');
  out.push(`${rowsSentence(report)}. Label \`${markdownText(report.label)}\`; solver ${solverSentence(report)}.`);
  out.push('');

  out.push('### Classes');
  out.push('');
  out.push(markdownTable(['class', 'rows', 'prior'], report.classes.map((c) => [c.label, formatCount(c.count), formatNumber(c.prior, 3)]), ['left', 'right', 'right']));
  out.push('');

  out.push('### Key statistics');
  out.push('');
  const cv = report.accuracy.crossValidated;
  const key: string[][] = [
    ['Features used', `${report.features.length}${report.removedFeatures.length ? ` (${report.removedFeatures.length} removed)` : ''}`],
    ['Training accuracy', formatPercent(report.accuracy.training)],
    ['Cross-validated accuracy', cv ? `${formatPercent(cv.value)} (${describeCvMethod(cv.method)})` : 'not run'],
    ["Wilks' lambda", `${formatNumber(report.tests.wilks.statistic)} (F = ${formatNumber(report.tests.wilks.F)}, ${formatPEquals(report.tests.wilks.p)})`],
    ["Box's M", report.tests.boxM ? `${formatNumber(report.tests.boxM.M)} (${formatPEquals(report.tests.boxM.p)})` : 'not computed'],
  ];
  out.push(markdownTable(['', 'value'], key, ['left', 'right']));
  out.push('');
  if (report.discriminant.eigenvalues.length > 0) {
    out.push(markdownTable(['', 'eigenvalue', 'explained', 'canonical r', 'Bartlett χ²', 'df', 'p'], discriminantRows(report), ['left', 'right', 'right', 'right', 'right', 'right', 'right']));
    out.push('');
  }
  out.push(markdownTable(['test', 'statistic', 'F', 'df', 'p'], multivariateRows(report), ['left', 'right', 'right', 'right', 'right']));
  out.push('');

  const top = report.univariate.slice(0, TOP_FEATURES_SHOWN);
  out.push(`### Top features${report.univariate.length > top.length ? ` (${top.length} of ${report.univariate.length})` : ''}`);
  out.push('');
  out.push(markdownTable(['feature', 'F', 'p', 'η²'], top.map((u) => [u.feature, formatNumber(u.F), formatPValue(u.p), formatNumber(u.etaSquared, 3)]), ['left', 'right', 'right', 'right']));
  out.push('');

  const confusion = report.crossValidatedConfusion ?? report.confusion;
  out.push(`### Confusion matrix (${report.crossValidatedConfusion ? 'cross-validated' : 'training'})`);
  out.push('');
  const table = confusionRows(confusion);
  out.push(markdownTable(table.headers, table.rows, table.headers.map((_, c) => (c === 0 ? 'left' : 'right'))));
  out.push('');
  out.push(
    markdownTable(
      ['class', 'precision', 'recall', 'CV recall'],
      report.perClass.map((p) => [p.label, formatPercent(p.precision), formatPercent(p.recall), p.cvRecall === null ? '' : formatPercent(p.cvRecall)]),
      ['left', 'right', 'right', 'right'],
    ),
  );
  out.push('');
  if (report.misclassifiedTotal > 0) {
    const shown = report.misclassified.slice(0, MISCLASSIFIED_SHOWN);
    out.push(`${formatCount(report.misclassifiedTotal)} misclassified row${report.misclassifiedTotal > 1 ? 's' : ''}${shown.length < report.misclassifiedTotal ? `, the first ${shown.length}` : ''}:`);
    out.push('');
    out.push(
      markdownTable(
        ['line', 'label', 'predicted', 'posterior'],
        shown.map((m) => [m.line === undefined ? `row ${m.row}` : String(m.line), m.label, m.predicted, formatNumber(m.posterior, 3)]),
        ['right', 'left', 'left', 'right'],
      ),
    );
    out.push('');
  }

  out.push(`### Findings (${report.findings.length})`);
  out.push('');
  if (report.findings.length === 0) out.push('None.');
  for (const f of report.findings) out.push(`- **${f.severity}** \`${f.code}\`: ${markdownText(f.message)}`);
  out.push('');
  if (options.cautions === false) return out.join('\n');
  out.push('### Cautions');
  out.push('');
  for (const caution of CAUTIONS) out.push(`- ${caution}`);
  return out.join('\n') + '\n';
}
