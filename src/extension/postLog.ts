/**
 * A bounded record of what the host posted to each panel. It backs the small API that
 * `activate()` returns, so the tests in a real VS Code can see the panel's messages without a DOM.
 */
import * as vscode from 'vscode';
import type { ToPanel } from '../shared/messages';

export interface PostedMessage {
  uri: vscode.Uri;
  message: ToPanel;
}

export class PostLog implements vscode.Disposable {
  private readonly byFile = new Map<string, ToPanel[]>();
  private readonly posted = new vscode.EventEmitter<PostedMessage>();
  readonly onDidPost = this.posted.event;

  /** Reports can be large: keep the last messages of the most recent files only (onDidPost sees every one). */
  constructor(
    private readonly perFile = 64,
    private readonly files = 32,
  ) {}

  record(uri: vscode.Uri, message: ToPanel): void {
    const key = uri.toString();
    const list = this.byFile.get(key) ?? [];
    this.byFile.delete(key);
    this.byFile.set(key, list);
    // A long fit posts hundreds of progress messages: keep the latest of each run of them, so the
    // results around them stay in the record.
    if (message.type === 'progress' && list[list.length - 1]?.type === 'progress') list[list.length - 1] = message;
    else list.push(message);
    if (list.length > this.perFile) list.shift();
    while (this.byFile.size > this.files) this.byFile.delete(this.byFile.keys().next().value as string);
    this.posted.fire({ uri, message });
  }

  messagesFor(uri: vscode.Uri): readonly ToPanel[] {
    return [...(this.byFile.get(uri.toString()) ?? [])];
  }

  dispose(): void {
    this.posted.dispose();
  }
}
