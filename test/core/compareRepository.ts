/**
 * A real git repository for the compare tests and the golden copies, built in os.tmpdir() from the
 * invented pump-fleet table of the sample workspace. Commits have fixed authors and dates, so their
 * ids are the same on every run (the golden copies name them).
 *
 * History (each version is tagged; all but `base` change the base table independently):
 *   base          data/pump-faults.csv and data/seal-leak.csv as in the sample workspace
 *   leak          + column `repair_ticket` = fault code × 1000 + a serial: it leaks the label
 *   relabel       class `cavitation` renamed `suction-cavitation`
 *   rows-removed  every second `healthy` row removed
 * Branch `feature` (from base, checked out at the end): the leak change committed, seal-leak.csv
 * deleted, data/new-pumps.csv added and left uncommitted, README.md edited (not a data file), and
 * a project config listing data/*.csv.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';

export const DATA_FILE = 'data/pump-faults.csv';

const root = path.resolve(__dirname, '../../..');

/** Runs git in `cwd` with an isolated configuration; throws with git's message on failure. */
export function git(cwd: string, args: readonly string[], date = '2024-01-01T12:00:00Z'): string {
  const result = spawnSync('git', ['-c', 'user.name=Scatterwise Tests', '-c', 'user.email=tests@scatterwise.invalid', '-c', 'commit.gpgsign=false', '-c', 'core.autocrlf=false', ...args], {
    cwd,
    encoding: 'utf8',
    env: { ...process.env, GIT_CONFIG_NOSYSTEM: '1', GIT_CONFIG_GLOBAL: os.devNull, GIT_AUTHOR_DATE: date, GIT_COMMITTER_DATE: date, LC_ALL: 'C' },
  });
  if (result.status !== 0) throw new Error(`git ${args.join(' ')} failed: ${result.stderr}`);
  return result.stdout;
}

export function sampleTable(name: string): string {
  return readFileSync(path.join(root, 'sample-workspace', 'data', name), 'utf8');
}

/** Lines of a CSV without quoted fields (the sample tables have none), split at commas. */
function rowsOf(text: string): { header: string[]; rows: string[][] } {
  const lines = text.split('\n').filter((line) => line !== '');
  return { header: lines[0]!.split(','), rows: lines.slice(1).map((line) => line.split(',')) };
}

function csvOf(header: readonly string[], rows: readonly (readonly string[])[]): string {
  return [header, ...rows].map((r) => r.join(',')).join('\n') + '\n';
}

const FAULT_CODES: Record<string, number> = { healthy: 1, 'impeller-wear': 2, cavitation: 3, 'bearing-defect': 4 };

export function withLeakingColumn(text: string): string {
  const { header, rows } = rowsOf(text);
  const label = header.indexOf('fault');
  return csvOf([...header, 'repair_ticket'], rows.map((row, i) => [...row, String(FAULT_CODES[row[label]!]! * 1000 + (i % 997))]));
}

export function withRelabelledClass(text: string, from = 'cavitation', to = 'suction-cavitation'): string {
  const { header, rows } = rowsOf(text);
  const label = header.indexOf('fault');
  return csvOf(header, rows.map((row) => row.map((cell, j) => (j === label && cell === from ? to : cell))));
}

export function withRowsRemoved(text: string, fault = 'healthy'): string {
  const { header, rows } = rowsOf(text);
  const label = header.indexOf('fault');
  let seen = 0;
  return csvOf(header, rows.filter((row) => row[label] !== fault || seen++ % 2 === 0));
}

/** Rows per class of a CSV version, counted here from its text (independently of the reader). */
export function classCounts(text: string): Map<string, number> {
  const { header, rows } = rowsOf(text);
  const label = header.indexOf('fault');
  const counts = new Map<string, number>();
  for (const row of rows) counts.set(row[label]!, (counts.get(row[label]!) ?? 0) + 1);
  return counts;
}

export const VERSIONS = {
  base: (text: string) => text,
  leak: withLeakingColumn,
  relabel: (text: string) => withRelabelledClass(text),
  'rows-removed': (text: string) => withRowsRemoved(text),
} as const;

export type VersionName = keyof typeof VERSIONS;

export const PROJECT_CONFIG = {
  datasets: [{ files: ['data/*.csv'], label: 'fault', exclude: ['pump_id'] }],
  gates: { minAccuracy: 0.5, classDisappears: true },
};

export interface CaseRepository {
  folder: string;
  /** The table of each tagged version, as committed. */
  versions: Record<VersionName, string>;
  remove(): void;
}

export function buildCaseRepository(): CaseRepository {
  const folder = mkdtempSync(path.join(os.tmpdir(), 'scatterwise-compare-'));
  const write = (file: string, text: string): void => {
    mkdirSync(path.dirname(path.join(folder, file)), { recursive: true });
    writeFileSync(path.join(folder, file), text);
  };
  const pump = sampleTable('pump-faults.csv');
  const versions = Object.fromEntries(Object.entries(VERSIONS).map(([name, make]) => [name, make(pump)])) as Record<VersionName, string>;
  git(folder, ['init', '-q', '-b', 'main']);
  write('README.md', 'Pump fleet measurements (invented).\n');
  write(DATA_FILE, versions.base);
  write('data/seal-leak.csv', sampleTable('seal-leak.csv'));
  write('scatterwise.config.json', `${JSON.stringify(PROJECT_CONFIG, null, 2)}\n`);
  git(folder, ['add', '-A']);
  git(folder, ['commit', '-q', '-m', 'base tables']);
  git(folder, ['tag', 'base']);
  let day = 2;
  for (const name of ['leak', 'relabel', 'rows-removed'] as const) {
    write(DATA_FILE, versions[name]);
    git(folder, ['commit', '-q', '-a', '-m', `${name} version`], `2024-01-0${day++}T12:00:00Z`);
    git(folder, ['tag', name]);
  }
  git(folder, ['checkout', '-q', '-b', 'feature', 'base']);
  write(DATA_FILE, versions.leak);
  git(folder, ['rm', '-q', 'data/seal-leak.csv']);
  git(folder, ['commit', '-q', '-a', '-m', 'feature: repair tickets, seal table retired'], '2024-02-01T12:00:00Z');
  write('data/new-pumps.csv', withRowsRemoved(sampleTable('pump-faults.csv'), 'cavitation'));
  write('README.md', 'Pump fleet measurements (invented), with repair tickets.\n');
  return { folder, versions, remove: () => rmSync(folder, { recursive: true, force: true }) };
}
