/**
 * Text and Markdown for a report fitted from moments alone (momentsFit.ts): the same tables as a
 * file's report (format/text.ts, format/markdown.ts building blocks) for everything the moments
 * determine, and one plain line in place of the accuracy and confusion figures, which need rows.
 */
import { markdownTable, markdownText, printable, textTable, type Align } from './format/table';
import { formatCount, formatNumber, formatPercent, formatPValue } from './format/numbers';
import { discriminantRows, multivariateRows, solverSentence, TOP_FEATURES_SHOWN } from './format/text';
import { DISCRIMINANT_ALPHA, significantDiscriminants } from './format/verdict';
import { asRenderableReport, type MomentsFitReport } from './momentsFit';

const NOT_AVAILABLE = 'not available: fitted from per-class moments without the rows (accuracy, confusion and misclassified rows need them)';

/** The verdict without the parts that need rows. */
export function momentsVerdict(report: MomentsFitReport): string {
  const k = report.discriminant.eigenvalues.length;
  if (k === 0) return 'No discriminant direction: the class means do not differ in the features used. Accuracy needs the rows.';
  const significant = significantDiscriminants(asRenderableReport(report));
  const matter =
    significant === 0
      ? `None of the ${k} discriminant${k > 1 ? 's' : ''} is significant (Bartlett p ≥ ${DISCRIMINANT_ALPHA})`
      : `${significant} of ${k} discriminant${k > 1 ? 's' : ''} ${significant === 1 ? 'matters' : 'matter'} (Bartlett p < ${DISCRIMINANT_ALPHA})`;
  const first = k > 1 ? `; the first carries ${formatPercent(report.discriminant.explainedRatio[0] ?? 0)} of the separation` : '';
  return `${matter}${first}. Accuracy needs the rows (fitted from moments).`;
}

interface Section {
  title: string;
  headers: string[];
  rows: string[][];
  align: Align[];
}

function sections(report: MomentsFitReport): Section[] {
  const renderable = asRenderableReport(report);
  const top = report.univariate.slice(0, TOP_FEATURES_SHOWN);
  return [
    { title: 'Classes', headers: ['class', 'rows', 'prior'], rows: report.classes.map((c) => [c.label, formatCount(c.count), formatNumber(c.prior, 3)]), align: ['left', 'right', 'right'] },
    {
      title: 'Discriminants (S_B w = λ S_W w)',
      headers: ['', 'eigenvalue', 'explained', 'canonical r', 'Bartlett χ²', 'df', 'p'],
      rows: discriminantRows(renderable),
      align: ['left', 'right', 'right', 'right', 'right', 'right', 'right'],
    },
    { title: 'Tests of equal class means', headers: ['test', 'statistic', 'F', 'df', 'p'], rows: multivariateRows(renderable), align: ['left', 'right', 'right', 'right', 'right'] },
    {
      title: `Features by univariate F${report.univariate.length > top.length ? ` (top ${top.length} of ${report.univariate.length})` : ''}`,
      headers: ['feature', 'F', 'p', 'η²'],
      rows: top.map((u) => [u.feature, formatNumber(u.F), formatPValue(u.p), formatNumber(u.etaSquared, 3)]),
      align: ['left', 'right', 'right', 'right'],
    },
  ];
}

export function momentsFitText(report: MomentsFitReport): string {
  const out = [`Scatterwise fit of ${printable(report.source.name)} (per-class moments, ${formatCount(report.rows.used)} rows)`, '', printable(momentsVerdict(report)), ''];
  out.push(`Label      '${printable(report.label)}', ${report.classes.length} classes, priors ${report.options.priors}`);
  out.push(`Features   ${report.features.length} used: ${report.features.map(printable).join(', ')}`);
  if (report.removedFeatures.length > 0) out.push(`Removed    ${report.removedFeatures.map((r) => `${printable(r.feature)} (${r.reason})`).join(', ')}`);
  out.push(`Solver     ${solverSentence(asRenderableReport(report))}`);
  out.push(`Accuracy   ${NOT_AVAILABLE}`);
  for (const s of sections(report)) out.push('', s.title, textTable(s.headers, s.rows, s.align));
  out.push('', `PCA (${report.pca.scale}): explained ${report.pca.explainedRatio.slice(0, 5).map((r, i) => `PC${i + 1} ${formatPercent(r)}`).join(', ')}`);
  out.push('', `Findings (${report.findings.length})`);
  for (const f of report.findings) out.push(`  ${f.severity.padEnd(7)} ${f.code}: ${printable(f.message)}`);
  return out.join('\n') + '\n';
}

export function momentsFitMarkdown(report: MomentsFitReport): string {
  const out = [`# Scatterwise fit of ${markdownText(report.source.name)} (per-class moments)`, '', `**${markdownText(momentsVerdict(report))}**`, ''];
  out.push(`- Label: \`${markdownText(report.label)}\`, ${report.classes.length} classes, ${formatCount(report.rows.used)} rows, priors ${report.options.priors}`);
  out.push(`- Features used: ${report.features.map(markdownText).join(', ')}`);
  if (report.removedFeatures.length > 0) out.push(`- Removed: ${report.removedFeatures.map((r) => `${markdownText(r.feature)} (${r.reason})`).join(', ')}`);
  out.push(`- Solver: ${solverSentence(asRenderableReport(report))}`);
  out.push(`- Accuracy: ${NOT_AVAILABLE}`);
  for (const s of sections(report)) out.push('', `## ${s.title}`, '', markdownTable(s.headers, s.rows, s.align));
  out.push('', '## Findings', '');
  for (const f of report.findings) out.push(`- **${f.severity}** \`${f.code}\`: ${markdownText(f.message)}`);
  return out.join('\n') + '\n';
}
