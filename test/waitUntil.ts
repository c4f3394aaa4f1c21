/** Waits, checking every 25 ms, until `condition()` holds; throws after `timeoutMs` naming `what`. Shared by the core and extension tests (no vscode import). */
export async function waitUntil(condition: () => boolean, timeoutMs: number, what: string): Promise<void> {
  const start = Date.now();
  while (!condition()) {
    if (Date.now() - start > timeoutMs) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, 25));
  }
}
