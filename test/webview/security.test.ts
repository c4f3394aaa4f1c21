/**
 * Data strings are text, never markup: a report whose file, column and class names are HTML with
 * script payloads is drawn with those names visible as text, no element created from them and no
 * script run. The page's Content-Security-Policy is really enforced (a deliberate inline script is
 * reported), so the "no violation" check after every test can fail. And the panel's sources use no
 * HTML-parsing API at all.
 */
import assert from 'node:assert/strict';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import type { FitReport } from '../../src/core/types';
import { usePanelBrowser } from './browserSuite';
import { applyTheme, columnsOf, optionsOf, posted, readFixture, REPOSITORY, send, violations } from './harness';
import { packReport } from '../../src/shared/packedSample';

declare const document: any;
declare const window: any;

const PAYLOADS = ['<img src=x onerror=alert(1)>', '<svg onload=alert(2)>', '"><script>alert(3)</script>', "'><iframe src=javascript:alert(4)>"];

/** The report with every column and class name replaced by a markup payload (each one distinct). */
function hostileReport(report: FitReport): { report: FitReport; names: Map<string, string> } {
  const names = new Map<string, string>();
  const originals = [report.label, ...report.features, ...report.removedFeatures.map((r) => r.feature), ...report.classes.map((c) => c.label), ...report.sample.topFeatures.names];
  for (const name of originals) if (!names.has(name)) names.set(name, `${PAYLOADS[names.size % PAYLOADS.length]}${names.size}`);
  const replace = (value: unknown): unknown => {
    if (typeof value === 'string') return names.get(value) ?? value;
    if (Array.isArray(value)) return value.map(replace);
    if (value && typeof value === 'object') return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, replace(v)]));
    return value;
  };
  const hostile = replace(report) as FitReport;
  hostile.source = { ...hostile.source, name: '<img src=x onerror=alert(5)>.csv' };
  hostile.findings = [
    ...hostile.findings,
    { code: 'possible-leakage', severity: 'warning', message: `Column ${names.get(report.features[0])} separates the classes alone.`, columns: [names.get(report.features[0]) as string], rows: report.sample.rows.slice(0, 3) },
  ];
  return { report: hostile, names };
}

function sourceFiles(folder: string): string[] {
  return readdirSync(folder).flatMap((name) => {
    const path = join(folder, name);
    return statSync(path).isDirectory() ? sourceFiles(path) : /\.ts$/.test(name) ? [path] : [];
  });
}

describe('panel safety', function () {
  this.timeout(90_000);
  const panels = usePanelBrowser();

  it('shows hostile names as text in every tab and runs nothing', async () => {
    const { page, events } = await panels.open();
    await applyTheme(page, 'dark');
    const { report, names } = hostileReport(readFixture('pump-faults.json'));
    await send(page, { type: 'init', fileName: '<img src=x onerror=alert(6)>.csv', settings: { plotBudget: 50_000 } });
    await send(page, { type: 'result', report: packReport(report), columns: columnsOf(report), options: optionsOf(report) });
    await page.waitForSelector('.verdict-sentence');
    for (const tab of ['projections', 'features', 'classes', 'statistics', 'findings', 'columns']) {
      await page.click(`[data-tab="${tab}"]`);
      await page.waitForTimeout(50);
    }
    await page.click('[data-tab="findings"]');
    await page.click('.finding[data-code="possible-leakage"] >> nth=-1');
    await page.click('[data-tab="projections"]');
    // Hover and click where points are, so the tooltip and the selected-row box show names too.
    const box = await page.locator('figure[data-plot="ld-scatter-1-2"] canvas.plot-overlay').boundingBox();
    assert.ok(box);
    for (let i = 0; i < 40; i++) {
      await page.mouse.move(box.x + box.width * (0.2 + (0.6 * i) / 40), box.y + box.height * 0.5);
      if (await page.locator('.plot-tooltip:not([hidden])').count()) break;
    }
    await page.mouse.down();
    await page.mouse.up();
    await page.click('.plot-toolbar button:has-text("Export SVG") >> nth=0');

    const created = await page.evaluate(() => ({
      elements: document.querySelectorAll('img, iframe, script:not([src]), svg[onload], [onerror], [onload]').length,
      scripts: document.querySelectorAll('script').length,
      text: document.body.textContent as string,
    }));
    assert.equal(created.elements, 0, 'no element made from a name');
    assert.equal(created.scripts, 1, 'only the panel script');
    for (const hostile of names.values()) assert.ok(created.text.includes(hostile), `${hostile} is shown as text`);
    assert.ok(created.text.includes('<img src=x onerror=alert(6)>.csv'), 'the file name is shown as text');
    assert.deepEqual(events.dialogs, [], 'no dialog opened');

    const svg = (await posted(page)).find((m) => m.type === 'export' && m.kind === 'svg') as { data: string } | undefined;
    assert.ok(svg);
    const parsed = await page.evaluate((text: string) => {
      const doc = new window.DOMParser().parseFromString(text, 'image/svg+xml');
      return { error: doc.querySelector('parsererror')?.textContent ?? null, legend: Array.from(doc.querySelectorAll('text'), (t: { textContent: string }) => t.textContent), scripts: doc.querySelectorAll('script, [onload], [onerror], img, iframe').length };
    }, svg.data);
    assert.equal(parsed.error, null, 'the SVG with hostile names is well formed');
    assert.equal(parsed.scripts, 0);
    for (const c of report.classes) assert.ok(parsed.legend.includes(c.label), `legend text ${c.label}`);
  });

  it('has the policy enforced, so a violation would be seen', async () => {
    const { page, events } = await panels.open();
    await page.evaluate(() => {
      const script = document.createElement('script');
      script.textContent = 'window.__inlineRan = true';
      document.body.appendChild(script);
      document.body.setAttribute('style', 'color: red');
    });
    await page.waitForTimeout(100);
    const seen = await violations(page);
    assert.ok(seen.some((v) => v.startsWith('script-src')), `inline script reported: ${seen.join('; ')}`);
    assert.ok(seen.some((v) => v.startsWith('style-src')), `inline style reported: ${seen.join('; ')}`);
    assert.equal(await page.evaluate(() => window.__inlineRan === true), false, 'the inline script did not run');
    assert.equal(events.consoleErrors.filter((m) => /Content Security Policy/.test(m)).length, 2, 'the console reports both');
    // Clear what this test caused on purpose; the suite's after-each check then looks at the rest.
    events.consoleErrors.length = 0;
    await page.evaluate(() => {
      window.__violations = [];
      document.body.removeAttribute('style');
    });
  });

  it('uses no HTML-parsing or code-evaluating API in the panel sources', () => {
    const forbidden = /\.(innerHTML|outerHTML)\s*=|insertAdjacentHTML|document\.write|createContextualFragment|\beval\s*\(|new Function\s*\(|setAttribute\(\s*['"](style|on\w+)['"]/;
    const files = [...sourceFiles(join(REPOSITORY, 'webview')), join(REPOSITORY, 'src', 'shared', 'messages.ts')];
    assert.ok(files.length > 20, 'the panel sources were found');
    for (const file of files) {
      const text = readFileSync(file, 'utf8');
      const match = forbidden.exec(text);
      assert.equal(match, null, `${file} uses ${match?.[0]}`);
    }
  });
});
