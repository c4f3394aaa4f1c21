/**
 * Light, dark and high-contrast themes: every tab is photographed for a person to look at
 * (test-output/webview/), and the text the panel writes is checked for contrast against what is
 * behind it — WCAG 2's ratio, at least 4.5:1 for text (WCAG 2.1, success criterion 1.4.3).
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { CLASS_COLOURS } from '../../webview/palette';
import { SCREENSHOTS, usePanelBrowser } from './browserSuite';
import { applyTheme, columnsOf, optionsOf, readFixture, send, showReport } from './harness';
import type { ThemeName } from './themes';
import { waitForDrawing } from './pixels';

declare const document: any;
declare const window: any;

const TABS = ['projections', 'features', 'classes', 'statistics', 'findings', 'columns'];

/** The lowest contrast ratio among the visible text of the selector's elements, with the worst one named. */
async function lowestContrast(page: Page, selector: string): Promise<{ ratio: number; text: string }> {
  return page.evaluate((selector: string) => {
    const parse = (text: string): number[] => {
      const m = /rgba?\(([\d.]+),\s*([\d.]+),\s*([\d.]+)(?:,\s*([\d.]+))?\)/.exec(text);
      return m ? [Number(m[1]), Number(m[2]), Number(m[3]), m[4] === undefined ? 1 : Number(m[4])] : [0, 0, 0, 0];
    };
    // WCAG 2 relative luminance and contrast ratio.
    const luminance = (c: number[]): number => {
      const channel = (v: number): number => {
        const s = v / 255;
        return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
      };
      return 0.2126 * channel(c[0]) + 0.7152 * channel(c[1]) + 0.0722 * channel(c[2]);
    };
    const over = (top: number[], bottom: number[]): number[] => [0, 1, 2].map((i) => top[3] * top[i] + (1 - top[3]) * bottom[i]).concat(1);
    const background = (node: any): number[] => {
      const layers: number[][] = [];
      for (let n = node; n; n = n.parentElement) {
        const colour = parse(window.getComputedStyle(n).backgroundColor);
        if (colour[3] > 0) layers.push(colour);
        if (colour[3] === 1) break;
      }
      let result = [255, 255, 255, 1];
      for (const layer of layers.reverse()) result = over(layer, result);
      return result;
    };
    let worst = { ratio: Infinity, text: '' };
    for (const node of Array.from(document.querySelectorAll(selector)) as any[]) {
      if (!node.offsetParent || !(node.textContent ?? '').trim()) continue;
      const style = window.getComputedStyle(node);
      const back = background(node);
      const fore = over(parse(style.color), back);
      const [a, b] = [luminance(fore), luminance(back)].sort((x, y) => y - x);
      const ratio = (a + 0.05) / (b + 0.05);
      if (ratio < worst.ratio) worst = { ratio, text: `${(node.textContent ?? '').trim().slice(0, 40)} (${style.color} on rgb(${back.slice(0, 3).map(Math.round).join(', ')}))` };
    }
    return worst;
  }, selector);
}

const TEXT_SELECTORS: Record<string, string> = {
  projections: '.verdict-sentence, .facts dt, .facts dd, .tab, .plot-title, .plot-hint, .sample-note, .legend-label, button',
  features: '.data-table th, .data-table td, caption, select',
  classes: '.data-table th, .data-table td.heat-cell, .data-table td, .segment, .link-button',
  statistics: '.data-table th, .data-table td, caption, .facts dd',
  findings: '.severity, .finding-code, .finding-message, .note',
  columns: 'label, legend, select, button, .field-hint',
};

describe('panel themes', function () {
  this.timeout(120_000);
  const panels = usePanelBrowser();
  const report = readFixture('pump-faults.json');

  for (const theme of ['light', 'dark', 'high-contrast'] as ThemeName[]) {
    it(`is readable in the ${theme} theme (and photographed)`, async () => {
      const { page } = await panels.open();
      await applyTheme(page, theme);
      await showReport(page, report);
      for (const tab of TABS) {
        await page.click(`[data-tab="${tab}"]`);
        if (tab === 'projections') await waitForDrawing(page, 'ld-scatter-1-2', CLASS_COLOURS.slice(0, report.classes.length) as string[]);
        if (tab === 'findings' && report.findings.length > 0) await page.click('.finding >> nth=0');
        await page.screenshot({ path: join(SCREENSHOTS, `${tab}-${theme}.png`), fullPage: true });
        const worst = await lowestContrast(page, TEXT_SELECTORS[tab]);
        assert.ok(worst.ratio >= 4.5, `${theme}, ${tab}: contrast ${worst.ratio.toFixed(2)} for ${worst.text}`);
      }
      // The file with planted defects: many findings of every severity, removed features.
      await showReport(page, readFixture('pump-faults-defects.json'));
      for (const tab of ['findings', 'features']) {
        await page.click(`[data-tab="${tab}"]`);
        if (tab === 'findings') await page.click('.finding >> nth=1');
        await page.screenshot({ path: join(SCREENSHOTS, `defects-${tab}-${theme}.png`), fullPage: true });
        const worst = await lowestContrast(page, TEXT_SELECTORS[tab]);
        assert.ok(worst.ratio >= 4.5, `${theme}, defects ${tab}: contrast ${worst.ratio.toFixed(2)} for ${worst.text}`);
      }
    });
  }

  it('switches theme while open, redrawing the plots in the new colours', async () => {
    const { page } = await panels.open();
    await applyTheme(page, 'light');
    await showReport(page, report);
    await waitForDrawing(page, 'ld-scatter-1-2', CLASS_COLOURS.slice(0, 4) as string[]);
    const corner = async (): Promise<number[]> =>
      page.evaluate(() => Array.from(document.querySelector('figure[data-plot="ld-scatter-1-2"] canvas.plot-canvas').getContext('2d').getImageData(2, 2, 1, 1).data as number[]));
    assert.deepEqual((await corner()).slice(0, 3), [255, 255, 255]);
    await applyTheme(page, 'dark');
    await page.waitForFunction(() => document.querySelector('figure[data-plot="ld-scatter-1-2"] canvas.plot-canvas')?.getContext('2d').getImageData(2, 2, 1, 1).data[0] === 0x1f);
    assert.deepEqual((await corner()).slice(0, 3), [0x1f, 0x1f, 0x1f]);
  });

  it('photographs the two-class, narrow and error layouts', async () => {
    const { page } = await panels.open({ width: 620, height: 900 });
    await applyTheme(page, 'dark');
    await showReport(page, readFixture('seal-leak.json'));
    await waitForDrawing(page, 'ld1-density', CLASS_COLOURS.slice(0, 2) as string[]);
    await page.screenshot({ path: join(SCREENSHOTS, 'two-classes-narrow-dark.png'), fullPage: true });
    await send(page, {
      type: 'error',
      code: 'one-class',
      message: "pump-faults.csv: the label column 'pump_id' has one class only.",
      hint: 'Choose another label column.',
      columns: columnsOf(report),
      options: optionsOf(report),
    });
    await page.waitForSelector('.error-view');
    await page.screenshot({ path: join(SCREENSHOTS, 'error-narrow-dark.png'), fullPage: true });
    const worst = await lowestContrast(page, '.error-view p, .error-view h2, .error-view label');
    assert.ok(worst.ratio >= 4.5, `error view contrast ${worst.ratio.toFixed(2)} for ${worst.text}`);
  });
});
