/**
 * The report for a terminal: the verdict first, then the figures it rests on, aligned plain text.
 */
import type { FitReport, MultivariateTest } from '../types';
import { formatCount, formatNumber, formatPEquals, formatPercent, formatPValue } from './numbers';
import { printable, textTable } from './table';
import { describeCvMethod, verdict } from './verdict';

/** Rows of the univariate table shown (the report keeps every feature). */
export const TOP_FEATURES_SHOWN = 10;
/** Misclassified rows listed in the text and Markdown reports (the JSON keeps up to the limit). */
export const MISCLASSIFIED_SHOWN = 10;

/** Names listed on one line of the text report before `and N more`. */
export const NAMES_SHOWN = 30;

function shortList(names: readonly string[]): string {
  const shown = names.slice(0, NAMES_SHOWN).join(', ');
  return names.length > NAMES_SHOWN ? `${shown} and ${names.length - NAMES_SHOWN} more` : shown;
}

function testRow(name: string, test: MultivariateTest): string[] {
  // Without an F (no positive degrees of freedom) the degrees of freedom mean nothing either.
  const df = Number.isNaN(test.F) ? '—' : `${formatNumber(test.df1, 6)}, ${formatNumber(test.df2, 6)}`;
  return [name, formatNumber(test.statistic), formatNumber(test.F), df, formatPValue(test.p)];
}

/** The four multivariate tests as table rows: name, statistic, F, df, p. */
export function multivariateRows(report: FitReport): string[][] {
  return [
    testRow("Wilks' lambda", report.tests.wilks),
    testRow("Pillai's trace", report.tests.pillai),
    testRow('Hotelling–Lawley trace', report.tests.hotellingLawley),
    testRow("Roy's largest root", report.tests.roy),
  ];
}

/** One row per discriminant: eigenvalue, explained, canonical correlation, Bartlett χ², df, p. */
export function discriminantRows(report: FitReport): string[][] {
  const d = report.discriminant;
  return d.eigenvalues.map((lambda, j) => {
    const bartlett = report.tests.bartlett[j];
    return [
      `LD${j + 1}`,
      formatNumber(lambda),
      formatPercent(d.explainedRatio[j] ?? 0),
      formatNumber(d.canonicalCorrelations[j] ?? 0),
      bartlett ? formatNumber(bartlett.chi2) : '',
      bartlett ? String(bartlett.df) : '',
      bartlett ? formatPValue(bartlett.p) : '',
    ];
  });
}

/** A confusion matrix with row totals: rows true class, columns predicted. */
export function confusionRows(confusion: { labels: string[]; matrix: number[][] }): { headers: string[]; rows: string[][] } {
  const headers = ['true \\ predicted', ...confusion.labels, 'total'];
  const rows = confusion.labels.map((label, i) => {
    const counts = confusion.matrix[i] ?? [];
    return [label, ...counts.map((n) => formatCount(n)), formatCount(counts.reduce((a, b) => a + b, 0))];
  });
  return { headers, rows };
}

/** What the rows were: total, used, dropped and why. */
export function rowsSentence(report: FitReport): string {
  const r = report.rows;
  const why = [
    r.droppedMissing > 0 ? `${formatCount(r.droppedMissing)} missing` : '',
    r.droppedNonFinite > 0 ? `${formatCount(r.droppedNonFinite)} non-finite` : '',
    r.droppedRagged > 0 ? `${formatCount(r.droppedRagged)} ragged` : '',
  ].filter(Boolean);
  return `${formatCount(r.total)} rows, ${formatCount(r.used)} used, ${formatCount(r.dropped)} dropped${why.length ? ` (${why.join(', ')})` : ''}`;
}

/** Solver in words: `exact (condition number 12.3)` or `shrinkage, Ledoit–Wolf intensity 0.12 (…)`. */
export function solverSentence(report: FitReport): string {
  const condition = `condition number ${formatNumber(report.conditionNumber, 3)}`;
  return report.solver === 'shrinkage' ? `shrinkage, Ledoit–Wolf intensity ${formatNumber(report.shrinkage, 3)} (${condition})` : `exact (${condition})`;
}

export function toText(report: FitReport): string {
  const out: string[] = [];
  const name = printable(report.source.name);
  out.push(`Scatterwise fit of ${name} (${report.source.format}, ${formatCount(report.source.bytes)} bytes)${report.provisional ? ' — PROVISIONAL: from the first part of the file only' : ''}`);
  out.push('');
  out.push(printable(verdict(report)));
  out.push('');
  out.push(`Rows       ${rowsSentence(report)}`);
  out.push(`Label      '${printable(report.label)}', ${report.classes.length} classes, priors ${report.options.priors}`);
  out.push(textTable(['class', 'rows', 'prior'], report.classes.map((c) => [c.label, formatCount(c.count), formatNumber(c.prior, 3)]), ['left', 'right', 'right'], 4));
  out.push(`Features   ${report.features.length} used: ${shortList(report.features.map(printable))}`);
  if (report.removedFeatures.length > 0) out.push(`Removed    ${shortList(report.removedFeatures.map((r) => `${printable(r.feature)} (${r.reason})`))}`);
  out.push(`Solver     ${solverSentence(report)}`);
  out.push('');

  out.push('Discriminants (S_B w = λ S_W w)');
  if (report.discriminant.eigenvalues.length === 0) out.push('  none');
  else out.push(textTable(['', 'eigenvalue', 'explained', 'canonical r', 'Bartlett χ²', 'df', 'p'], discriminantRows(report), ['left', 'right', 'right', 'right', 'right', 'right', 'right']));
  out.push('');
  out.push('Tests of equal class means');
  out.push(textTable(['test', 'statistic', 'F', 'df', 'p'], multivariateRows(report), ['left', 'right', 'right', 'right', 'right']));
  const box = report.tests.boxM;
  out.push(
    box
      ? `  Box's M (equal class covariances): M = ${formatNumber(box.M)}, χ² = ${formatNumber(box.chi2)} (df ${formatNumber(box.df, 6)}), ${formatPEquals(box.p)}; F = ${formatNumber(box.F)} (df ${formatNumber(box.df1, 6)}, ${formatNumber(box.df2, 6)}), ${formatPEquals(box.pF)}`
      : "  Box's M: not computed (see findings)",
  );
  out.push('');

  const top = report.univariate.slice(0, TOP_FEATURES_SHOWN);
  out.push(`Features by univariate F${report.univariate.length > top.length ? ` (top ${top.length} of ${report.univariate.length})` : ''}`);
  out.push(textTable(['feature', 'F', 'p', 'η²'], top.map((u) => [u.feature, formatNumber(u.F), formatPValue(u.p), formatNumber(u.etaSquared, 3)]), ['left', 'right', 'right', 'right']));
  out.push('');

  const cv = report.accuracy.crossValidated;
  out.push(`Accuracy   training ${formatPercent(report.accuracy.training)}; ${cv ? `cross-validated ${formatPercent(cv.value)} (${describeCvMethod(cv.method)})` : 'not cross-validated'}`);
  const confusion = report.crossValidatedConfusion ?? report.confusion;
  const table = confusionRows(confusion);
  out.push(`Confusion matrix (${report.crossValidatedConfusion ? 'cross-validated' : 'training'}; rows true class, columns predicted)`);
  out.push(textTable(table.headers, table.rows, table.headers.map((_, c) => (c === 0 ? 'left' : 'right'))));
  out.push(
    textTable(
      ['class', 'precision', 'recall', 'CV recall'],
      report.perClass.map((p) => [p.label, formatPercent(p.precision), formatPercent(p.recall), p.cvRecall === null ? '' : formatPercent(p.cvRecall)]),
      ['left', 'right', 'right', 'right'],
    ),
  );
  if (report.misclassifiedTotal > 0) {
    const shown = report.misclassified.slice(0, MISCLASSIFIED_SHOWN);
    out.push(`Misclassified ${cv ? 'under cross-validation' : 'in training'}: ${formatCount(report.misclassifiedTotal)} rows${shown.length < report.misclassifiedTotal ? `, first ${shown.length}` : ''}`);
    // Parquet rows have no line: the column is left out rather than shown empty.
    const lines = shown.some((m) => m.line !== undefined);
    const rows = shown.map((m) => [...(lines ? [m.line === undefined ? '' : String(m.line)] : []), String(m.row), m.label, m.predicted, formatNumber(m.posterior, 3)]);
    out.push(textTable([...(lines ? ['line'] : []), 'row', 'label', 'predicted', 'posterior'], rows, [...(lines ? ['right' as const] : []), 'right', 'left', 'left', 'right']));
  }
  out.push('');

  out.push(`PCA (${report.pca.scale}): explained ${report.pca.explainedRatio.slice(0, 5).map((r, i) => `PC${i + 1} ${formatPercent(r)}`).join(', ')}`);
  out.push('');
  out.push(`Findings (${report.findings.length})`);
  if (report.findings.length === 0) out.push('  none');
  for (const f of report.findings) out.push(`  ${f.severity.padEnd(7)} ${f.code}: ${printable(f.message)}`);
  out.push('');
  const t = report.timing;
  out.push(`Time       ${formatNumber(t.total / 1000, 3)} s (inspect ${Math.round(t.inspect)} ms, moments ${Math.round(t.moments)} ms, solve ${Math.round(t.solve)} ms, rows ${Math.round(t.rows)} ms)`);
  return out.join('\n') + '\n';
}
