/**
 * The extension tests' entry, loaded by VS Code's extension host (code-server through
 * runInServer.mjs, or desktop VS Code through runDesktop.ts): runs every *.test.js bundle beside it
 * with mocha 11. `MOCHA_GREP` in the environment picks tests by name.
 */
import * as fs from 'node:fs';
import * as path from 'node:path';
import Mocha from 'mocha';

export async function run(): Promise<void> {
  const mocha = new Mocha({ ui: 'bdd', reporter: 'spec', color: false, timeout: 120_000, grep: process.env.MOCHA_GREP || undefined });
  const files = fs
    .readdirSync(__dirname)
    .filter((name) => name.endsWith('.test.js'))
    .sort();
  for (const name of files) mocha.addFile(path.join(__dirname, name));
  await new Promise<void>((resolve, reject) => {
    mocha.run((failures) => (failures > 0 ? reject(new Error(`${failures} extension test(s) failed.`)) : resolve()));
  });
}
