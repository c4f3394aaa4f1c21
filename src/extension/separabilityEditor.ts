/**
 * The read-only custom editor `scatterwise.separability`: a document per data file (holding its
 * fit session) and a webview panel per editor showing it. Nothing here ever writes the file.
 */
import { randomBytes } from 'node:crypto';
import * as vscode from 'vscode';
import { buildPanelHtml } from '../shared/panelHtml';
import { FitSession, type SessionServices } from './fitSession';

export const EDITOR_VIEW_TYPE = 'scatterwise.separability';

class SeparabilityDocument implements vscode.CustomDocument {
  constructor(
    readonly uri: vscode.Uri,
    readonly session: FitSession,
    private readonly onDispose: () => void,
  ) {}

  dispose(): void {
    this.session.dispose();
    this.onDispose();
  }
}

export class SeparabilityEditorProvider implements vscode.CustomReadonlyEditorProvider<SeparabilityDocument> {
  /** Open documents by URI, for the test API's `deliver`. */
  private readonly documents = new Map<string, SeparabilityDocument>();
  private readonly distFolder: vscode.Uri;

  constructor(
    extensionUri: vscode.Uri,
    private readonly services: SessionServices,
  ) {
    this.distFolder = vscode.Uri.joinPath(extensionUri, 'dist');
  }

  openCustomDocument(uri: vscode.Uri): SeparabilityDocument {
    const key = uri.toString();
    const session = new FitSession(uri, this.services);
    const document = new SeparabilityDocument(uri, session, () => {
      if (this.documents.get(key) === document) this.documents.delete(key);
    });
    this.documents.set(key, document);
    // Start at once: the worker reads while the panel loads, and the answer waits for `ready`.
    session.run();
    return document;
  }

  resolveCustomEditor(document: SeparabilityDocument, panel: vscode.WebviewPanel): void {
    document.session.attach(panel, (webview) => this.html(webview, document.session.fileName), this.distFolder);
  }

  sessionFor(uri: vscode.Uri): FitSession | undefined {
    return this.documents.get(uri.toString())?.session;
  }

  /** Runs every open file again, e.g. after the settings changed. */
  refitAll(): void {
    for (const document of this.documents.values()) document.session.run();
  }

  private html(webview: vscode.Webview, fileName: string): string {
    return buildPanelHtml({
      cspSource: webview.cspSource,
      nonce: randomBytes(18).toString('base64'),
      scriptUri: webview.asWebviewUri(vscode.Uri.joinPath(this.distFolder, 'webview.js')).toString(),
      styleUri: webview.asWebviewUri(vscode.Uri.joinPath(this.distFolder, 'webview.css')).toString(),
      title: `${fileName} — Scatterwise`,
    });
  }
}
