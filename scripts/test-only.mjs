// Development shortcut: bundle just the named test files and run them with mocha.
//   node scripts/test-only.mjs test/core/moments.test.ts [more files…] [-- mocha args]
// `npm test` is the full run; this is for iterating on one area without building the rest.
import * as esbuild from 'esbuild';
import { spawnSync } from 'node:child_process';

const split = process.argv.indexOf('--');
const files = process.argv.slice(2, split < 0 ? undefined : split);
const mochaArgs = split < 0 ? [] : process.argv.slice(split + 1);
if (files.length === 0) {
  console.error('usage: node scripts/test-only.mjs TEST.ts… [-- mocha args]');
  process.exit(2);
}
await esbuild.build({
  entryPoints: files,
  bundle: true,
  platform: 'node',
  format: 'cjs',
  target: 'node20',
  sourcemap: true,
  outbase: '.',
  outdir: 'out',
  logLevel: 'warning',
  external: ['vscode', 'mocha', 'playwright-core', '@duckdb/node-api', '@vscode/test-electron', 'esbuild'],
});
const outputs = files.map((f) => 'out/' + f.replace(/\.ts$/, '.js'));
const run = spawnSync(process.execPath, ['node_modules/mocha/bin/mocha.js', '--enable-source-maps', ...mochaArgs, ...outputs], { stdio: 'inherit' });
process.exit(run.status ?? 1);
