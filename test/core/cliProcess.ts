/**
 * The CLI suites' child process: bundles the current sources into cli.js the way esbuild.mjs does
 * (so a suite never runs a stale build) and runs that bundle with Node in a child process.
 */
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import * as path from 'node:path';

/** The repository root, seen from the test bundle in out/test/core. */
export const REPOSITORY_ROOT = path.resolve(__dirname, '../../..');

/** Where `buildCli()` writes the bundle by default: dist/cli.js, as the package ships it. */
export const DIST_CLI = path.join(REPOSITORY_ROOT, 'dist', 'cli.js');

export interface CliRun {
  status: number | null;
  stdout: string;
  stderr: string;
}

export interface CliRunOptions {
  /** The working folder of the child process. */
  cwd: string;
  /** Milliseconds before the child is killed. */
  timeout: number;
  /** The bundle to run; dist/cli.js unless given. */
  cli?: string;
}

/** Bundles src/cli/main.ts into `outdir` (dist/ unless given) and returns the path of its cli.js. */
export function buildCli(outdir = path.dirname(DIST_CLI)): string {
  const build = spawnSync(
    process.execPath,
    ['-e', `require('esbuild').build({entryPoints:{cli:'src/cli/main.ts'},bundle:true,platform:'node',format:'cjs',target:'node20',outdir:${JSON.stringify(outdir)},banner:{js:'#!/usr/bin/env node'},logLevel:'error'}).catch(()=>process.exit(1))`],
    { cwd: REPOSITORY_ROOT, encoding: 'utf8' },
  );
  assert.equal(build.status, 0, build.stderr);
  return path.join(outdir, 'cli.js');
}

/** Runs the CLI bundle with `args` in a child process and returns its exit status and output. */
export function runCli(args: readonly string[], options: CliRunOptions): CliRun {
  const result = spawnSync(process.execPath, [options.cli ?? DIST_CLI, ...args], { cwd: options.cwd, encoding: 'utf8', timeout: options.timeout });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}
