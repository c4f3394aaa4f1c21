/** The panel page: its Content-Security-Policy and the escaping of what goes into it. */
import assert from 'node:assert/strict';
import { buildPanelHtml } from '../../src/shared/panelHtml';

const base = { cspSource: 'https://file+.vscode-resource.vscode-cdn.net', nonce: 'cmFuZG9tLW5vbmNlLTEyMzQ1Ng==', scriptUri: 'https://x/dist/webview.js', styleUri: 'https://x/dist/webview.css', title: 'pump-faults.csv' };

function policyOf(html: string): string {
  const match = /<meta http-equiv="Content-Security-Policy" content="([^"]*)">/.exec(html);
  assert.ok(match, 'the page declares a Content-Security-Policy');
  return match[1].replace(/&#39;/g, "'");
}

describe('buildPanelHtml', () => {
  it('allows nothing by default, the script by nonce, styles, images and fonts from the webview source only', () => {
    const policy = policyOf(buildPanelHtml(base));
    assert.equal(
      policy,
      `default-src 'none'; script-src 'nonce-${base.nonce}'; style-src ${base.cspSource}; img-src ${base.cspSource} data: blob:; font-src ${base.cspSource}`,
    );
    assert.ok(!policy.includes('unsafe-inline') && !policy.includes('unsafe-eval'));
  });

  it('loads exactly one script, carrying the nonce, and no inline script or style', () => {
    const html = buildPanelHtml(base);
    const scripts = html.match(/<script\b[^>]*>/g) ?? [];
    assert.equal(scripts.length, 1);
    assert.match(scripts[0], new RegExp(`nonce="${base.nonce.replace(/[+/=]/g, (c) => `\\${c}`)}"`));
    assert.match(scripts[0], /src="https:\/\/x\/dist\/webview.js"/);
    assert.match(html, /<script[^>]*><\/script>/, 'the script element is empty');
    assert.ok(!/<style\b/.test(html) && !/\sstyle=/.test(html), 'no inline style');
    assert.match(html, /<link rel="stylesheet" href="https:\/\/x\/dist\/webview.css">/);
  });

  it('escapes the title and the URIs', () => {
    const html = buildPanelHtml({ ...base, title: '<img src=x onerror=alert(1)>"', scriptUri: 'https://x/a.js?"><script>' });
    assert.ok(!html.includes('<img'));
    assert.ok(html.includes('<title>&#60;img src=x onerror=alert(1)&#62;&#34;</title>'));
    assert.equal((html.match(/<script\b/g) ?? []).length, 1);
  });

  it('accepts the several sources VS Code gives as cspSource', () => {
    const cspSource = "'self' https://*.vscode-cdn.net";
    const policy = policyOf(buildPanelHtml({ ...base, cspSource }));
    assert.ok(policy.includes(`style-src ${cspSource};`) && policy.includes(`img-src ${cspSource} data: blob:;`), policy);
  });

  it('refuses a nonce or source that would break out of the policy or weaken it', () => {
    assert.throws(() => buildPanelHtml({ ...base, cspSource: "'self' 'unsafe-inline'" }), /cspSource/);
    assert.throws(() => buildPanelHtml({ ...base, cspSource: 'https://a, https://b' }), /cspSource/);
    assert.throws(() => buildPanelHtml({ ...base, nonce: "abc'; script-src *" }), /nonce/);
    assert.throws(() => buildPanelHtml({ ...base, nonce: 'short' }), /nonce/);
    assert.throws(() => buildPanelHtml({ ...base, cspSource: 'https://a; script-src *' }), /cspSource/);
  });
});
