/**
 * Reading data files from git for `compare`: a file as it was at a commit (`git show REF:path`),
 * the files a branch touched since it left another (`git diff` against the merge base), and the
 * commit a ref names. git runs as a child process without a shell; refs are checked before use
 * (never taken as an option, never with whitespace or control characters) and every failure the
 * user can fix — git missing, not a repository, unknown ref, file absent at that ref — is a
 * DataError naming the ref and path (the CLI exits 2).
 *
 * The whole blob is held in memory (git has no random access into a blob); it is bounded by
 * MAX_BLOB_BYTES.
 */
import { spawn } from 'node:child_process';
import * as path from 'node:path';
import { DataError } from '../core/errors';

/** Largest file read from git (held in memory). */
export const MAX_BLOB_BYTES = 2 ** 31 - 1;

interface GitResult {
  stdout: Buffer;
  stderr: string;
  code: number;
}

/** Runs git with `args` in `cwd`; resolves with its output (never rejects for a non-zero exit). */
function runGit(cwd: string, args: readonly string[], maxBytes = 64 * 1024 * 1024): Promise<GitResult> {
  return new Promise((resolve, reject) => {
    const child = spawn('git', args, {
      cwd,
      shell: false,
      stdio: ['ignore', 'pipe', 'pipe'],
      // Plain messages, no pager, never a prompt for credentials.
      env: { ...process.env, LC_ALL: 'C', GIT_PAGER: 'cat', GIT_TERMINAL_PROMPT: '0' },
    });
    const chunks: Buffer[] = [];
    let size = 0;
    let stderr = '';
    let tooLarge = false;
    child.stdout.on('data', (chunk: Buffer) => {
      size += chunk.length;
      if (size > maxBytes) {
        tooLarge = true;
        child.kill();
        return;
      }
      chunks.push(chunk);
    });
    child.stderr.on('data', (chunk: Buffer) => {
      if (stderr.length < 8192) stderr += chunk.toString('utf8');
    });
    child.on('error', (error: NodeJS.ErrnoException) => {
      if (error.code === 'ENOENT') reject(new DataError('git-missing', 'git is not installed or not on the PATH.', {}, 'Install git to compare against a commit, or give two file paths.'));
      else reject(new DataError('git-failed', `git could not be started: ${error.message}`, {}));
    });
    child.on('close', (code) => {
      if (tooLarge) reject(new DataError('git-blob-too-large', `git output exceeds ${maxBytes} bytes, more than Scatterwise holds in memory.`, {}, 'Compare files on disk instead (check the old version out into another folder).'));
      else resolve({ stdout: Buffer.concat(chunks), stderr: stderr.trim(), code: code ?? 1 });
    });
  });
}

/** Why a ref cannot be passed to git safely, or null. */
export function refProblem(ref: string): string | null {
  if (ref === '') return 'is empty';
  if (ref.startsWith('-')) return "starts with '-'";
  // eslint-disable-next-line no-control-regex
  if (/[\s\u0000-\u001f\u007f]/.test(ref)) return 'contains whitespace or control characters';
  if (ref.includes(':')) return "contains ':'";
  return null;
}

/** The repository's top folder, or a DataError when `cwd` is not inside a git work tree. */
export async function gitTopLevel(cwd: string): Promise<string> {
  const result = await runGit(cwd, ['rev-parse', '--show-toplevel']);
  if (result.code !== 0) {
    throw new DataError('not-a-git-repository', `${cwd} is not inside a git repository (${result.stderr.split('\n')[0] || 'git rev-parse failed'}).`, { file: cwd }, 'Run the comparison inside the repository, or give two file paths.');
  }
  return result.stdout.toString('utf8').trim();
}

/** The full commit id a ref names (branch, tag, commit, `HEAD~2`, …); a DataError when it names none. */
export async function resolveCommit(cwd: string, ref: string): Promise<string> {
  const problem = refProblem(ref);
  if (problem) throw new DataError('unknown-git-ref', `'${ref}' is not a usable git ref: it ${problem}.`, {}, 'Give a branch, tag or commit id.');
  await gitTopLevel(cwd);
  const result = await runGit(cwd, ['rev-parse', '--verify', '--quiet', '--end-of-options', `${ref}^{commit}`]);
  if (result.code !== 0) {
    throw new DataError('unknown-git-ref', `'${ref}' is not a branch, tag or commit in this repository.`, {}, 'Check the spelling; in CI, fetch enough history (e.g. fetch-depth 0) for the base branch to be known.');
  }
  return result.stdout.toString('utf8').trim();
}

/** `path` (relative to `cwd`, or absolute) as a path from the repository's top folder with `/`. */
export async function repositoryPath(cwd: string, file: string): Promise<string> {
  const top = await gitTopLevel(cwd);
  const relative = path.relative(top, path.resolve(cwd, file));
  if (relative.startsWith('..') || path.isAbsolute(relative)) {
    throw new DataError('outside-repository', `${file} is outside the git repository at ${top}.`, { file }, 'Give a path inside the repository.');
  }
  return relative.split(path.sep).join('/');
}

export interface GitBlob {
  /** `REF:path` as the user wrote it, for messages. */
  name: string;
  commit: string;
  /** The path from the repository's top folder. */
  repositoryPath: string;
  bytes: Uint8Array;
}

const LFS_POINTER = 'version https://git-lfs.github.com/spec/v1';

/** The bytes of `file` at `ref` (`git show REF:path`), with DataErrors for an unknown ref or a path absent there. */
export async function showFileAtRef(cwd: string, ref: string, file: string, name = `${ref}:${file}`): Promise<GitBlob> {
  const commit = await resolveCommit(cwd, ref);
  const inRepository = await repositoryPath(cwd, file);
  const object = `${commit}:${inRepository}`;
  const type = await runGit(cwd, ['cat-file', '-t', object]);
  const kind = type.stdout.toString('utf8').trim();
  if (type.code !== 0) {
    throw new DataError('not-in-git-ref', `${name}: '${ref}' has no file ${inRepository}.`, { file: name }, `List what '${ref}' has with: git ls-tree -r --name-only ${ref}`);
  }
  if (kind !== 'blob') throw new DataError('not-in-git-ref', `${name}: at '${ref}', ${inRepository} is a ${kind === 'tree' ? 'folder' : kind}, not a file.`, { file: name }, 'Give the path of a data file.');
  const shown = await runGit(cwd, ['show', '--no-textconv', object], MAX_BLOB_BYTES);
  if (shown.code !== 0) throw new DataError('git-failed', `${name}: git show failed: ${shown.stderr.split('\n')[0]}`, { file: name });
  const bytes = new Uint8Array(shown.stdout.buffer, shown.stdout.byteOffset, shown.stdout.length);
  if (bytes.length < 200 && shown.stdout.toString('utf8').startsWith(LFS_POINTER)) {
    throw new DataError('git-lfs-pointer', `${name} is a Git LFS pointer, not the data itself.`, { file: name }, 'Fetch the LFS objects (git lfs fetch) and compare the checked-out files instead.');
  }
  return { name, commit, repositoryPath: inRepository, bytes };
}

export interface ChangedFile {
  /** Path from the repository's top folder, `/`-separated. */
  repositoryPath: string;
  status: 'added' | 'modified' | 'removed';
}

/**
 * The files that differ between the merge base of `ref` and HEAD and the working tree: committed,
 * staged and unstaged changes and new untracked files (not ignored ones). Renames count as a
 * removal and an addition.
 */
export async function changedSince(cwd: string, ref: string): Promise<{ mergeBase: string; files: ChangedFile[] }> {
  const commit = await resolveCommit(cwd, ref);
  const base = await runGit(cwd, ['merge-base', commit, 'HEAD']);
  if (base.code !== 0) {
    throw new DataError('no-merge-base', `'${ref}' and HEAD have no common ancestor.`, {}, 'In CI, fetch enough history (e.g. fetch-depth 0) for the base branch to be known.');
  }
  const mergeBase = base.stdout.toString('utf8').trim();
  const top = await gitTopLevel(cwd);
  const diff = await runGit(top, ['diff', '--name-status', '-z', '--no-renames', mergeBase, '--']);
  if (diff.code !== 0) throw new DataError('git-failed', `git diff failed: ${diff.stderr.split('\n')[0]}`);
  const files: ChangedFile[] = [];
  const fields = diff.stdout.toString('utf8').split('\0').filter((f) => f !== '');
  for (let i = 0; i + 1 < fields.length; i += 2) {
    const status = fields[i]!;
    files.push({ repositoryPath: fields[i + 1]!, status: status.startsWith('A') ? 'added' : status.startsWith('D') ? 'removed' : 'modified' });
  }
  const untracked = await runGit(top, ['ls-files', '--others', '--exclude-standard', '-z']);
  if (untracked.code === 0) {
    for (const file of untracked.stdout.toString('utf8').split('\0')) if (file !== '') files.push({ repositoryPath: file, status: 'added' });
  }
  files.sort((a, b) => (a.repositoryPath < b.repositoryPath ? -1 : a.repositoryPath > b.repositoryPath ? 1 : 0));
  return { mergeBase, files };
}

export interface GitRefName {
  /** Short name: `main`, `origin/main`, `v1.0`. */
  name: string;
  kind: 'branch' | 'remote branch' | 'tag';
  commit: string;
}

/** Branches, remote branches and tags, most recently committed first. */
export async function listRefs(cwd: string): Promise<GitRefName[]> {
  await gitTopLevel(cwd);
  const result = await runGit(cwd, ['for-each-ref', '--sort=-committerdate', '--format=%(refname:short)%00%(objectname)%00%(refname)', 'refs/heads', 'refs/remotes', 'refs/tags']);
  if (result.code !== 0) throw new DataError('git-failed', `git for-each-ref failed: ${result.stderr.split('\n')[0]}`);
  return result.stdout
    .toString('utf8')
    .split('\n')
    .filter((line) => line.includes('\0'))
    .map((line) => {
      const [name, commit, full] = line.split('\0') as [string, string, string];
      const kind = full.startsWith('refs/tags/') ? 'tag' : full.startsWith('refs/remotes/') ? 'remote branch' : 'branch';
      return { name, kind, commit } as GitRefName;
    })
    .filter((ref) => !ref.name.endsWith('/HEAD'));
}
