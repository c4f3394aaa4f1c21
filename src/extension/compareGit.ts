/**
 * A data file as it was at a git ref, for "compare with HEAD" (or any branch or commit): through the
 * built-in git extension's API (`vscode.git`, API version 1) when it is enabled and knows the
 * repository, else with `git show` (src/node/git.ts). The refs to offer come from the same places.
 * Only the few members of the git API used here are declared.
 */
import * as path from 'node:path';
import * as vscode from 'vscode';
import { DataError } from '../core/errors';
import { gitTopLevel, listRefs, showFileAtRef } from '../node/git';

interface GitRef {
  type: number;
  name?: string;
  commit?: string;
  remote?: string;
}

interface GitRepository {
  rootUri: vscode.Uri;
  buffer(ref: string, filePath: string): Promise<Uint8Array>;
  getCommit(ref: string): Promise<{ hash: string }>;
  getRefs?(query: { sort?: 'alphabetically' | 'committerdate'; count?: number }): Promise<GitRef[]>;
  state: { refs: GitRef[]; HEAD?: GitRef };
}

interface GitApi {
  state: 'uninitialized' | 'initialized';
  onDidChangeState(listener: (state: string) => void): vscode.Disposable;
  getRepository(uri: vscode.Uri): GitRepository | null;
  openRepository?(root: vscode.Uri): Promise<GitRepository | null>;
}

interface GitExtension {
  enabled: boolean;
  getAPI(version: 1): GitApi;
}

/** The git extension's API once it has initialised, or undefined when it is missing or disabled. */
async function gitApi(): Promise<GitApi | undefined> {
  const extension = vscode.extensions.getExtension<GitExtension>('vscode.git');
  if (!extension) return undefined;
  const exports = extension.isActive ? extension.exports : await extension.activate();
  if (!exports?.enabled) return undefined;
  const api = exports.getAPI(1);
  if (api.state !== 'initialized') {
    await new Promise<void>((resolve) => {
      const timer = setTimeout(resolve, 5000);
      const subscription = api.onDidChangeState((state) => {
        if (state !== 'initialized') return;
        clearTimeout(timer);
        subscription.dispose();
        resolve();
      });
    });
  }
  return api;
}

/** The git extension's repository holding `uri`, opening it when the extension has not yet. */
async function repositoryOf(api: GitApi, uri: vscode.Uri): Promise<GitRepository | null> {
  const known = api.getRepository(uri);
  if (known) return known;
  if (!api.openRepository) return null;
  const top = await gitTopLevel(path.dirname(uri.fsPath));
  return api.openRepository(vscode.Uri.file(top));
}

export interface FileAtRef {
  /** `REF:path` (the path relative to the repository's top). */
  name: string;
  commit: string;
  bytes: Uint8Array;
  /** How it was read, for the output channel. */
  via: 'git extension' | 'git show';
}

/**
 * The bytes of the local file `uri` as committed at `ref`. Unknown refs and files absent at the
 * ref are DataErrors (from `git show`, whose messages say which).
 */
export async function fileAtRef(uri: vscode.Uri, ref: string, log: (line: string) => void): Promise<FileAtRef> {
  if (uri.scheme !== 'file') throw new DataError('not-a-local-file', `${uri.toString()} is not a local file, so it has no git history here.`);
  const folder = path.dirname(uri.fsPath);
  const top = await gitTopLevel(folder);
  const relative = path.relative(top, uri.fsPath).split(path.sep).join('/');
  const name = `${ref}:${relative}`;
  try {
    const api = await gitApi();
    const repository = api ? await repositoryOf(api, uri) : null;
    if (repository) {
      const commit = (await repository.getCommit(ref)).hash;
      const bytes = await repository.buffer(commit, uri.fsPath);
      return { name, commit, bytes: new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), via: 'git extension' };
    }
    log('the git extension is not available for this file; reading with git show');
  } catch (error) {
    // The extension's errors are git's raw output; git show below says precisely what is wrong.
    log(`the git extension could not read ${name} (${error instanceof Error ? error.message.split('\n')[0] : String(error)}); reading with git show`);
  }
  const blob = await showFileAtRef(top, ref, relative, name);
  return { name, commit: blob.commit, bytes: blob.bytes, via: 'git show' };
}

export interface RefChoice {
  label: string;
  description: string;
  ref: string;
}

/** Branches, tags and remote branches to offer, from the git extension when it knows them, else from git. */
export async function refChoices(uri: vscode.Uri): Promise<RefChoice[]> {
  const kinds = ['branch', 'remote branch', 'tag'];
  try {
    const api = await gitApi();
    const repository = api ? await repositoryOf(api, uri) : null;
    if (repository) {
      const refs = repository.getRefs ? await repository.getRefs({ sort: 'committerdate' }) : repository.state.refs;
      return refs
        .filter((r) => r.name)
        .map((r) => ({ label: r.name!, description: `${kinds[r.type] ?? 'ref'}${r.commit ? ` ${r.commit.slice(0, 8)}` : ''}`, ref: r.name! }));
    }
  } catch {
    // Fall through to git itself.
  }
  const refs = await listRefs(path.dirname(uri.fsPath));
  return refs.map((r) => ({ label: r.name, description: `${r.kind} ${r.commit.slice(0, 8)}`, ref: r.name }));
}
