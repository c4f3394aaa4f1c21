/**
 * The panel's entry. Says `ready` once loaded and then draws what the host sends; every message is
 * checked with the shared guard first, since a webview message is untrusted input.
 */
import './styles.css';
import { isToPanel } from '../src/shared/messages';
import { PanelApp } from './render/app';
import { StateStore } from './state';
import { connectToHost } from './vscodeApi';

const host = connectToHost();
const store = new StateStore(host);
const root = document.getElementById('app') ?? document.body.appendChild(document.createElement('main'));
const app = new PanelApp(root, host, store);

window.addEventListener('message', (event: MessageEvent<unknown>) => {
  if (isToPanel(event.data)) app.receive(event.data);
});

// VS Code switches themes by changing the body's class and the colour variables; canvases and
// shaded cells take their colours from script, so draw again.
let themeFrame = 0;
const themeChanged = new MutationObserver(() => {
  cancelAnimationFrame(themeFrame);
  themeFrame = requestAnimationFrame(() => app.draw());
});
themeChanged.observe(document.body, { attributes: true, attributeFilter: ['class'] });
themeChanged.observe(document.documentElement, { attributes: true, attributeFilter: ['style'] });

host.post({ type: 'ready' });
