// The core runs in a browser as it runs in Node: the same analysis of the same bytes, bundled for
// the browser and run in Debian's headless Chromium (no Node globals such as Buffer or process),
// gives the same figures as in Node. Catches a library's Node-only build slipping into the core.
import * as assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as esbuild from 'esbuild';
import type { Browser } from 'playwright-core';
import { analyze } from '../../src/core/analyze';
import { memorySource } from '../../src/core/source';
import type { FitReport } from '../../src/core/types';
import { launchChromium, REPOSITORY } from './harness';

declare const window: any;

const ENTRY = `
import { analyze } from './src/core/analyze';
import { memorySource } from './src/core/source';
window.analyzeInPage = async (name, bytes, options) => {
  const { report } = await analyze(memorySource(name, new Uint8Array(bytes)), options);
  return JSON.stringify(report);
};
`;

describe('the core in a browser', function () {
  this.timeout(120_000);
  let browser: Browser;
  let bundle: string;

  before(async () => {
    const built = await esbuild.build({ stdin: { contents: ENTRY, resolveDir: REPOSITORY, loader: 'ts' }, bundle: true, platform: 'browser', format: 'iife', write: false, logLevel: 'silent' });
    bundle = built.outputFiles[0]!.text;
    browser = await launchChromium();
  });
  after(async () => browser?.close());

  for (const [file, options] of [
    ['pump-faults.csv', { cv: 'loo' }],
    ['pump-faults.parquet', { cv: 'kfold:5' }],
    ['pump-faults-defects.csv', { cv: 'loo' }],
  ] as const) {
    it(`${file}: the figures computed in Chromium equal those computed in Node`, async () => {
      const bytes = readFileSync(join(REPOSITORY, 'sample-workspace', 'data', file));
      const node = (await analyze(memorySource(file, bytes), options)).report;
      const page = await browser.newPage();
      const errors: string[] = [];
      page.on('pageerror', (error) => errors.push(error.message));
      await page.setContent('<!doctype html><title>core</title>');
      await page.addScriptTag({ content: bundle });
      assert.equal(await page.evaluate(() => typeof window.Buffer), 'undefined', 'the page has no Node globals');
      const text = await page.evaluate(([name, data, opts]) => window.analyzeInPage(name, data, opts), [file, [...bytes], options] as const);
      const browserReport = JSON.parse(text) as FitReport;
      await page.close();
      assert.deepEqual(errors, []);
      assert.deepEqual(browserReport.rows, node.rows);
      assert.deepEqual(browserReport.features, node.features);
      assert.deepEqual(browserReport.discriminant.eigenvalues, node.discriminant.eigenvalues);
      assert.deepEqual(browserReport.accuracy, node.accuracy);
      assert.deepEqual(browserReport.confusion, node.confusion);
      assert.deepEqual(browserReport.findings.map((f) => f.code), node.findings.map((f) => f.code));
    });
  }
});
