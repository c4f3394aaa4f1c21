/**
 * The report as one self-contained HTML page: the same sections as the Markdown (verdict, classes,
 * key statistics, top features, confusion matrix, findings, cautions) with the plots inline as
 * SVG. No script, no external file, no network: the page's Content-Security-Policy forbids every
 * fetch, so it reads the same offline, attached to a CI run or mailed.
 */
import type { FitReport } from '../types';
import { CAUTIONS } from './markdown';
import { formatCount, formatNumber, formatPercent, formatPValue } from './numbers';
import { reportPlots } from './svgPlots';
import { escapeXml } from './svgParts';
import { confusionRows, discriminantRows, MISCLASSIFIED_SHOWN, multivariateRows, rowsSentence, solverSentence, TOP_FEATURES_SHOWN } from './text';
import { describeCvMethod, verdict } from './verdict';

const STYLE = `
:root { color-scheme: light dark; }
body { font: 14px/1.45 system-ui, sans-serif; margin: 2rem auto; max-width: 70rem; padding: 0 1rem; color: #1b1b1b; background: #fff; }
h1 { font-size: 1.5rem; } h2 { font-size: 1.25rem; border-bottom: 1px solid #ccc; padding-bottom: .2rem; margin-top: 2.5rem; } h3 { font-size: 1.05rem; margin-top: 1.5rem; }
.verdict { font-size: 1.1rem; font-weight: 600; background: #eef5fb; border-left: 4px solid #0072B2; padding: .6rem .8rem; }
.provisional { background: #fff4e0; border-left: 4px solid #E69F00; padding: .4rem .8rem; }
table { border-collapse: collapse; margin: .5rem 0 1rem; font-variant-numeric: tabular-nums; }
th, td { border: 1px solid #ccc; padding: .25rem .55rem; } th { background: #f3f3f3; text-align: left; } td.number { text-align: right; }
.findings li { margin: .25rem 0; } .severity { font-weight: 700; text-transform: uppercase; font-size: .8rem; }
.severity-error { color: #b00020; } .severity-warning { color: #9a5b00; } .severity-info { color: #555; }
.plots { display: flex; flex-wrap: wrap; gap: 1rem; } .plots figure { margin: 0; } .plots svg { max-width: 100%; height: auto; border: 1px solid #ddd; }
.cautions { background: #f7f7f7; padding: .6rem 1.5rem; }
code { font-size: .95em; }
@media (prefers-color-scheme: dark) {
  body { color: #e4e4e4; background: #1e1e1e; } th { background: #2b2b2b; } th, td { border-color: #555; }
  .verdict { background: #17324a; } .provisional { background: #3d2e10; } .cautions { background: #2a2a2a; }
  .severity-error { color: #ff6b81; } .severity-warning { color: #f0b44c; } .severity-info { color: #aaa; }
}`;

function text(value: string): string {
  return escapeXml(value);
}

function table(headers: readonly string[], rows: readonly (readonly string[])[], numeric: readonly boolean[] = []): string {
  const head = `<tr>${headers.map((h) => `<th scope="col">${text(h)}</th>`).join('')}</tr>`;
  const body = rows.map((row) => `<tr>${row.map((cell, c) => `<td${numeric[c] ? ' class="number"' : ''}>${text(cell)}</td>`).join('')}</tr>`).join('');
  return `<table><thead>${head}</thead><tbody>${body}</tbody></table>`;
}

function reportSection(report: FitReport, index: number): string {
  const out: string[] = [];
  out.push(`<section aria-labelledby="report-${index}">`);
  out.push(`<h2 id="report-${index}">Separability of <code>${text(report.source.name)}</code></h2>`);
  if (report.provisional) out.push('<p class="provisional">Provisional: computed from the first part of the file only.</p>');
  out.push(`<p class="verdict">${text(verdict(report))}</p>`);
  out.push(`<p>${text(rowsSentence(report))}. Label <code>${text(report.label)}</code>; solver ${text(solverSentence(report))}.</p>`);

  out.push('<h3>Classes</h3>');
  out.push(table(['class', 'rows', 'prior'], report.classes.map((c) => [c.label, formatCount(c.count), formatNumber(c.prior, 3)]), [false, true, true]));

  out.push('<h3>Key statistics</h3>');
  const cv = report.accuracy.crossValidated;
  out.push(
    table(
      ['', 'value'],
      [
        ['Features used', `${report.features.length}${report.removedFeatures.length ? ` (${report.removedFeatures.length} removed: ${report.removedFeatures.map((r) => `${r.feature} (${r.reason})`).join(', ')})` : ''}`],
        ['Training accuracy', formatPercent(report.accuracy.training)],
        ['Cross-validated accuracy', cv ? `${formatPercent(cv.value)} (${describeCvMethod(cv.method)})` : 'not run'],
        ["Box's M", report.tests.boxM ? `${formatNumber(report.tests.boxM.M)} (p = ${formatPValue(report.tests.boxM.p)})` : 'not computed'],
      ],
      [false, true],
    ),
  );
  if (report.discriminant.eigenvalues.length > 0) {
    out.push(table(['', 'eigenvalue', 'explained', 'canonical r', 'Bartlett χ²', 'df', 'p'], discriminantRows(report), [false, true, true, true, true, true, true]));
  }
  out.push(table(['test', 'statistic', 'F', 'df', 'p'], multivariateRows(report), [false, true, true, true, true]));

  const top = report.univariate.slice(0, TOP_FEATURES_SHOWN);
  out.push(`<h3>Top features${report.univariate.length > top.length ? ` (${top.length} of ${report.univariate.length})` : ''}</h3>`);
  out.push(table(['feature', 'F', 'p', 'η²'], top.map((u) => [u.feature, formatNumber(u.F), formatPValue(u.p), formatNumber(u.etaSquared, 3)]), [false, true, true, true]));

  const confusion = report.crossValidatedConfusion ?? report.confusion;
  out.push(`<h3>Confusion matrix (${report.crossValidatedConfusion ? 'cross-validated' : 'training'})</h3>`);
  const grid = confusionRows(confusion);
  out.push(table(grid.headers, grid.rows, grid.headers.map((_, c) => c > 0)));
  out.push(
    table(
      ['class', 'precision', 'recall', 'CV recall'],
      report.perClass.map((p) => [p.label, formatPercent(p.precision), formatPercent(p.recall), p.cvRecall === null ? '' : formatPercent(p.cvRecall)]),
      [false, true, true, true],
    ),
  );
  if (report.misclassifiedTotal > 0) {
    const shown = report.misclassified.slice(0, MISCLASSIFIED_SHOWN);
    out.push(`<p>${formatCount(report.misclassifiedTotal)} misclassified row${report.misclassifiedTotal > 1 ? 's' : ''}${shown.length < report.misclassifiedTotal ? `, the first ${shown.length}` : ''}:</p>`);
    out.push(table(['line', 'label', 'predicted', 'posterior'], shown.map((m) => [m.line === undefined ? `row ${m.row}` : String(m.line), m.label, m.predicted, formatNumber(m.posterior, 3)]), [true, false, false, true]));
  }

  out.push(`<h3>Findings (${report.findings.length})</h3>`);
  if (report.findings.length === 0) out.push('<p>None.</p>');
  else {
    out.push(
      `<ul class="findings">${report.findings
        .map((f) => `<li><span class="severity severity-${f.severity}">${f.severity}</span> <code>${text(f.code)}</code>: ${text(f.message)}</li>`)
        .join('')}</ul>`,
    );
  }

  out.push('<h3>Plots</h3>');
  out.push(`<div class="plots">${reportPlots(report, { idPrefix: `report-${index}` })
    .map((plot) => `<figure>${plot.svg.trim()}</figure>`)
    .join('')}</div>`);
  out.push('</section>');
  return out.join('\n');
}

/** One HTML page for one or more reports (one section each), with the cautions once at the end. */
export function toHtml(reports: readonly FitReport[], title = 'Scatterwise report'): string {
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    // No script may run and nothing may be fetched: the page is complete as it is.
    `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${text(title)}</title>`,
    `<style>${STYLE}</style>`,
    '</head>',
    '<body>',
    `<h1>${text(title)}</h1>`,
    ...reports.map((report, i) => reportSection(report, i)),
    '<h2>Cautions</h2>',
    `<ul class="cautions">${CAUTIONS.map((c) => `<li>${text(c)}</li>`).join('')}</ul>`,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
