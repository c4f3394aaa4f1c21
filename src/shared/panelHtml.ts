/**
 * The panel's HTML page, built in one place for the extension host and for the panel tests.
 * Pure: the caller passes the nonce (from crypto.randomBytes) and the resource URIs
 * (from webview.asWebviewUri), so this module runs anywhere.
 *
 * The Content-Security-Policy allows nothing by default; the one script is admitted by its nonce,
 * styles, images and fonts only from the webview's resource origin (`cspSource`). There is no
 * inline script or style: the panel styles itself through classes in the CSS file and through
 * CSSOM properties set from its script, which the policy permits.
 */
export interface PanelHtmlOptions {
  /** `webview.cspSource`: the origin the webview serves local resources from. */
  cspSource: string;
  /** A fresh random value per page load, base64 or hex. */
  nonce: string;
  /** URI of dist/webview.js as the webview sees it. */
  scriptUri: string;
  /** URI of dist/webview.css as the webview sees it. */
  styleUri: string;
  /** The page title (the data file's name). */
  title: string;
}

/** Escapes text for an HTML attribute value or element content. */
function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

/** The nonce and the CSP source end up inside the policy: refuse characters that would end or extend it. */
function checkPolicyToken(what: string, value: string, allowed: RegExp): void {
  if (!allowed.test(value)) throw new Error(`buildPanelHtml: ${what} has characters a Content-Security-Policy cannot carry.`);
}

export function buildPanelHtml(options: PanelHtmlOptions): string {
  const { cspSource, nonce, scriptUri, styleUri, title } = options;
  checkPolicyToken('nonce', nonce, /^[A-Za-z0-9+/=_-]{16,}$/);
  // VS Code's cspSource may list several sources, e.g. `'self' https://*.vscode-cdn.net`: allow
  // space-separated hosts and the 'self' keyword — no other keyword ('unsafe-inline' would admit
  // inline styles), never a ';' or ',' that would start another directive.
  checkPolicyToken('cspSource', cspSource, /^(?:'self'|[^\s;,'"<>]+)(?: (?:'self'|[^\s;,'"<>]+))*$/);
  const policy = [
    "default-src 'none'",
    `script-src 'nonce-${nonce}'`,
    `style-src ${cspSource}`,
    `img-src ${cspSource} data: blob:`,
    `font-src ${cspSource}`,
  ].join('; ');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="UTF-8">
<meta http-equiv="Content-Security-Policy" content="${escapeHtml(policy)}">
<meta name="viewport" content="width=device-width, initial-scale=1.0">
<link rel="stylesheet" href="${escapeHtml(styleUri)}">
<title>${escapeHtml(title)}</title>
</head>
<body>
<main id="app" class="app"><p class="app-waiting">Waiting for the analysis…</p></main>
<script nonce="${escapeHtml(nonce)}" src="${escapeHtml(scriptUri)}"></script>
</body>
</html>
`;
}
