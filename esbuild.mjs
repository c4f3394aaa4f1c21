// Bundles every target with one small helper: the shipped bundles go to dist/, the test and
// benchmark bundles to out/. Type-checking is `npm run typecheck` (tsc --noEmit), run before this.
import * as esbuild from 'esbuild';
import { readdirSync, rmSync, statSync } from 'node:fs';
import { join } from 'node:path';

const production = process.argv.includes('--production');

/** Every *.ts file below `dir` whose name matches `pattern`. */
function filesBelow(dir, pattern) {
  let found = [];
  let entries = [];
  try { entries = readdirSync(dir); } catch { return found; }
  for (const name of entries) {
    const full = join(dir, name);
    if (statSync(full).isDirectory()) found = found.concat(filesBelow(full, pattern));
    else if (pattern.test(name)) found.push(full);
  }
  return found;
}

function build(options) {
  return esbuild.build({
    bundle: true,
    sourcemap: !production,
    minify: production,
    logLevel: 'warning',
    target: 'es2022',
    ...options,
  });
}

// In Node the core's parser fallback uses csv-parse's Node build: the browser build the core imports
// (so that it also runs in a webview or browser worker) carries a Buffer replacement whose
// byte-by-byte UTF-8 encoding cost ~0.1 s of every cold inspection.
const nodeCsvParse = {
  name: 'node-csv-parse',
  setup(builder) {
    builder.onResolve({ filter: /^csv-parse\/browser\/esm\/sync$/ }, (args) => builder.resolve('csv-parse/sync', { kind: args.kind, resolveDir: args.resolveDir }));
  },
};
const node = { platform: 'node', format: 'cjs', target: 'node20', plugins: [nodeCsvParse] };

// A deleted test must not keep running from a stale bundle.
rmSync('out', { recursive: true, force: true });

/**
 * The host never reads a data file (its workers do): the readers, the analysis and the script
 * writers stay out of its bundle, which the editor loads on activation, before the first answer.
 */
function checkHostBundle(result) {
  const inputs = Object.keys(Object.values(result.metafile.outputs).find((output) => output.entryPoint)?.inputs ?? {});
  const misplaced = inputs.filter((input) => /^src\/core\/(read\/index|analyze|tableMoments|scripts\/index)\.ts$|^node_modules\/(hyparquet|csv-parse)/.test(input));
  if (misplaced.length > 0) throw new Error(`dist/extension.js must not bundle the readers or the analysis (the fit worker runs them): ${misplaced.slice(0, 5).join(', ')}${misplaced.length > 5 ? ` and ${misplaced.length - 5} more` : ''}`);
}

await Promise.all([
  // The VS Code host: `vscode` is provided by the editor at run time.
  build({ ...node, entryPoints: { extension: 'src/extension/extension.ts' }, outdir: 'dist', external: ['vscode'], metafile: true }).then(checkHostBundle),
  // The worker thread that runs fits off the host's event loop.
  build({ ...node, entryPoints: { worker: 'src/extension/worker.ts' }, outdir: 'dist' }),
  // The workers of the parallel row passes, started by the CLI and by the fit worker.
  build({ ...node, entryPoints: { scanWorker: 'src/node/parallelScanWorker.ts' }, outdir: 'dist' }),
  // The command line.
  build({ ...node, entryPoints: { cli: 'src/cli/main.ts' }, outdir: 'dist', banner: { js: '#!/usr/bin/env node' } }),
  // The panel, in the browser of the webview.
  build({ platform: 'browser', format: 'iife', entryPoints: { webview: 'webview/main.ts' }, outdir: 'dist' }),
  // Tests and benchmarks: one bundle per file, run by mocha / node from out/.
  build({
    ...node,
    entryPoints: [...filesBelow('test', /\.ts$/), ...filesBelow('bench', /\.ts$/)],
    outbase: '.',
    outdir: 'out',
    external: ['vscode', 'mocha', 'playwright-core', '@duckdb/node-api', '@vscode/test-electron', 'esbuild'],
  }),
]);
