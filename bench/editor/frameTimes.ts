/**
 * Frame times of the panel's discriminant scatter plot while it is panned and zoomed, in Debian's
 * headless Chromium (the webview test harness: the real bundle, page and Content-Security-Policy).
 * The stored report of the sample data gets a plot sample of N invented points (pump-fault
 * clusters in LD and PC space, from a seeded generator); a requestAnimationFrame loop in the page
 * records each frame's timestamp while the mouse drags and wheels over the plot for a few
 * seconds; the frame time is the interval between consecutive frames. Measured, not estimated.
 *
 * Run by bench.ts as its own bundle (the webview harness finds the repository from where its
 * bundle lies): node out/bench/editor/frameTimes.js --points 50000,1000000 --seconds 5
 */
import type { Page } from 'playwright-core';
import type { FitReport } from '../../src/core/types';
import { buildPanelBundle, launchChromium, openPanel, readFixture, removeFolder, servePanel, showReport } from '../../test/webview/harness';

declare const window: any;
declare const document: any;
declare const requestAnimationFrame: any;

export interface FrameTimes {
  points: number;
  frames: number;
  p50: number;
  p95: number;
  max: number;
  /** Seconds from the result message to the drawn plot. */
  firstDrawSeconds: number;
}

/** The stored report with a plot sample of `points` invented points. */
export function reportWithPoints(points: number): FitReport {
  const report = readFixture('pump-faults.json');
  const K = report.classes.length;
  let state = 12345;
  const uniform = (): number => {
    state = (state * 48271) % 2147483647;
    return state / 2147483647;
  };
  const normal = (): number => Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
  const axes = Math.min(3, report.discriminant.eigenvalues.length);
  // Above 100 000 points the tooltip's feature values are left out and the scores rounded to four
  // decimals: the message stays well under the page's string limits, and the drawing is the same.
  const lean = points > 100_000;
  const round = (v: number): number => (lean ? Math.round(v * 1e4) / 1e4 : v);
  const names = lean ? [] : report.sample.topFeatures.names;
  const sample: FitReport['sample'] = { total: points, rows: [], lines: [], classIndex: [], ld: [], pc: [], topFeatures: { names, values: [] } };
  const top = names.length;
  for (let i = 0; i < points; i++) {
    const c = i % K;
    sample.rows.push(i);
    sample.lines!.push(i + 2);
    sample.classIndex.push(c);
    sample.ld.push(Array.from({ length: axes }, (_, a) => round(3 * Math.cos(c + a) + normal())));
    sample.pc.push([round(2 * Math.sin(c) + 1.5 * normal()), round(normal())]);
    sample.topFeatures.values.push(Array.from({ length: top }, () => Math.round(1000 * normal()) / 1000));
  }
  return { ...report, options: { ...report.options, plotBudget: points }, rows: { ...report.rows, total: points, used: points, dropped: 0 }, sample };
}

/** Pans and zooms the first plot for about `seconds`, recording frame timestamps in the page. */
async function interact(page: Page, seconds: number): Promise<number[]> {
  const canvas = page.locator('.plot canvas.plot-overlay').first();
  await canvas.scrollIntoViewIfNeeded();
  const box = (await canvas.boundingBox())!;
  const cx = box.x + box.width / 2;
  const cy = box.y + box.height / 2;
  await page.evaluate(() => {
    window.__frames = [];
    window.__recording = true;
    const tick = (time: number): void => {
      window.__frames.push(time);
      if (window.__recording) requestAnimationFrame(tick);
    };
    requestAnimationFrame(tick);
  });
  const end = Date.now() + seconds * 1000;
  let step = 0;
  await page.mouse.move(cx, cy);
  while (Date.now() < end) {
    // A drag in a small circle, then a few wheel steps in and out about the pointer.
    await page.mouse.down();
    for (let i = 0; i < 12; i++) {
      const angle = (2 * Math.PI * i) / 12;
      await page.mouse.move(cx + 60 * Math.cos(angle), cy + 40 * Math.sin(angle));
    }
    await page.mouse.up();
    for (let i = 0; i < 4; i++) await page.mouse.wheel(0, step % 2 === 0 ? -120 : 120);
    step++;
  }
  return page.evaluate(() => {
    window.__recording = false;
    return window.__frames as number[];
  });
}

export async function measureFrames(pointCounts: number[], seconds: number): Promise<FrameTimes[]> {
  const bundle = buildPanelBundle();
  const server = await servePanel(bundle);
  const browser = await launchChromium();
  const results: FrameTimes[] = [];
  try {
    for (const points of pointCounts) {
      const { page } = await openPanel(browser, server.origin, { width: 1400, height: 1000 });
      const report = reportWithPoints(points);
      const started = Date.now();
      await showReport(page, report);
      await page.waitForFunction(() => document.querySelectorAll('.plot canvas').length > 0);
      // Two frames later the first drawing is on the screen.
      await page.evaluate(() => new Promise((done) => requestAnimationFrame(() => requestAnimationFrame(done))));
      const firstDrawSeconds = (Date.now() - started) / 1000;
      const stamps = await interact(page, seconds);
      const intervals = stamps.slice(1).map((t, i) => t - stamps[i]!).sort((a, b) => a - b);
      const at = (q: number): number => intervals[Math.min(intervals.length - 1, Math.floor(q * intervals.length))] ?? NaN;
      results.push({ points, frames: intervals.length, p50: at(0.5), p95: at(0.95), max: intervals[intervals.length - 1] ?? NaN, firstDrawSeconds });
      await page.close();
    }
  } finally {
    await browser.close();
    await server.close();
    removeFolder(bundle);
  }
  return results;
}

if (require.main === module) {
  const argument = (name: string, fallback: string): string => {
    const at = process.argv.indexOf(`--${name}`);
    return at >= 0 && at + 1 < process.argv.length ? process.argv[at + 1]! : fallback;
  };
  measureFrames(argument('points', '50000').split(',').map(Number), Number(argument('seconds', '4')))
    .then((results) => process.stdout.write(`${JSON.stringify(results)}\n`))
    .catch((error: unknown) => {
      console.error(error);
      process.exit(1);
    });
}
