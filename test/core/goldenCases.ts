/**
 * The golden copies of the Markdown the CLI writes for reviewers: one per case below, stored in
 * test/fixtures/golden/NAME.md. `scripts/make-golden.mjs` regenerates them (review the diff before
 * committing); test/core/reportGolden.test.ts compares the CLI's output with them. Both run the
 * cases through this module, so they cannot disagree about how a case is run.
 *
 * The sample cases run in a temporary copy of the sample workspace (so plots land in a relative
 * folder); the compare cases in the git repository of compareRepository.ts.
 */
import { cpSync, mkdtempSync, rmSync } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { runCli } from './cliProcess';
import { buildCaseRepository } from './compareRepository';

export interface GoldenCase {
  name: string;
  where: 'samples' | 'repository';
  args: string[];
  /** The exit code the case must end with. */
  exit: number;
}

export const GOLDEN_CASES: readonly GoldenCase[] = [
  { name: 'report-pump-faults', where: 'samples', args: ['report', 'data/pump-faults.csv', '--plots', 'plots'], exit: 0 },
  { name: 'report-seal-leak', where: 'samples', args: ['report', 'data/seal-leak.csv'], exit: 0 },
  { name: 'report-defects', where: 'samples', args: ['report', 'data/pump-faults-defects.csv'], exit: 0 },
  { name: 'report-two-files', where: 'samples', args: ['report', 'data/seal-leak.csv', 'data/pump-faults.tsv'], exit: 0 },
  { name: 'compare-leak', where: 'repository', args: ['compare', 'base:data/pump-faults.csv', 'leak:data/pump-faults.csv', '--format', 'markdown', '--fail-on', 'new-finding=warning'], exit: 1 },
  { name: 'compare-relabel', where: 'repository', args: ['compare', 'base:data/pump-faults.csv', 'relabel:data/pump-faults.csv', '--format', 'markdown'], exit: 1 },
  { name: 'compare-rows-removed', where: 'repository', args: ['compare', 'base:data/pump-faults.csv', 'rows-removed:data/pump-faults.csv', '--format', 'markdown'], exit: 0 },
  { name: 'compare-changed-since', where: 'repository', args: ['compare', '--changed-since', 'main', '--format', 'markdown'], exit: 1 },
];

/**
 * Run-to-run differences removed: times (`123 ms`, `1.23 s`, `"timing": {…}`) become placeholders.
 * The Markdown has none today; the rule keeps a golden copy valid if a timing line is added.
 */
export function normalizeTimings(text: string): string {
  return text
    .replace(/"timing": \{[^}]*\}/g, '"timing": {}')
    .replace(/\b\d+(\.\d+)? ms\b/g, 'N ms')
    .replace(/\b\d+(\.\d+)? s\b/g, 'N s');
}

export interface GoldenOutput {
  name: string;
  exit: number | null;
  stdout: string;
  stderr: string;
}

/** Runs every case with the CLI at `cli` and returns its normalized output. */
export function renderGoldenCases(cli: string, root: string): GoldenOutput[] {
  const samples = mkdtempSync(path.join(os.tmpdir(), 'scatterwise-golden-'));
  const repository = buildCaseRepository();
  try {
    cpSync(path.join(root, 'sample-workspace', 'data'), path.join(samples, 'data'), { recursive: true });
    cpSync(path.join(root, 'sample-workspace', 'scatterwise.config.json'), path.join(samples, 'scatterwise.config.json'));
    return GOLDEN_CASES.map((c) => {
      const cwd = c.where === 'samples' ? samples : repository.folder;
      const result = runCli(c.args, { cli, cwd, timeout: 120_000 });
      return { name: c.name, exit: result.status, stdout: normalizeTimings(result.stdout), stderr: result.stderr };
    });
  } finally {
    rmSync(samples, { recursive: true, force: true });
    repository.remove();
  }
}

export function goldenFile(root: string, name: string): string {
  return path.join(root, 'test', 'fixtures', 'golden', `${name}.md`);
}
