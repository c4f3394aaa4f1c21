/**
 * Mocha hooks shared by the panel suites: build the bundle, serve it, start Chromium once per
 * suite, and after every test check the opened pages for Content-Security-Policy violations,
 * console errors and uncaught exceptions before closing them.
 */
import assert from 'node:assert/strict';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { Browser } from 'playwright-core';
import { buildPanelBundle, launchChromium, openPanel, removeFolder, REPOSITORY, servePanel, violations, type OpenPanel, type PanelServer } from './harness';

/** Where the screenshots go (git-ignored), for a person to look at. */
export const SCREENSHOTS = join(REPOSITORY, 'test-output', 'webview');

export interface PanelBrowser {
  open(options?: { storedState?: unknown; width?: number; height?: number; pixelRatio?: number }): Promise<OpenPanel>;
}

export function usePanelBrowser(): PanelBrowser {
  let bundle = '';
  let server: PanelServer | undefined;
  let browser: Browser | undefined;
  let opened: OpenPanel[] = [];

  before(async function () {
    this.timeout(60_000);
    bundle = buildPanelBundle();
    server = await servePanel(bundle);
    browser = await launchChromium();
    mkdirSync(SCREENSHOTS, { recursive: true });
  });

  after(async () => {
    await browser?.close();
    await server?.close();
    if (bundle) removeFolder(bundle);
  });

  afterEach(async () => {
    const pages = opened;
    opened = [];
    for (const { page, events } of pages) {
      try {
        assert.deepEqual(await violations(page), [], 'Content-Security-Policy violations reported in the page');
        assert.deepEqual(events.consoleErrors, [], 'console errors');
        assert.deepEqual(events.pageErrors, [], 'uncaught errors');
        assert.deepEqual(events.dialogs, [], 'dialogs opened');
      } finally {
        await page.close();
      }
    }
  });

  return {
    async open(options = {}) {
      if (!browser || !server) throw new Error('the browser suite is not started');
      const panel = await openPanel(browser, server.origin, options);
      opened.push(panel);
      return panel;
    },
  };
}
