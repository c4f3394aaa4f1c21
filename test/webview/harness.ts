/**
 * The panel in Debian's headless Chromium, the way VS Code shows it: the page from buildPanelHtml
 * (same Content-Security-Policy), the bundle built from the current sources, served from a small
 * HTTP server on 127.0.0.1, and a stand-in for `acquireVsCodeApi` that records what the panel posts.
 * No browser is downloaded: playwright-core drives /usr/bin/chromium.
 */
import { spawnSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';
import { buildPanelHtml } from '../../src/shared/panelHtml';
import type { FitReport } from '../../src/core/types';
import type { ColumnChoice, EditableOptions, ToPanel } from '../../src/shared/messages';
import { packReport } from '../../src/shared/packedSample';
import { THEMES, type ThemeName } from './themes';

// Code passed to page.evaluate runs in the browser; the Node type-check has no DOM library, so the
// page globals are declared loosely here (module scope only).
declare const document: any;
declare const window: any;

export const REPOSITORY = resolve(__dirname, '..', '..', '..');
export const CHROMIUM = '/usr/bin/chromium';
const CHROMIUM_ARGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'];

/** Bundles webview/main.ts as esbuild.mjs does, into a fresh folder, so the tests see the current sources. */
export function buildPanelBundle(): string {
  const outdir = mkdtempSync(join(tmpdir(), 'scatterwise-panel-'));
  const script = `require('esbuild').build({ entryPoints: { webview: 'webview/main.ts' }, bundle: true, platform: 'browser', format: 'iife', target: 'es2022', outdir: ${JSON.stringify(outdir)}, logLevel: 'error' }).catch(() => process.exit(1))`;
  const run = spawnSync(process.execPath, ['-e', script], { cwd: REPOSITORY, encoding: 'utf8' });
  if (run.status !== 0) throw new Error(`Building the panel failed:\n${run.stderr}`);
  return outdir;
}

export interface PanelServer {
  origin: string;
  close(): Promise<void>;
}

/** Serves the panel page (a new nonce per request) and the two bundle files. */
export async function servePanel(bundleDir: string): Promise<PanelServer> {
  let origin = '';
  const server: Server = createServer((request, response) => {
    const path = (request.url ?? '/').split('?')[0];
    if (path === '/') {
      const html = buildPanelHtml({ cspSource: origin, nonce: randomBytes(16).toString('base64'), scriptUri: `${origin}/dist/webview.js`, styleUri: `${origin}/dist/webview.css`, title: 'Panel under test' });
      response.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
      response.end(html);
      return;
    }
    const files: Record<string, [string, string]> = {
      '/dist/webview.js': ['webview.js', 'text/javascript'],
      '/dist/webview.css': ['webview.css', 'text/css'],
    };
    const file = files[path];
    if (path === '/favicon.ico') {
      // Chromium asks for one on its own; a webview has none.
      response.writeHead(204).end();
      return;
    }
    if (!file) {
      response.writeHead(404).end();
      return;
    }
    response.writeHead(200, { 'content-type': file[1] });
    response.end(readFileSync(join(bundleDir, file[0])));
  });
  await new Promise<void>((done) => server.listen(0, '127.0.0.1', done));
  origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  return { origin, close: () => new Promise<void>((done) => server.close(() => done())) };
}

export function launchChromium(): Promise<Browser> {
  return chromium.launch({ executablePath: CHROMIUM, args: CHROMIUM_ARGS });
}

/** Records what the page does that a test may want to forbid. */
export interface PageEvents {
  dialogs: string[];
  consoleErrors: string[];
  pageErrors: string[];
}

export interface OpenPanel {
  page: Page;
  events: PageEvents;
}

/**
 * Opens the panel page with the fake webview API. `storedState` is what getState returns (as after
 * the panel was hidden). Posted messages collect in window.__posted, setState calls in window.__state,
 * Content-Security-Policy violations in window.__violations.
 */
export async function openPanel(browser: Browser, origin: string, options: { storedState?: unknown; width?: number; height?: number; pixelRatio?: number } = {}): Promise<OpenPanel> {
  const page = await browser.newPage({ viewport: { width: options.width ?? 1200, height: options.height ?? 900 }, deviceScaleFactor: options.pixelRatio ?? 1 });
  const events: PageEvents = { dialogs: [], consoleErrors: [], pageErrors: [] };
  page.on('dialog', (dialog) => {
    events.dialogs.push(dialog.message());
    void dialog.dismiss();
  });
  page.on('console', (message) => {
    if (message.type() === 'error' || /Content.Security.Policy/i.test(message.text())) events.consoleErrors.push(message.text());
  });
  page.on('pageerror', (error) => events.pageErrors.push(String(error)));
  await page.addInitScript((stored) => {
    const record = window as unknown as { __posted: unknown[]; __state: unknown; __violations: string[] };
    record.__posted = [];
    record.__state = stored;
    record.__violations = [];
    document.addEventListener('securitypolicyviolation', (event: { violatedDirective: string; blockedURI: string }) => {
      record.__violations.push(`${event.violatedDirective}: ${event.blockedURI}`);
    });
    let acquired = false;
    (window as unknown as { acquireVsCodeApi: () => unknown }).acquireVsCodeApi = () => {
      if (acquired) throw new Error('acquireVsCodeApi called twice');
      acquired = true;
      return {
        postMessage: (message: unknown) => record.__posted.push(JSON.parse(JSON.stringify(message))),
        getState: () => record.__state,
        setState: (state: unknown) => {
          record.__state = JSON.parse(JSON.stringify(state));
        },
      };
    };
  }, options.storedState);
  await page.goto(`${origin}/`);
  await page.waitForFunction(() => (window as unknown as { __posted: unknown[] }).__posted.length > 0);
  return { page, events };
}

/** Sets the theme the way VS Code does: variables on <html>, a theme class on <body>. */
export async function applyTheme(page: Page, name: ThemeName): Promise<void> {
  const theme = THEMES[name];
  await page.evaluate((t) => {
    // VS Code replaces the whole set of variables on a theme change.
    document.documentElement.removeAttribute('style');
    for (const [key, value] of Object.entries(t.variables)) document.documentElement.style.setProperty(key, value);
    document.body.className = t.bodyClass;
    document.body.dataset.vscodeThemeKind = t.kind;
  }, theme);
}

/**
 * Delivers a host message to the panel as VS Code does (a window message event, whose data is a
 * structured clone: typed arrays arrive as typed arrays of the same kind).
 */
export async function send(page: Page, message: ToPanel): Promise<void> {
  // As text, typed arrays in base64: Playwright's structured argument passing is slow for large arrays.
  const text = JSON.stringify(message, (_key, value: unknown) =>
    ArrayBuffer.isView(value) ? { $typedArray: value.constructor.name, base64: Buffer.from(value.buffer, value.byteOffset, value.byteLength).toString('base64') } : value,
  );
  await page.evaluate((json: string) => {
    const revive = (_key: string, value: any): unknown => {
      if (typeof value !== 'object' || value === null || typeof value.$typedArray !== 'string') return value;
      const binary = atob(value.base64);
      const bytes = new Uint8Array(binary.length);
      for (let i = 0; i < binary.length; i++) bytes[i] = binary.charCodeAt(i);
      return new window[value.$typedArray](bytes.buffer);
    };
    window.postMessage(JSON.parse(json, revive), '*');
  }, text);
}

export async function posted(page: Page): Promise<Record<string, unknown>[]> {
  return page.evaluate(() => (window as unknown as { __posted: Record<string, unknown>[] }).__posted);
}

export async function violations(page: Page): Promise<string[]> {
  return page.evaluate(() => (window as unknown as { __violations: string[] }).__violations);
}

export async function storedState(page: Page): Promise<unknown> {
  return page.evaluate(() => (window as unknown as { __state: unknown }).__state);
}

export function readFixture(name: string): FitReport {
  return JSON.parse(readFileSync(join(REPOSITORY, 'test', 'fixtures', 'reports', name), 'utf8')) as FitReport;
}

/** The column list a host would send with a report: the label as text, the features as numeric. */
export function columnsOf(report: FitReport): ColumnChoice[] {
  return [
    ...report.features.map((name): ColumnChoice => ({ name, kind: 'numeric', distinct: 1000 })),
    ...report.removedFeatures.map((r): ColumnChoice => ({ name: r.feature, kind: 'numeric', distinct: 1000 })),
    { name: report.label, kind: 'text', distinct: report.classes.length },
  ];
}

export function optionsOf(report: FitReport): EditableOptions {
  const { solver, priors, cv, missing } = report.options;
  return { label: report.label, features: [...report.features], solver, priors, cv, missing };
}

/** Sends init and result for a report, as the host does after `ready`. */
export async function showReport(page: Page, report: FitReport, fileName = report.source.name): Promise<void> {
  await send(page, { type: 'init', fileName, settings: { plotBudget: report.options.plotBudget } });
  await send(page, { type: 'result', report: packReport(report), columns: columnsOf(report), options: optionsOf(report) });
  await page.waitForSelector('.verdict-sentence');
}

export function removeFolder(path: string): void {
  rmSync(path, { recursive: true, force: true });
}
