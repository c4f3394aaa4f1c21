// Regenerates the stored reports the panel tests draw (test/fixtures/reports/*.json) by running
// the command line on the sample workspace's files:
//   node esbuild.mjs && node scripts/make-report-fixtures.mjs
// Each fixture is the verbatim output of `scatterwise fit FILE --format json`, so the panel is
// tested against what the real pipeline produces, not against a hand-written shape.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const repository = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const cli = join(repository, 'dist', 'cli.js');
const output = join(repository, 'test', 'fixtures', 'reports');

/** Fixture name → sample file (relative to the repository) and what it exercises in the panel. */
const FIXTURES = {
  'pump-faults.json': ['sample-workspace/data/pump-faults.csv', 'four classes: three discriminants, axis choice, ellipses'],
  'seal-leak.json': ['sample-workspace/data/seal-leak.csv', 'two classes: one discriminant, densities along LD1 and PC1'],
  'pump-faults-defects.json': ['sample-workspace/data/pump-faults-defects.csv', 'planted defects: findings naming columns and rows, removed features, dropped rows'],
};

if (!existsSync(cli)) {
  console.error('dist/cli.js is missing: build it first with `node esbuild.mjs`.');
  process.exit(2);
}
mkdirSync(output, { recursive: true });
for (const [name, [file, purpose]] of Object.entries(FIXTURES)) {
  // Relative path, so the report's source name carries no folder of this machine.
  const run = spawnSync(process.execPath, [cli, 'fit', file, '--format', 'json'], { cwd: repository, encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 });
  if (run.status !== 0) {
    console.error(`scatterwise fit ${file} failed (exit ${run.status}):\n${run.stderr}`);
    process.exit(1);
  }
  const report = JSON.parse(run.stdout);
  writeFileSync(join(output, name), `${JSON.stringify(report)}\n`);
  console.log(`${name}: ${file} — ${purpose}; ${report.rows.used} rows, ${report.classes.length} classes, ${report.findings.length} findings`);
}
