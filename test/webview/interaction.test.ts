/**
 * Using the panel: exports (SVG parsed by the browser, PNG decoded), copying the statistics, the
 * role form's refit, header commands, keyboard reach and visible focus, zoom and pan, linked
 * highlighting between the two scatters, findings marking columns and rows, and the state that
 * survives the panel being hidden.
 */
import assert from 'node:assert/strict';
import type { Page } from 'playwright-core';
import { isFromPanel, type FromPanel } from '../../src/shared/messages';
import { packReport } from '../../src/shared/packedSample';
import { CLASS_COLOURS } from '../../webview/palette';
import { usePanelBrowser } from './browserSuite';
import { applyTheme, columnsOf, posted, readFixture, send, showReport, storedState } from './harness';
import { findColour, overlayPixels, waitForDrawing } from './pixels';

declare const document: any;
declare const window: any;

const report = readFixture('pump-faults.json');
const COLOURS = CLASS_COLOURS.slice(0, report.classes.length) as string[];
const LD_PLOT = 'ld-scatter-1-2';

/** The last message of a type the panel posted, checked with the host's own guard. */
async function lastPosted<T extends FromPanel['type']>(page: Page, type: T): Promise<Extract<FromPanel, { type: T }>> {
  const message = (await posted(page)).filter((m) => m.type === type).at(-1);
  assert.ok(message !== undefined, `a ${type} message was posted`);
  assert.ok(isFromPanel(message) && message.type === type, `the ${type} message passes the host’s guard: ${JSON.stringify(message).slice(0, 200)}`);
  return message as unknown as Extract<FromPanel, { type: T }>;
}

async function openReport(panels: ReturnType<typeof usePanelBrowser>, storedStateValue?: unknown): Promise<Page> {
  const { page } = await panels.open({ storedState: storedStateValue });
  await applyTheme(page, 'light');
  await showReport(page, report);
  return page;
}

/** Reads a PNG's width and height from its IHDR chunk (PNG specification, section 11.2.2). */
function pngSize(dataUrl: string): { width: number; height: number } {
  assert.match(dataUrl, /^data:image\/png;base64,/);
  const bytes = Buffer.from(dataUrl.slice('data:image/png;base64,'.length), 'base64');
  assert.deepEqual([...bytes.subarray(0, 8)], [137, 80, 78, 71, 13, 10, 26, 10], 'PNG signature');
  assert.equal(bytes.subarray(12, 16).toString('latin1'), 'IHDR');
  return { width: bytes.readUInt32BE(16), height: bytes.readUInt32BE(20) };
}

describe('panel interaction', function () {
  this.timeout(90_000);
  const panels = usePanelBrowser();

  it('exports a plot as an SVG document with one point path per class and every plotted point', async () => {
    const page = await openReport(panels);
    await waitForDrawing(page, LD_PLOT, COLOURS);
    await page.click(`figure[data-plot="${LD_PLOT}"] button:has-text("Export SVG")`);
    const message = await lastPosted(page, 'export');
    assert.equal(message.kind, 'svg');
    assert.equal(message.fileName, `pump-faults-${LD_PLOT}.svg`);
    const parsed = await page.evaluate((text: string) => {
      const doc = new window.DOMParser().parseFromString(text, 'image/svg+xml');
      return {
        error: doc.querySelector('parsererror')?.textContent ?? null,
        root: doc.documentElement.nodeName,
        classes: Array.from(doc.querySelectorAll('path.points'), (p: any) => ({ label: p.getAttribute('data-class'), markers: (p.getAttribute('d').match(/M/g) ?? []).length, fill: p.getAttribute('fill') })),
        ellipses: doc.querySelectorAll('path.ellipse').length,
        centroids: doc.querySelectorAll('path.centroid').length,
      };
    }, message.data);
    assert.equal(parsed.error, null);
    assert.equal(parsed.root, 'svg');
    assert.deepEqual(parsed.classes.map((c) => c.label), report.classes.map((c) => c.label));
    assert.deepEqual(parsed.classes.map((c) => c.fill), COLOURS);
    const perClass = report.classes.map((_, c) => report.sample.classIndex.filter((i) => i === c).length);
    assert.deepEqual(parsed.classes.map((c) => c.markers), perClass, 'every sampled point of each class, at the full view');
    assert.equal(parsed.ellipses, report.classes.length);
    assert.equal(parsed.centroids, report.classes.length);
  });

  it('exports a density plot as an SVG document with a curve and a strip per class', async () => {
    const { page } = await panels.open();
    await applyTheme(page, 'light');
    const twoClasses = readFixture('seal-leak.json');
    await showReport(page, twoClasses);
    await waitForDrawing(page, 'ld1-density', CLASS_COLOURS.slice(0, 2) as string[]);
    await page.click('figure[data-plot="ld1-density"] button:has-text("Export SVG")');
    const message = await lastPosted(page, 'export');
    assert.equal(message.fileName, 'seal-leak-ld1-density.svg');
    const parsed = await page.evaluate((text: string) => {
      const doc = new window.DOMParser().parseFromString(text, 'image/svg+xml');
      return {
        error: doc.querySelector('parsererror')?.textContent ?? null,
        curves: Array.from(doc.querySelectorAll('path.curve'), (p: any) => p.getAttribute('data-class')),
        markers: Array.from(doc.querySelectorAll('path.points'), (p: any) => (p.getAttribute('d').match(/M/g) ?? []).length),
      };
    }, message.data);
    assert.equal(parsed.error, null);
    assert.deepEqual(parsed.curves, twoClasses.classes.map((c) => c.label));
    assert.deepEqual(parsed.markers, twoClasses.classes.map((_, c) => twoClasses.sample.classIndex.filter((i) => i === c).length));
  });

  it('exports a plot as a PNG at twice the screen size', async () => {
    const page = await openReport(panels);
    await waitForDrawing(page, 'pc-scatter', COLOURS);
    const width = await page.evaluate(() => document.querySelector('figure[data-plot="pc-scatter"] .plot-box').clientWidth as number);
    await page.click('figure[data-plot="pc-scatter"] button:has-text("Export PNG")');
    const message = await lastPosted(page, 'export');
    assert.equal(message.kind, 'png');
    assert.equal(message.fileName, 'pump-faults-pc-scatter.png');
    const size = pngSize(message.data);
    assert.equal(size.width, 2 * width);
    assert.ok(size.height > 2 * 300, `height ${size.height}`);
  });

  it('copies the statistics as Markdown', async () => {
    const page = await openReport(panels);
    await page.click('[data-tab="statistics"]');
    await page.click('button:has-text("Copy statistics as Markdown")');
    const message = await lastPosted(page, 'export');
    assert.equal(message.kind, 'markdown');
    assert.match(message.data, /Wilks/);
    assert.ok(message.data.includes(report.classes[0].label));
  });

  it('posts the role form’s choices on Refit, and refuses an empty feature list', async () => {
    const page = await openReport(panels);
    await page.click('[data-tab="columns"]');
    const form = page.locator('.role-form');
    await form.locator('label:has-text("Solver") + select').selectOption('shrinkage');
    await form.locator('label:has-text("Priors") + select').selectOption('uniform');
    await form.locator('label:has-text("Missing values") + select').selectOption('drop-columns');
    await form.locator('label:has-text("Cross-validation") + select').selectOption('kfold');
    await form.locator('label:has-text("Folds") + input').fill('5');
    await form.locator(`input[type="checkbox"][value="${report.features[0]}"]`).uncheck();
    await form.locator('button:has-text("Refit")').click();
    const message = await lastPosted(page, 'refit');
    assert.deepEqual(message.options, { label: report.label, features: report.features.slice(1), solver: 'shrinkage', priors: 'uniform', cv: 'kfold:5', missing: 'drop-columns' });
    // The host answers with a result fitted with those options: they are no longer pending edits.
    assert.ok(((await storedState(page)) as { roleEdits: unknown }).roleEdits, 'the edits are kept until refitted');
    const refitted = { ...report, solver: 'shrinkage' as const, options: { ...report.options, solver: 'shrinkage' as const, priors: 'uniform' as const, cv: 'kfold:5' as const, missing: 'drop-columns' as const } };
    await send(page, { type: 'result', report: packReport(refitted), columns: columnsOf(report), options: message.options });
    await page.waitForSelector('.verdict-sentence');
    assert.equal(((await storedState(page)) as { roleEdits: unknown }).roleEdits, null);
    await page.click('[data-tab="columns"]');
    assert.equal(await form.locator('label:has-text("Solver") + select').inputValue(), 'shrinkage', 'the form shows the options of the result');
    await form.locator('button:has-text("Untick all")').click();
    assert.equal(await form.locator('button:has-text("Refit")').isDisabled(), true);
    assert.match((await form.locator('.form-problem').textContent()) ?? '', /at least one feature/);
  });

  it('sends the header’s commands and reveals a misclassified row', async () => {
    const page = await openReport(panels);
    await page.click('button:has-text("Generate fit script")');
    assert.deepEqual(await lastPosted(page, 'command'), { type: 'command', command: 'generateScript' });
    await page.click('button:has-text("Compare with HEAD")');
    assert.deepEqual(await lastPosted(page, 'command'), { type: 'command', command: 'compareWithHead' });
    await page.click('[data-tab="classes"]');
    await page.click('table.misclassified-table button >> nth=0');
    const first = report.misclassified[0];
    const reveal = await lastPosted(page, 'revealRow');
    assert.deepEqual(reveal, first.line === undefined ? { type: 'revealRow', row: first.row } : { type: 'revealRow', row: first.row, line: first.line });
  });

  it('is usable from the keyboard with a visible focus', async () => {
    const page = await openReport(panels);
    const reached: string[] = [];
    const outlines: string[] = [];
    for (let i = 0; i < 60; i++) {
      await page.keyboard.press('Tab');
      if (await page.evaluate(() => document.activeElement === document.body)) break;
      const focus = await page.evaluate(() => {
        const node = document.activeElement;
        const style = window.getComputedStyle(node);
        return { what: `${node.tagName.toLowerCase()}${node.dataset.tab ? `[tab=${node.dataset.tab}]` : ''}${node.dataset.plot ? `[plot=${node.dataset.plot}]` : ''}:${(node.textContent ?? '').trim().slice(0, 30)}`, outline: `${style.outlineStyle} ${style.outlineWidth}` };
      });
      reached.push(focus.what);
      outlines.push(focus.outline);
    }
    for (const expected of ['button:Generate fit script', 'button[tab=projections]:Projections', `canvas[plot=${LD_PLOT}]:`, 'button:Export SVG', 'canvas[plot=pc-scatter]:']) {
      assert.ok(reached.includes(expected), `Tab reaches ${expected}; reached ${reached.join(' | ')}`);
    }
    assert.ok(!reached.some((r) => r.includes('[tab=features]')), 'only the selected tab is a tab stop');
    outlines.forEach((outline, i) => assert.match(outline, /^solid [1-9]/, `focus visible on ${reached[i]}: ${outline}`));

    // Arrow keys move between tabs; Enter and Space press buttons.
    await page.focus('[data-tab="projections"]');
    await page.keyboard.press('ArrowRight');
    assert.equal(await page.getAttribute('[data-tab="features"]', 'aria-selected'), 'true');
    assert.equal(await page.evaluate(() => document.activeElement.dataset.tab), 'features');
    await page.keyboard.press('End');
    assert.equal(await page.getAttribute('[data-tab="columns"]', 'aria-selected'), 'true');
    await page.keyboard.press('Home');
    await page.focus(`figure[data-plot="${LD_PLOT}"] button:has-text("Export SVG")`);
    await page.keyboard.press('Enter');
    assert.equal((await lastPosted(page, 'export')).kind, 'svg');
    await page.focus('figure[data-plot="pc-scatter"] button:has-text("Export SVG")');
    await page.keyboard.press('Space');
    assert.equal((await lastPosted(page, 'export')).fileName, 'pump-faults-pc-scatter.svg');
  });

  it('zooms with + and −, pans with the arrows, resets with 0, and keeps the view in the state', async () => {
    const page = await openReport(panels);
    await waitForDrawing(page, LD_PLOT, COLOURS);
    const canvas = `figure[data-plot="${LD_PLOT}"] canvas.plot-overlay`;
    await page.focus(canvas);
    await page.keyboard.press('+');
    await page.keyboard.press('+');
    await page.waitForTimeout(400);
    const zoomed = ((await storedState(page)) as { views: Record<string, { x0: number; x1: number; y0: number; y1: number }> }).views[LD_PLOT];
    assert.ok(zoomed, 'the zoom is stored');
    await page.keyboard.press('ArrowRight');
    await page.waitForTimeout(400);
    const panned = ((await storedState(page)) as { views: Record<string, { x0: number; x1: number }> }).views[LD_PLOT];
    const width = zoomed.x1 - zoomed.x0;
    assert.ok(Math.abs(panned.x0 - zoomed.x0 - 0.1 * width) < 1e-9 * width, 'the arrow key pans by a tenth');
    await page.keyboard.press('-');
    await page.waitForTimeout(400);
    const out = ((await storedState(page)) as { views: Record<string, { x0: number; x1: number }> }).views[LD_PLOT];
    assert.ok(Math.abs(out.x1 - out.x0 - width / 0.8) < 1e-9 * width, 'minus zooms out by the same step');
    await page.keyboard.press('0');
    await page.waitForTimeout(50);
    assert.equal(((await storedState(page)) as { views: Record<string, unknown> }).views[LD_PLOT], undefined, '0 resets');

    // The wheel zooms about the pointer, a drag pans.
    const box = await page.locator(canvas).boundingBox();
    assert.ok(box);
    await page.mouse.move(box.x + box.width / 2, box.y + box.height / 2);
    await page.mouse.wheel(0, -300);
    await page.waitForTimeout(400);
    const wheeled = ((await storedState(page)) as { views: Record<string, { x0: number; x1: number }> }).views[LD_PLOT];
    assert.ok(wheeled, 'the wheel zoomed');
    await page.mouse.down();
    await page.mouse.move(box.x + box.width / 2 + 60, box.y + box.height / 2, { steps: 5 });
    await page.mouse.up();
    await page.waitForTimeout(400);
    const dragged = ((await storedState(page)) as { views: Record<string, { x0: number; x1: number }> }).views[LD_PLOT];
    assert.ok(dragged.x0 < wheeled.x0, 'dragging right shows what lies to the left');
    assert.ok(Math.abs(dragged.x1 - dragged.x0 - (wheeled.x1 - wheeled.x0)) < 1e-9 * (wheeled.x1 - wheeled.x0), 'a drag keeps the zoom');
  });

  it('links hover and selection between the two scatters', async () => {
    const page = await openReport(panels);
    await waitForDrawing(page, LD_PLOT, COLOURS);
    await waitForDrawing(page, 'pc-scatter', COLOURS);
    assert.equal(await overlayPixels(page, 'pc-scatter'), 0, 'nothing highlighted yet');
    const spot = await findColour(page, LD_PLOT, COLOURS[0]);
    assert.ok(spot, 'a point of the first class is visible');
    const box = await page.locator(`figure[data-plot="${LD_PLOT}"] canvas.plot-overlay`).boundingBox();
    assert.ok(box);
    await page.mouse.move(box.x + spot.x, box.y + spot.y);
    await page.waitForSelector(`figure[data-plot="${LD_PLOT}"] .plot-tooltip:not([hidden])`);
    const tooltip = (await page.textContent(`figure[data-plot="${LD_PLOT}"] .plot-tooltip`)) ?? '';
    assert.match(tooltip, /^Row [\d,]+ · line [\d,]+class /);
    for (const name of report.sample.topFeatures.names) assert.ok(tooltip.includes(`${name} = `), `the tooltip shows ${name}`);
    assert.ok((await overlayPixels(page, 'pc-scatter')) > 0, 'the same row is ringed in the PCA scatter');
    assert.ok((await overlayPixels(page, LD_PLOT)) > 0);

    await page.mouse.down();
    await page.mouse.up();
    const heading = (await page.textContent('.point-detail strong')) ?? '';
    const rowNumber = Number(/^Row ([\d,]+)/.exec(heading)?.[1].replace(/,/g, ''));
    const index = report.sample.rows.indexOf(rowNumber - 1);
    assert.ok(index >= 0, `the selected row ${rowNumber} is a sampled row`);
    assert.ok(heading.includes(`line ${report.sample.lines?.[index]}`));
    await page.mouse.move(box.x + 2, box.y + 2);
    assert.ok((await overlayPixels(page, 'pc-scatter')) > 0, 'the selection stays ringed after the pointer leaves');
    await page.click('.point-detail button');
    assert.deepEqual(await lastPosted(page, 'revealRow'), { type: 'revealRow', row: report.sample.rows[index], line: report.sample.lines?.[index] });
  });

  it('marks the columns and rows of a selected finding', async () => {
    const { page } = await panels.open();
    await applyTheme(page, 'light');
    const report = readFixture('pump-faults-defects.json');
    await showReport(page, report);
    const withColumns = report.findings.findIndex((f) => (f.columns?.length ?? 0) > 0 && report.features.includes(f.columns![0]));
    assert.ok(withColumns >= 0, 'the fixture has a finding that names a feature');
    const finding = report.findings[withColumns];
    await page.click('[data-tab="findings"]');
    await page.click(`.finding[data-code="${finding.code}"]`);
    assert.equal(await page.getAttribute(`.finding[data-code="${finding.code}"]`, 'aria-pressed'), 'true');
    await page.click('[data-tab="features"]');
    const marked = await page.$$eval('table.feature-table tr.is-marked', (rows) => rows.map((r: any) => r.dataset.feature));
    assert.deepEqual(marked.sort(), finding.columns!.filter((c) => report.univariate.some((u) => u.feature === c)).sort());

    const withRows = report.findings.findIndex((f) => (f.rows ?? []).some((row) => report.sample.rows.includes(row)));
    if (withRows >= 0) {
      await page.click('[data-tab="findings"]');
      const toggle = `.finding[data-index="${withRows}"]`;
      if ((await page.getAttribute(toggle, 'aria-pressed')) !== 'true') await page.click(toggle);
      await page.click('button:has-text("Show in the plots")');
      assert.equal(await page.getAttribute('[data-tab="projections"]', 'aria-selected'), 'true');
      await waitForDrawing(page, LD_PLOT, COLOURS);
      await page.waitForTimeout(100);
      assert.ok((await overlayPixels(page, LD_PLOT)) > 0, 'the finding’s rows are ringed');
      // Selecting it again clears the marks.
      await page.click('[data-tab="findings"]');
      await page.click(toggle);
      await page.click('[data-tab="projections"]');
      await page.waitForTimeout(100);
      assert.equal(await overlayPixels(page, LD_PLOT), 0, 'no ring left');
    }
  });

  it('comes back as it was left after being hidden', async () => {
    const first = await openReport(panels);
    await first.click('[data-tab="classes"]');
    await first.click('.segment[data-kind="training"]');
    await first.click('[data-tab="columns"]');
    await first.locator('.role-form label:has-text("Solver") + select').selectOption('exact');
    await first.click('[data-tab="projections"]');
    await waitForDrawing(first, LD_PLOT, COLOURS);
    const spot = await findColour(first, LD_PLOT, COLOURS[1]);
    const box = await first.locator(`figure[data-plot="${LD_PLOT}"] canvas.plot-overlay`).boundingBox();
    assert.ok(spot && box);
    await first.mouse.click(box.x + spot.x, box.y + spot.y);
    const selected = (await first.textContent('.point-detail strong')) ?? '';
    assert.match(selected, /^Row /);
    await first.focus(`figure[data-plot="${LD_PLOT}"] canvas.plot-overlay`);
    await first.keyboard.press('+');
    await first.waitForTimeout(400);
    await first.click('[data-tab="statistics"]');
    const state = await storedState(first);

    // A hidden webview is destroyed; shown again, it starts from the stored state.
    const second = await openReport(panels, state);
    assert.equal(await second.getAttribute('[data-tab="statistics"]', 'aria-selected'), 'true');
    await second.click('[data-tab="classes"]');
    assert.equal(await second.getAttribute('.segment[data-kind="training"]', 'aria-pressed'), 'true');
    await second.click('[data-tab="columns"]');
    assert.equal(await second.locator('.role-form label:has-text("Solver") + select').inputValue(), 'exact');
    await second.click('[data-tab="projections"]');
    assert.equal((await second.textContent('.point-detail strong')) ?? '', selected, 'the selected row is selected again');
    const view = ((await storedState(second)) as { views: Record<string, unknown> }).views[LD_PLOT];
    assert.deepEqual(view, (state as { views: Record<string, unknown> }).views[LD_PLOT]);
  });
});
