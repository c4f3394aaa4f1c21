// Regenerates the golden copies of the reviewer Markdown in test/fixtures/golden/ by running the
// real CLI on each case of test/core/goldenCases.ts. Review the diff before committing: a change
// there is a change in what reviewers will read.
//
//   node scripts/make-golden.mjs
import * as esbuild from 'esbuild';
import { mkdirSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import * as path from 'node:path';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const node = { bundle: true, platform: 'node', format: 'cjs', target: 'node20', logLevel: 'warning' };
await esbuild.build({ ...node, entryPoints: { cli: path.join(root, 'src/cli/main.ts') }, outdir: path.join(root, 'dist'), banner: { js: '#!/usr/bin/env node' } });
// Bundled where esbuild.mjs puts test modules, so its paths relative to the repository hold.
const casesBundle = path.join(root, 'out/test/core/goldenCases.js');
await esbuild.build({ ...node, entryPoints: [path.join(root, 'test/core/goldenCases.ts')], outfile: casesBundle });

const { renderGoldenCases, goldenFile, GOLDEN_CASES } = createRequire(import.meta.url)(casesBundle);
const outputs = renderGoldenCases(path.join(root, 'dist/cli.js'), root);
let failed = false;
for (const output of outputs) {
  const expected = GOLDEN_CASES.find((c) => c.name === output.name).exit;
  if (output.exit !== expected) {
    console.error(`${output.name}: exit ${output.exit}, expected ${expected}\n${output.stderr}`);
    failed = true;
    continue;
  }
  const file = goldenFile(root, output.name);
  mkdirSync(path.dirname(file), { recursive: true });
  writeFileSync(file, output.stdout);
  console.log(`wrote ${path.relative(root, file)} (${output.stdout.length} characters)`);
}
process.exit(failed ? 1 : 0);
