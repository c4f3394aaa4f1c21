// `npm test` after the build: runs every suite in turn, shows mocha's own output, and closes with
// one line that counts them all ("tests: N passed, N failed, N skipped"). Exits 1 when any suite fails.
import { spawn } from 'node:child_process';

const suites = [
  ['core', ['npm', 'run', '--silent', 'test:core']],
  ['reference', ['npm', 'run', '--silent', 'test:reference']],
  ['webview', ['npm', 'run', '--silent', 'test:webview']],
  ['extension', ['npm', 'run', '--silent', 'test:extension']],
];
const only = process.argv.slice(2);
const totals = { passed: 0, failed: 0, skipped: 0 };
const failedSuites = [];

function count(text, word) {
  const all = [...text.matchAll(new RegExp(`^\\s*(\\d+) ${word}\\b`, 'gm'))];
  return all.reduce((sum, m) => sum + Number(m[1]), 0);
}

for (const [name, [command, ...args]] of suites) {
  if (only.length && !only.includes(name)) continue;
  console.log(`\n=== ${name} ===`);
  const child = spawn(command, args, { stdio: ['ignore', 'pipe', 'inherit'] });
  let output = '';
  child.stdout.on('data', (chunk) => { output += chunk; process.stdout.write(chunk); });
  const code = await new Promise((resolve) => child.on('close', resolve));
  const passed = count(output, 'passing');
  const failed = count(output, 'failing');
  totals.passed += passed;
  totals.failed += failed;
  totals.skipped += count(output, 'pending');
  if (code !== 0 || passed === 0) {
    failedSuites.push(`${name} (exit ${code}${passed === 0 ? ', no test passed' : ''})`);
    if (failed === 0) totals.failed += 1; // a suite that broke before reporting counts as one failure
  }
}
if (failedSuites.length) console.log(`\nfailed suites: ${failedSuites.join(', ')}`);
console.log(`\ntests: ${totals.passed} passed, ${totals.failed} failed, ${totals.skipped} skipped`);
process.exit(failedSuites.length ? 1 : 0);
