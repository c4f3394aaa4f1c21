// The core must run in Node, a worker thread and a browser: bundling its public entries for the
// browser platform fails on any import of a Node built-in (fs, crypto, worker_threads, Buffer
// polyfills pulled in through a library's Node build, …).
import * as assert from 'node:assert/strict';
import * as esbuild from 'esbuild';

describe('core portability', function () {
  this.timeout(60_000);

  for (const entry of ['src/core/analyze.ts', 'src/core/momentsIO.ts', 'src/core/scripts/index.ts', 'src/core/compare/index.ts']) {
    it(`${entry} bundles for the browser without Node built-ins`, async () => {
      const result = await esbuild.build({ entryPoints: [entry], bundle: true, platform: 'browser', format: 'esm', write: false, logLevel: 'silent', metafile: true });
      const inputs = Object.keys(result.metafile.inputs);
      assert.ok(inputs.some((path) => path.startsWith('src/core/')), 'the bundle holds the core');
      const nodeOnly = inputs.filter((path) => /(^|\/)(node:|fs|crypto|worker_threads)$/.test(path) || path.includes('csv-parse/dist/cjs'));
      assert.deepEqual(nodeOnly, []);
    });
  }
});
