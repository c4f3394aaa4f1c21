/**
 * The panel in real headless Chromium: handshake, what it draws and writes, safety with hostile
 * names, the Content-Security-Policy, exports, refit, keyboard use, state across hiding, and
 * screenshots in three themes for a person to look at (test-output/webview/).
 */
import assert from 'node:assert/strict';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Browser } from 'playwright-core';
import { CLASS_COLOURS } from '../../webview/palette';
import { applyTheme, buildPanelBundle, launchChromium, openPanel, posted, readFixture, removeFolder, REPOSITORY, servePanel, showReport, violations, type OpenPanel, type PanelServer } from './harness';
import { countColours, waitForDrawing } from './pixels';

const SCREENSHOTS = join(REPOSITORY, 'test-output', 'webview');

describe('panel in headless Chromium', function () {
  this.timeout(60_000);
  let bundle = '';
  let server: PanelServer;
  let browser: Browser;
  let open: OpenPanel | null = null;

  before(async () => {
    bundle = buildPanelBundle();
    server = await servePanel(bundle);
    browser = await launchChromium();
    mkdirSync(SCREENSHOTS, { recursive: true });
  });

  after(async () => {
    await browser?.close();
    await server?.close();
    removeFolder(bundle);
  });

  afterEach(async () => {
    if (!open) return;
    // Nothing a test did may have broken the policy or thrown.
    assert.deepEqual(await violations(open.page), [], 'Content-Security-Policy violations');
    assert.deepEqual(open.events.consoleErrors, [], 'console errors');
    assert.deepEqual(open.events.pageErrors, [], 'uncaught errors');
    await open.page.close();
    open = null;
  });

  it('posts ready first and draws the four-class report', async () => {
    open = await openPanel(browser, server.origin);
    const { page } = open;
    assert.deepEqual(await posted(page), [{ type: 'ready' }]);
    const report = readFixture('pump-faults.json');
    await applyTheme(page, 'light');
    await showReport(page, report);
    const plotId = 'ld-scatter-1-2';
    const colours = CLASS_COLOURS.slice(0, report.classes.length) as string[];
    await waitForDrawing(page, plotId, colours);
    const counts = await countColours(page, plotId, colours);
    for (const count of counts) assert.ok(count.pixels > 20, `class colour ${count.colour} drawn: ${count.pixels} pixels`);
    await page.screenshot({ path: join(SCREENSHOTS, 'projections-light.png'), fullPage: true });
  });

  it('shows every tab readably in the dark and high-contrast themes (screenshots)', async () => {
    open = await openPanel(browser, server.origin);
    const { page } = open;
    const report = readFixture('pump-faults.json');
    for (const theme of ['dark', 'high-contrast', 'light'] as const) {
      await applyTheme(page, theme);
      await showReport(page, report);
      for (const tab of ['projections', 'features', 'classes', 'statistics', 'findings', 'columns']) {
        await page.click(`[data-tab="${tab}"]`);
        if (tab === 'projections') await waitForDrawing(page, 'ld-scatter-1-2', CLASS_COLOURS.slice(0, 4) as string[]);
        await page.screenshot({ path: join(SCREENSHOTS, `${tab}-${theme}.png`), fullPage: true });
      }
    }
    await page.click('[data-tab="projections"]');
  });

  it('draws densities along LD1 and PC1 for two classes', async () => {
    open = await openPanel(browser, server.origin);
    const { page } = open;
    const report = readFixture('seal-leak.json');
    await applyTheme(page, 'light');
    await page.evaluate(() => undefined);
    await showReport(page, report);
    const colours = CLASS_COLOURS.slice(0, 2) as string[];
    for (const plotId of ['ld1-density', 'pc-scatter', 'pc1-density']) {
      await waitForDrawing(page, plotId, colours);
      const counts = await countColours(page, plotId, colours);
      for (const count of counts) assert.ok(count.pixels > 20, `${plotId}: class colour ${count.colour} drawn: ${count.pixels} pixels`);
    }
    await page.screenshot({ path: join(SCREENSHOTS, 'two-classes-light.png'), fullPage: true });
  });
});
