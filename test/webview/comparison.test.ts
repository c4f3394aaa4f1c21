/**
 * The panel's comparison view in headless Chromium: the gates, the changes in words and the
 * figures side by side as the core computes them, and both fits' projections drawn on the same
 * axis scale. The reports are real fits (analyze() run here on the sample table and on edited
 * copies of it), not hand-written.
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { analyze } from '../../src/core/analyze';
import { compareFile, compareReports, figureRows } from '../../src/core/compare/index';
import { memorySource } from '../../src/core/source';
import type { FitReport } from '../../src/core/types';
import type { ComparisonMessage } from '../../src/shared/messages';
import { packReport, unpackReport } from '../../src/shared/packedSample';
import { CLASS_COLOURS } from '../../webview/palette';
import { sampleTable, withLeakingColumn, withRelabelledClass, withRowsRemoved } from '../core/compareRepository';
import { SCREENSHOTS, usePanelBrowser } from './browserSuite';
import { columnsOf, optionsOf, send } from './harness';
import { waitForDrawing } from './pixels';

declare const document: any;

async function fit(name: string, text: string): Promise<FitReport> {
  return (await analyze(memorySource(name, new TextEncoder().encode(text)))).report;
}

function comparisonMessage(baseName: string, base: FitReport, head: FitReport): ComparisonMessage {
  const comparison = compareFile({ base: { name: baseName }, head: { name: head.source.name }, baseReport: base, headReport: head, rules: [] });
  if (comparison.status !== 'compared') throw new Error('one-sided');
  return {
    type: 'comparison',
    baseName,
    base: packReport(base),
    head: packReport(head),
    changes: comparison.changes.map((c) => c.text),
    gates: comparison.gates.outcomes.map((o) => ({ rule: o.rule, passed: o.passed, detail: o.detail })),
  };
}

async function showComparison(page: Page, message: ComparisonMessage): Promise<void> {
  await send(page, { type: 'init', fileName: 'pump-faults.csv', settings: { plotBudget: 50_000 } });
  const head = unpackReport(message.head);
  await send(page, { type: 'result', report: message.head, columns: columnsOf(head), options: optionsOf(head) });
  await send(page, message);
  await page.waitForSelector('.comparison');
}

/** Which pixels of a plot's canvas are not the background (drawn points, centroids, ellipses, axes). */
async function drawnMask(page: Page, plotId: string): Promise<{ width: number; height: number; drawn: boolean[] }> {
  return page.evaluate((id) => {
    const canvas = document.querySelector(`figure[data-plot="${id}"] canvas.plot-canvas:not(.plot-overlay)`);
    const { width, height } = canvas;
    const data = canvas.getContext('2d').getImageData(0, 0, width, height).data;
    const background = [data[0], data[1], data[2], data[3]];
    const drawn: boolean[] = [];
    for (let o = 0; o < data.length; o += 4) drawn.push(Math.abs(data[o] - background[0]) + Math.abs(data[o + 1] - background[1]) + Math.abs(data[o + 2] - background[2]) + Math.abs(data[o + 3] - background[3]) > 30);
    return { width, height, drawn };
  }, plotId);
}

describe('panel comparison view', function () {
  this.timeout(120_000);
  const panels = usePanelBrowser();
  let base: FitReport;
  let edited: FitReport;
  let relabelled: FitReport;

  before(async () => {
    const table = sampleTable('pump-faults.csv');
    base = await fit('HEAD:data/pump-faults.csv', table);
    edited = await fit('pump-faults.csv', withLeakingColumn(withRowsRemoved(table)));
    relabelled = await fit('pump-faults.csv', withRelabelledClass(table));
  });

  it('shows the gates, the changes in words and the figures side by side as the core computes them', async () => {
    const { page } = await panels.open({ width: 1300, height: 1600 });
    const message = comparisonMessage('HEAD:data/pump-faults.csv', base, edited);
    await showComparison(page, message);
    assert.equal(await page.textContent('.comparison .section-title'), 'Compared with HEAD:data/pump-faults.csv');
    assert.match((await page.textContent('.comparison-gates-summary')) ?? '', /^Gates pass \(2\)$/);
    assert.deepEqual(await page.locator('.comparison .changes li').allTextContents(), message.changes);
    const expected = figureRows(base, edited, compareReports(base, edited));
    const shown = await page.$$eval('table.comparison-table', (tables: any[]) => {
      const figures = tables.find((t) => t.caption?.textContent === 'Key figures before and now');
      return Array.from(figures.tBodies[0].rows, (row: any) => Array.from(row.cells, (cell: any) => cell.textContent));
    });
    assert.deepEqual(shown, expected.map((r) => [r.name, r.base, r.head, r.change]));
    for (const id of ['compare-base-ld', 'compare-head-ld', 'compare-base-pc', 'compare-head-pc']) await waitForDrawing(page, id, CLASS_COLOURS.slice(0, 4));
    await page.locator('.comparison-projections').scrollIntoViewIfNeeded();
    await page.screenshot({ path: join(SCREENSHOTS, 'comparison.png'), fullPage: true });
  });

  it('draws base and head on the same scale: a relabelled copy covers the same pixels', async () => {
    const { page } = await panels.open({ width: 1300, height: 1600 });
    const message = comparisonMessage('HEAD:data/pump-faults.csv', base, relabelled);
    await showComparison(page, message);
    // The renamed class is a class of its own on each side, so the legend lists five.
    assert.deepEqual(await page.locator('.comparison-projections .legend-label').allTextContents(), [...relabelled.classes.map((c) => c.label), 'cavitation']);
    for (const id of ['compare-base-ld', 'compare-head-ld']) await waitForDrawing(page, id, CLASS_COLOURS.slice(0, 5));
    for (const pair of [['compare-base-ld', 'compare-head-ld'], ['compare-base-pc', 'compare-head-pc']]) {
      const [left, right] = [await drawnMask(page, pair[0]!), await drawnMask(page, pair[1]!)];
      assert.equal(left.width, right.width);
      let differ = 0;
      let drawn = 0;
      left.drawn.forEach((d, i) => {
        if (d || right.drawn[i]) drawn++;
        if (d !== right.drawn[i]) differ++;
      });
      assert.ok(drawn > 1000, `${pair[0]} drew something`);
      // Same rows, same scores (signs aligned), same ranges: only the marker shape of the renamed class differs.
      assert.ok(differ / drawn < 0.08, `${pair.join(' vs ')}: ${differ} of ${drawn} drawn pixels differ`);
    }
  });
});
