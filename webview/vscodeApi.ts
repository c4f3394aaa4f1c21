/** The webview's handle on its host, typed with our message contract. */
import type { FromPanel } from '../src/shared/messages';

interface WebviewApi {
  postMessage(message: unknown): void;
  getState(): unknown;
  setState(state: unknown): void;
}

declare function acquireVsCodeApi(): WebviewApi;

export interface HostConnection {
  post(message: FromPanel): void;
  getState(): unknown;
  setState(state: unknown): void;
}

/** acquireVsCodeApi may be called once per page load; this wraps the one handle. */
export function connectToHost(): HostConnection {
  const api = acquireVsCodeApi();
  return {
    post: (message) => api.postMessage(message),
    getState: () => api.getState(),
    setState: (state) => api.setState(state),
  };
}
