/**
 * What the extension tests share: the running extension's API, waiting for panel messages,
 * closing editors, and screenshots of the workbench (taken by runInServer.mjs on request).
 */
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { ScatterwiseApi } from '../../src/extension/extension';
import type { ErrorMessage, ResultMessage, ToPanel } from '../../src/shared/messages';

export const EXTENSION_ID = 'scatterwise.scatterwise';
export const EDITOR_VIEW_TYPE = 'scatterwise.separability';

export async function scatterwise(): Promise<ScatterwiseApi> {
  const extension = vscode.extensions.getExtension<ScatterwiseApi>(EXTENSION_ID);
  if (!extension) throw new Error(`${EXTENSION_ID} is not installed in this host`);
  return extension.activate();
}

/** A file of the sample workspace (the folder the runner opens). */
export function sampleFile(name: string): vscode.Uri {
  const folder = vscode.workspace.workspaceFolders?.[0];
  if (!folder) throw new Error('the tests need the sample-workspace folder open');
  return vscode.Uri.joinPath(folder.uri, 'data', name);
}

/** Resolves with the first message posted for `uri` (now or later) that `accept` takes. */
export function nextMessage<T extends ToPanel>(
  api: ScatterwiseApi,
  uri: vscode.Uri,
  accept: (message: ToPanel) => message is T,
  timeoutMs = 60_000,
  skip = 0,
): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const earlier = api.messagesFor(uri).slice(skip).find(accept);
    if (earlier) return resolve(earlier);
    const timer = setTimeout(() => {
      subscription.dispose();
      const seen = api.messagesFor(uri).map((message) => message.type).join(', ');
      reject(new Error(`no such message for ${path.basename(uri.path)} within ${timeoutMs} ms (seen: ${seen || 'none'})`));
    }, timeoutMs);
    const subscription = api.onDidPost(({ uri: posted, message }) => {
      if (posted.toString() !== uri.toString() || !accept(message)) return;
      clearTimeout(timer);
      subscription.dispose();
      resolve(message);
    });
  });
}

export const isFinalResult = (message: ToPanel): message is ResultMessage => message.type === 'result' && !message.report.provisional;
export const isProvisionalResult = (message: ToPanel): message is ResultMessage => message.type === 'result' && message.report.provisional;
export const isError = (message: ToPanel): message is ErrorMessage => message.type === 'error';

/** Opens `uri` in the separability editor and waits for its final result (or error). */
export async function openAndWait(api: ScatterwiseApi, uri: vscode.Uri, timeoutMs = 60_000): Promise<ResultMessage | ErrorMessage> {
  const skip = api.messagesFor(uri).length;
  await vscode.commands.executeCommand('vscode.openWith', uri, EDITOR_VIEW_TYPE);
  return nextMessage(api, uri, (message): message is ResultMessage | ErrorMessage => isFinalResult(message) || isError(message), timeoutMs, skip);
}

export async function closeAllEditors(): Promise<void> {
  await vscode.commands.executeCommand('workbench.action.closeAllEditors');
}

export function activeTabInput(): unknown {
  return vscode.window.tabGroups.activeTabGroup.activeTab?.input;
}

export { waitUntil } from '../waitUntil';

/** Asks the runner for a screenshot of the workbench; undefined when the host is not run by runInServer.mjs. */
export async function screenshot(name: string): Promise<string | undefined> {
  const service = process.env.SCATTERWISE_SCREENSHOT_URL;
  if (!service) return undefined;
  const response = await fetch(`${service}?name=${encodeURIComponent(name)}`);
  if (!response.ok) throw new Error(`screenshot failed: ${response.status} ${await response.text()}`);
  return ((await response.json()) as { file: string }).file;
}

/**
 * Clicks, with the mouse, the first visible element of the workbench that matches `selector` (and
 * holds `text`); false when the host is not run by runInServer.mjs.
 */
export async function clickInWorkbench(selector: string, text?: string): Promise<boolean> {
  const service = process.env.SCATTERWISE_WORKBENCH_URL;
  if (!service) return false;
  const query = new URLSearchParams({ selector, ...(text ? { text } : {}) });
  const response = await fetch(`${service}/click?${query}`);
  if (!response.ok) throw new Error(`click on ${selector} failed: ${response.status} ${await response.text()}`);
  return true;
}
