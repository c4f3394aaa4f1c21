/**
 * Runs one measurement in a child process of its own, so its peak memory is its own: wall time and
 * peak resident set size from GNU time (`/usr/bin/time -f`), or, where that is not installed, from
 * a few lines of Python around the command (resource.getrusage of the children); without either,
 * wall time only. User and system CPU seconds come along: on a shared machine CPU time is the
 * steadier figure, wall time the one the targets are about.
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

export interface Measurement {
  ok: boolean;
  seconds: number;
  /** NaN when neither GNU time nor Python is there to read it. */
  maxRssBytes: number;
  userSeconds: number;
  systemSeconds: number;
  stdout: string;
  stderr: string;
}

const GNU_TIME = '/usr/bin/time';
const PYTHON = '/usr/bin/python3';
const MARK = '@@measured';

/** Prints "@@measured wall maxrss_kib user system" to stderr after the command exits. */
const PYTHON_WRAPPER = [
  'import resource, subprocess, sys, time',
  'start = time.monotonic()',
  'code = subprocess.call(sys.argv[1:])',
  'wall = time.monotonic() - start',
  'usage = resource.getrusage(resource.RUSAGE_CHILDREN)',
  `sys.stderr.write("\\n${MARK} %.3f %d %.3f %.3f\\n" % (wall, usage.ru_maxrss, usage.ru_utime, usage.ru_stime))`,
  'sys.exit(code)',
].join('\n');

export function measureCommand(command: string, args: string[], options: { cwd?: string; env?: NodeJS.ProcessEnv; timeoutMs?: number } = {}): Measurement {
  const spawnOptions = { cwd: options.cwd, env: options.env ?? process.env, encoding: 'utf8' as const, maxBuffer: 64 << 20, timeout: options.timeoutMs ?? 3_600_000 };
  let run;
  if (existsSync(GNU_TIME)) run = spawnSync(GNU_TIME, ['-f', `${MARK} %e %M %U %S`, command, ...args], spawnOptions);
  else if (existsSync(PYTHON)) run = spawnSync(PYTHON, ['-c', PYTHON_WRAPPER, command, ...args], spawnOptions);
  else {
    const started = process.hrtime.bigint();
    run = spawnSync(command, args, spawnOptions);
    const seconds = Number(process.hrtime.bigint() - started) / 1e9;
    return { ok: run.status === 0, seconds, maxRssBytes: NaN, userSeconds: NaN, systemSeconds: NaN, stdout: run.stdout ?? '', stderr: run.stderr ?? '' };
  }
  const stderr = run.stderr ?? '';
  const line = stderr
    .split('\n')
    .reverse()
    .find((l) => l.startsWith(MARK));
  const [wall, rssKiB, user, system] = (line ?? '').slice(MARK.length).trim().split(/\s+/).map(Number);
  return {
    ok: run.status === 0 && line !== undefined,
    seconds: wall ?? NaN,
    maxRssBytes: (rssKiB ?? NaN) * 1024,
    userSeconds: user ?? NaN,
    systemSeconds: system ?? NaN,
    stdout: run.stdout ?? '',
    stderr: stderr.replace(new RegExp(`\\n?${MARK}.*\\n?`), '').replace(/Command exited with non-zero status \d+\n?/, ''),
  };
}
