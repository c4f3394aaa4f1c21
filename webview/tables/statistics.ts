/**
 * The statistics table: per discriminant (eigenvalue, explained share, canonical correlation and
 * Bartlett's sequential χ² test of it and the ones after it), the four multivariate tests of equal
 * class means with their F approximations, Box's M test of equal covariances, and the accuracies.
 */
import type { FitReport, MultivariateTest } from '../../src/core/types';
import { button, element, section } from '../dom';
import { formatCount, formatDf, formatNumber, formatPercent, formatPValue } from '../format';
import { describeCvMethod } from '../../src/core/format/verdict';
import { dataTable } from './table';

function discriminantTable(report: FitReport): HTMLTableElement {
  const { eigenvalues, explainedRatio, canonicalCorrelations } = report.discriminant;
  let cumulative = 0;
  const rows = eigenvalues.map((eigenvalue, j) => {
    cumulative += explainedRatio[j];
    return { j, eigenvalue, ratio: explainedRatio[j], cumulative, r: canonicalCorrelations[j], bartlett: report.tests.bartlett[j] };
  });
  const k = eigenvalues.length;
  return dataTable(
    'Discriminants and Bartlett’s sequential tests',
    [
      { header: 'Discriminant', cell: (r) => `LD${r.j + 1}` },
      { header: 'Eigenvalue', cell: (r) => formatNumber(r.eigenvalue), numeric: true },
      { header: 'Explained', cell: (r) => formatPercent(r.ratio), numeric: true },
      { header: 'Cumulative', cell: (r) => formatPercent(r.cumulative), numeric: true },
      { header: 'Canonical r', cell: (r) => formatNumber(r.r, 3), numeric: true },
      { header: 'Tests', cell: (r) => (r.j + 1 === k ? `LD${k}` : `LD${r.j + 1}–LD${k}`), title: 'Bartlett’s test j: are discriminants j..k together zero?' },
      { header: 'χ²', cell: (r) => (r.bartlett ? formatNumber(r.bartlett.chi2) : '—'), numeric: true },
      { header: 'df', cell: (r) => (r.bartlett ? formatDf(r.bartlett.df) : '—'), numeric: true },
      { header: 'p', cell: (r) => (r.bartlett ? formatPValue(r.bartlett.p) : '—'), numeric: true },
    ],
    rows,
    { className: 'discriminant-table' },
  );
}

function multivariateTable(report: FitReport): HTMLTableElement {
  const tests: [string, MultivariateTest][] = [
    ['Wilks’ lambda', report.tests.wilks],
    ['Pillai’s trace', report.tests.pillai],
    ['Hotelling–Lawley trace', report.tests.hotellingLawley],
    ['Roy’s largest root', report.tests.roy],
  ];
  return dataTable(
    'Tests of equal class means (F approximations)',
    [
      { header: 'Test', cell: ([name]) => name },
      { header: 'Statistic', cell: ([, t]) => formatNumber(t.statistic), numeric: true },
      { header: 'F', cell: ([, t]) => formatNumber(t.F), numeric: true },
      { header: 'df1', cell: ([, t]) => formatDf(t.df1), numeric: true },
      { header: 'df2', cell: ([, t]) => formatDf(t.df2), numeric: true },
      { header: 'p', cell: ([, t]) => formatPValue(t.p), numeric: true },
    ],
    tests,
    { className: 'multivariate-table' },
  );
}

function boxMBlock(report: FitReport): HTMLElement {
  const box = report.tests.boxM;
  if (!box) return element('p', { className: 'note box-m-skipped', text: 'Box’s M was not computed: a class has fewer rows than features plus one (see the findings).' });
  return dataTable(
    'Box’s M test of equal class covariance matrices',
    [
      { header: 'Approximation', cell: (r) => r.name },
      { header: 'M', cell: () => formatNumber(box.M), numeric: true },
      { header: 'Statistic', cell: (r) => formatNumber(r.statistic), numeric: true },
      { header: 'df', cell: (r) => r.df, numeric: true },
      { header: 'p', cell: (r) => formatPValue(r.p), numeric: true },
    ],
    [
      { name: 'χ²', statistic: box.chi2, df: formatDf(box.df), p: box.p },
      { name: 'F', statistic: box.F, df: `${formatDf(box.df1)}, ${formatDf(box.df2)}`, p: box.pF },
    ],
    { className: 'box-m-table' },
  );
}

function accuracyList(report: FitReport): HTMLElement {
  const cv = report.accuracy.crossValidated;
  const items: [string, string][] = [
    ['Training accuracy', formatPercent(report.accuracy.training)],
    ['Cross-validated accuracy', cv ? `${formatPercent(cv.value)} (${describeCvMethod(cv.method)})` : 'not run'],
    ['Solver', report.solver === 'shrinkage' ? `shrinkage, Ledoit–Wolf intensity ${formatNumber(report.shrinkage, 3)}` : 'exact'],
    ['Condition number', formatNumber(report.conditionNumber, 3)],
    ['Time', `${formatCount(report.timing.total)} ms`],
  ];
  return element('dl', { className: 'facts' }, items.flatMap(([term, value]) => [element('dt', { text: term }), element('dd', { text: value })]));
}

export function statisticsSection(report: FitReport, copyMarkdown: () => void): HTMLElement {
  return section('statistics', 'Statistics', [
    element('div', { className: 'control-row' }, [button('Copy statistics as Markdown', copyMarkdown)]),
    accuracyList(report),
    element('div', { className: 'table-scroll' }, [discriminantTable(report)]),
    element('div', { className: 'table-scroll' }, [multivariateTable(report)]),
    element('div', { className: 'table-scroll' }, [boxMBlock(report)]),
  ]);
}
