/**
 * What the panel writes and draws for stored reports, read back from the page: the handshake, the
 * verdict and facts, the statistics, confusion and per-class tables (numbers parsed back from the
 * text and compared with the report), the plots' pixels, and the provisional, error, progress and
 * comparison states.
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { verdict } from '../../src/core/format/verdict';
import type { FitReport } from '../../src/core/types';
import { CLASS_COLOURS } from '../../webview/palette';
import { SCREENSHOTS, usePanelBrowser } from './browserSuite';
import { applyTheme, columnsOf, optionsOf, posted, readFixture, send, showReport } from './harness';
import { packReport } from '../../src/shared/packedSample';
import { countColours, waitForDrawing } from './pixels';

declare const document: any;
declare const window: any;

/** A number as the panel prints it (thousands commas, typographic minus, %, exponent) → a float. */
function parseShown(text: string): number {
  const cleaned = text.trim().replace(/,/g, '').replace(/−/g, '-').replace(/%$/, '');
  const value = Number(cleaned);
  assert.ok(Number.isFinite(value), `"${text}" is a number`);
  return text.trim().endsWith('%') ? value / 100 : value;
}

/** The shown text agrees with the value to the digits shown (half a unit in the last place, relative). */
function assertShows(text: string, value: number, what: string): void {
  const trimmed = text.trim();
  if (trimmed.startsWith('<')) {
    assert.ok(value < parseShown(trimmed.slice(1)), `${what}: ${value} is below ${trimmed}`);
    return;
  }
  const shown = parseShown(trimmed);
  const digits = trimmed.replace(/e.*$/i, '').replace(/[^0-9]/g, '').replace(/^0+/, '').length || 1;
  const percent = trimmed.endsWith('%');
  const decimals = (/\.(\d+)/.exec(trimmed.replace(/e.*$/i, ''))?.[1].length ?? 0) + (percent ? 2 : 0);
  const tolerance = /e/i.test(trimmed) ? Math.abs(shown) * 0.5 * 10 ** (1 - digits) : 0.5 * 10 ** -decimals;
  assert.ok(Math.abs(shown - value) <= tolerance * (1 + 1e-9), `${what}: shown ${trimmed}, report ${value}`);
}

async function tableText(page: Page, selector: string): Promise<string[][]> {
  return page.$$eval(`${selector} tbody tr`, (rows) => rows.map((row) => Array.from((row as { cells: ArrayLike<{ textContent: string | null }> }).cells, (cell) => cell.textContent ?? '')));
}

describe('panel rendering', function () {
  this.timeout(60_000);
  const panels = usePanelBrowser();
  const report = readFixture('pump-faults.json');

  it('posts ready first and nothing before the host answers', async () => {
    const { page } = await panels.open();
    await page.waitForTimeout(200);
    assert.deepEqual(await posted(page), [{ type: 'ready' }]);
    await send(page, { type: 'init', fileName: 'pump-faults.csv', settings: { plotBudget: 50_000 } });
    assert.deepEqual(await posted(page), [{ type: 'ready' }], 'init asks for nothing back');
  });

  it('ignores messages that are not in the contract', async () => {
    const { page } = await panels.open();
    await page.evaluate(() => {
      const target = globalThis as unknown as { postMessage: (m: unknown, o: string) => void };
      target.postMessage({ type: 'result', report: {}, columns: 'no', options: {} }, '*');
      target.postMessage({ type: 'surprise' }, '*');
      target.postMessage('result', '*');
    });
    await page.waitForTimeout(100);
    assert.equal(await page.locator('.verdict').count(), 0);
    assert.match((await page.textContent('#app')) ?? '', /Waiting for the analysis/);
  });

  it('states the verdict and the figures it rests on', async () => {
    const { page } = await panels.open();
    await showReport(page, report);
    assert.equal((await page.textContent('.verdict-sentence'))?.trim(), verdict(report));
    const cv = report.accuracy.crossValidated;
    assert.ok(cv, 'the fixture was cross-validated');
    assert.ok((await page.textContent('.verdict-sentence'))?.includes(`${(cv.value * 100).toFixed(1)}%`));
    const facts = (await page.textContent('.facts')) ?? '';
    for (const c of report.classes) assert.ok(facts.includes(`${c.label} (${c.count.toLocaleString('en-US')})`), `class ${c.label} with its count`);
    assert.ok(facts.includes(`${report.rows.used.toLocaleString('en-US')} used of ${report.rows.total.toLocaleString('en-US')}`));
    assert.ok(facts.includes(`${report.features.length} used`));
    assert.equal(await page.locator('.provisional-mark').count(), 0);
    const shown = (await page.textContent('.sample-note')) ?? '';
    assert.ok(shown.includes(`Showing ${report.sample.rows.length.toLocaleString('en-US')} of ${report.sample.total.toLocaleString('en-US')} rows`), shown);
  });

  it('draws every class in both scatters, with axis titles carrying the explained ratios', async () => {
    const { page } = await panels.open();
    await applyTheme(page, 'light');
    await showReport(page, report);
    const colours = CLASS_COLOURS.slice(0, report.classes.length) as string[];
    for (const plotId of ['ld-scatter-1-2', 'pc-scatter']) {
      await waitForDrawing(page, plotId, colours);
      for (const count of await countColours(page, plotId, colours)) assert.ok(count.pixels > 20, `${plotId}: colour ${count.colour} has ${count.pixels} pixels`);
    }
    const label = (await page.getAttribute('figure[data-plot="ld-scatter-1-2"] canvas.plot-overlay', 'aria-label')) ?? '';
    const ld1 = `LD1 (${(report.discriminant.explainedRatio[0] * 100).toFixed(1)}% of separation)`;
    const pc1 = `PC1 (${(report.pca.explainedRatio[0] * 100).toFixed(1)}% of variance)`;
    assert.ok(label.includes(ld1), `the plot's text alternative names ${ld1}: ${label}`);
    assert.ok(((await page.getAttribute('figure[data-plot="pc-scatter"] canvas.plot-overlay', 'aria-label')) ?? '').includes(pc1));
  });

  it('draws at the device pixel ratio, so the points stay sharp on a high-density screen', async () => {
    const { page } = await panels.open({ pixelRatio: 2 });
    await applyTheme(page, 'light');
    await showReport(page, report);
    const colours = CLASS_COLOURS.slice(0, report.classes.length) as string[];
    await waitForDrawing(page, 'ld-scatter-1-2', colours);
    const size = await page.evaluate(() => {
      const canvas = document.querySelector('figure[data-plot="ld-scatter-1-2"] canvas.plot-canvas');
      return { backing: canvas.width, css: canvas.getBoundingClientRect().width, ratio: window.devicePixelRatio };
    });
    assert.equal(size.ratio, 2);
    assert.equal(size.backing, 2 * Math.round(size.css));
    for (const count of await countColours(page, 'ld-scatter-1-2', colours)) assert.ok(count.pixels > 80, `colour ${count.colour}: ${count.pixels} pixels`);
    await page.screenshot({ path: join(SCREENSHOTS, 'projections-light-2x.png') });
  });

  it('lets another pair of discriminants be chosen when there are three or more', async () => {
    const { page } = await panels.open();
    await applyTheme(page, 'light');
    await showReport(page, report);
    assert.ok(report.discriminant.eigenvalues.length >= 3, 'the fixture has at least three discriminants');
    await page.selectOption('#panel-projections select >> nth=1', '2');
    await page.waitForSelector('figure[data-plot="ld-scatter-1-3"]');
    await waitForDrawing(page, 'ld-scatter-1-3', CLASS_COLOURS.slice(0, report.classes.length) as string[]);
    assert.equal(await page.locator('figure[data-plot="ld-scatter-1-2"]').count(), 0);
  });

  it('shows the statistics of the report', async () => {
    const { page } = await panels.open();
    await showReport(page, report);
    await page.click('[data-tab="statistics"]');
    const tests = await tableText(page, 'table.multivariate-table');
    const expected = [report.tests.wilks, report.tests.pillai, report.tests.hotellingLawley, report.tests.roy];
    assert.equal(tests.length, 4);
    tests.forEach((cells, i) => {
      assertShows(cells[1], expected[i].statistic, `${cells[0]} statistic`);
      assertShows(cells[2], expected[i].F, `${cells[0]} F`);
      assertShows(cells[5], expected[i].p, `${cells[0]} p`);
    });
    assert.match(tests[0][0], /Wilks/);
    const discriminants = await tableText(page, 'table.discriminant-table');
    assert.equal(discriminants.length, report.discriminant.eigenvalues.length);
    discriminants.forEach((cells, j) => {
      assertShows(cells[1], report.discriminant.eigenvalues[j], `eigenvalue ${j + 1}`);
      assertShows(cells[2], report.discriminant.explainedRatio[j], `explained ${j + 1}`);
      assertShows(cells[8], report.tests.bartlett[j].p, `Bartlett p ${j + 1}`);
    });
    const box = report.tests.boxM;
    if (box) {
      const rows = await tableText(page, 'table.box-m-table');
      assertShows(rows[0][1], box.M, "Box's M");
      assertShows(rows[0][4], box.p, "Box's M p (χ²)");
      assertShows(rows[1][4], box.pF, "Box's M p (F)");
    }
  });

  it('shows both confusion matrices cell by cell, and per-class precision and recall', async () => {
    const { page } = await panels.open();
    await applyTheme(page, 'light');
    await showReport(page, report);
    await page.click('[data-tab="classes"]');
    const check = async (matrix: number[][], what: string): Promise<void> => {
      const rows = await tableText(page, 'table.confusion-grid');
      assert.equal(rows.length, matrix.length);
      rows.forEach((cells, i) => {
        matrix[i].forEach((count, j) => assert.equal(parseShown(cells[j + 1]), count, `${what} [${i}][${j}]`));
        assert.equal(parseShown(cells[matrix.length + 1]), matrix[i].reduce((a, b) => a + b, 0));
      });
    };
    assert.ok(report.crossValidatedConfusion);
    await check(report.crossValidatedConfusion.matrix, 'cross-validated');
    await page.click('.segment[data-kind="training"]');
    await check(report.confusion.matrix, 'training');
    const perClass = await tableText(page, 'table.per-class-table');
    report.perClass.forEach((p, i) => {
      assert.ok(perClass[i][0].includes(p.label));
      assertShows(perClass[i][3], p.precision, `precision ${p.label}`);
      assertShows(perClass[i][4], p.recall, `recall ${p.label}`);
      if (p.cvRecall !== null) assertShows(perClass[i][5], p.cvRecall, `CV recall ${p.label}`);
    });
    const distances = await tableText(page, 'table.distance-grid');
    report.centroidDistances.matrix.forEach((row, i) => row.forEach((d, j) => i !== j && assertShows(distances[i][j + 1], d, `distance ${i},${j}`)));
  });

  it('ranks the features by univariate F', async () => {
    const { page } = await panels.open();
    await showReport(page, report);
    await page.click('[data-tab="features"]');
    const rows = await tableText(page, 'table.feature-table');
    const ranked = [...report.univariate].sort((a, b) => b.F - a.F);
    assert.deepEqual(rows.map((cells) => cells[0]), ranked.map((u) => u.feature));
    rows.forEach((cells, i) => assertShows(cells[1], ranked[i].F, `F of ${ranked[i].feature}`));
    const first = report.features.indexOf(ranked[0].feature);
    assertShows(rows[0][4], report.discriminant.standardizedCoefficients[first][0], 'standardized coefficient');
    assertShows(rows[0][5], report.discriminant.structure[first][0], 'structure correlation');
  });

  it('draws densities along LD1 and PC1 for two classes', async () => {
    const { page } = await panels.open();
    await applyTheme(page, 'light');
    const twoClasses = readFixture('seal-leak.json');
    assert.equal(twoClasses.classes.length, 2);
    await showReport(page, twoClasses);
    const colours = CLASS_COLOURS.slice(0, 2) as string[];
    for (const plotId of ['ld1-density', 'pc-scatter', 'pc1-density']) {
      await waitForDrawing(page, plotId, colours);
      for (const count of await countColours(page, plotId, colours)) assert.ok(count.pixels > 20, `${plotId}: colour ${count.colour} has ${count.pixels} pixels`);
    }
  });

  it('marks a provisional report with the share of the file it rests on', async () => {
    const { page } = await panels.open();
    const provisional: FitReport = { ...report, provisional: true, source: { ...report.source, bytes: 310_000_000, bytesRead: 8_388_608 } };
    await showReport(page, provisional);
    const mark = (await page.textContent('.provisional-mark')) ?? '';
    assert.match(mark, /^Provisional — from the first 8\.4 MB of 310 MB/);
  });

  it('shows an error with its hint, and the role form to fix the label', async () => {
    const { page } = await panels.open();
    await send(page, { type: 'init', fileName: 'pump-faults.csv', settings: { plotBudget: 50_000 } });
    await send(page, {
      type: 'error',
      code: 'one-class',
      message: "pump-faults.csv: the label column 'pump_id' has one class only.",
      hint: 'Choose another label column.',
      columns: [...columnsOf(report), { name: 'pump_id', kind: 'text', distinct: 1 }],
      options: { ...optionsOf(report), label: 'pump_id' },
    });
    await page.waitForSelector('.error-view');
    assert.equal((await page.textContent('.error-message'))?.trim(), "pump-faults.csv: the label column 'pump_id' has one class only.");
    assert.equal((await page.textContent('.error-hint'))?.trim(), 'Choose another label column.');
    const options = await page.locator('.error-view .role-form select').first().locator('option').allTextContents();
    assert.ok(options.some((o) => o.startsWith('fault ')) && options.some((o) => o.startsWith('pump_id ')));
    await page.locator('.error-view .role-form select').first().selectOption('fault');
    await page.click('.error-view button:has-text("Refit")');
    const refit = (await posted(page)).find((m) => m.type === 'refit') as { options: { label: string } } | undefined;
    assert.equal(refit?.options.label, 'fault');
  });

  it('shows progress with a cancel button, and the result replaces it', async () => {
    const { page } = await panels.open();
    await send(page, { type: 'init', fileName: 'pump-faults.csv', settings: { plotBudget: 50_000 } });
    await send(page, { type: 'progress', phase: 'moments', fraction: 0.42 });
    await page.waitForSelector('.progress-strip');
    assert.match((await page.textContent('.progress-strip')) ?? '', /42%/);
    assert.equal(await page.getAttribute('.progress-strip progress', 'value'), '42');
    await page.click('.progress-strip button');
    assert.deepEqual((await posted(page)).at(-1), { type: 'command', command: 'cancel' });
    await showReport(page, report);
    assert.equal(await page.locator('.progress-strip').count(), 0);
  });

  it('shows a comparison: the changes, then the figures before and now', async () => {
    const { page } = await panels.open();
    const base: FitReport = { ...report, accuracy: { ...report.accuracy, training: 0.5 } };
    await send(page, { type: 'init', fileName: 'pump-faults.csv', settings: { plotBudget: 50_000 } });
    await send(page, { type: 'comparison', baseName: 'HEAD', base: packReport(base), head: packReport(report), changes: ['Training accuracy rose from 50.0%.'] });
    await page.waitForSelector('.comparison');
    assert.equal((await page.textContent('.comparison .changes li'))?.trim(), 'Training accuracy rose from 50.0%.');
    const rows = await tableText(page, 'table.comparison-table');
    const training = rows.find((cells) => cells[0] === 'Training accuracy');
    assert.ok(training);
    assert.equal(training[1], '50.0%');
    assertShows(training[2], report.accuracy.training, 'training accuracy now');
    assert.equal(await page.locator('.verdict').count(), 1, 'the current report follows');
  });

  it('shows the planted defects: dropped rows, removed features, findings by severity, Box’s M skipped', async () => {
    const { page } = await panels.open();
    const defects = readFixture('pump-faults-defects.json');
    await showReport(page, defects);
    const facts = (await page.textContent('.facts')) ?? '';
    assert.ok(facts.includes(`${defects.rows.dropped.toLocaleString('en-US')} dropped`), facts);
    if (defects.removedFeatures.length) assert.ok(facts.includes(`${defects.removedFeatures.length} removed before solving`));
    await page.click('[data-tab="features"]');
    const removed = await page.locator('.removed-features li').allTextContents();
    assert.deepEqual(removed, defects.removedFeatures.map((r) => `${r.feature} — ${r.reason}`));
    await page.click('[data-tab="findings"]');
    const codes = await page.$$eval('.finding', (nodes) => nodes.map((n: any) => ({ code: n.dataset.code, severity: n.querySelector('.severity').textContent, message: n.querySelector('.finding-message').textContent })));
    assert.equal(codes.length, defects.findings.length);
    const order = ['Error', 'Warning', 'Note'];
    for (let i = 1; i < codes.length; i++) assert.ok(order.indexOf(codes[i - 1].severity) <= order.indexOf(codes[i].severity), 'errors first, then warnings, then notes');
    for (const finding of defects.findings) assert.ok(codes.some((c) => c.code === finding.code && c.message === finding.message), `finding ${finding.code} shown with its message`);
    assert.match((await page.textContent('[data-tab="findings"]')) ?? '', new RegExp(`Findings \\(${defects.findings.length}`));
    if (!defects.tests.boxM) {
      await page.click('[data-tab="statistics"]');
      assert.equal(await page.locator('.box-m-skipped').count(), 1);
    }
  });
});
