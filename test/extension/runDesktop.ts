/**
 * Runs the same extension tests in desktop VS Code through @vscode/test-electron, on machines that
 * can download VS Code (`npm run test:extension:desktop` after a build). Where only npm and Debian
 * are reachable, use runInServer.mjs instead. VSCODE_VERSION picks the build (default 1.100.3,
 * the oldest the manifest's engines field accepts).
 */
import * as path from 'node:path';
import { runTests } from '@vscode/test-electron';

async function main(): Promise<void> {
  const root = path.resolve(__dirname, '../../..');
  await runTests({
    version: process.env.VSCODE_VERSION || '1.100.3',
    extensionDevelopmentPath: root,
    extensionTestsPath: path.join(root, 'out/test/extension/index.js'),
    launchArgs: [path.join(root, 'sample-workspace'), '--disable-extensions', '--disable-workspace-trust'],
  });
}

main().catch((error: unknown) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
