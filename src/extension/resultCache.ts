/**
 * Finished reports, kept per file content (SHA-256) and options, so reopening a file, or a copy
 * of it, answers at once. A stamp (path, size, modification time) remembers the hash of a file
 * already read, so a reopen need not read the file again; a changed stamp means a fresh run, whose
 * worker hashes the bytes and may still find the same content here.
 */
import type { FitOptions } from '../core/types';
import type { ColumnChoice, PanelReport } from '../shared/messages';

export interface CachedResult {
  report: PanelReport;
  columns: ColumnChoice[];
}

export interface FileStamp {
  path: string;
  size: number;
  modified: number;
}

/** A key that does not depend on the order the options' properties were written in. */
export function optionsKey(options: Partial<FitOptions>): string {
  const sorted = (value: unknown): unknown => {
    if (Array.isArray(value)) return value.map(sorted);
    if (value && typeof value === 'object') {
      return Object.fromEntries(
        Object.keys(value)
          .filter((key) => (value as Record<string, unknown>)[key] !== undefined)
          .sort()
          .map((key) => [key, sorted((value as Record<string, unknown>)[key])]),
      );
    }
    return value;
  };
  return JSON.stringify(sorted(options));
}

export class ResultCache {
  /** Insertion order is recency order: a hit moves the entry to the end. */
  private readonly results = new Map<string, CachedResult>();
  private readonly hashes = new Map<string, string>();

  /** Reports hold plot samples of up to plotBudget rows each, so only the most recent are kept. */
  constructor(private readonly capacity = 12) {}

  get(sha256: string, options: Partial<FitOptions>): CachedResult | undefined {
    const key = `${sha256}\n${optionsKey(options)}`;
    const found = this.results.get(key);
    if (found) {
      this.results.delete(key);
      this.results.set(key, found);
    }
    return found;
  }

  put(sha256: string, options: Partial<FitOptions>, result: CachedResult): void {
    const key = `${sha256}\n${optionsKey(options)}`;
    this.results.delete(key);
    this.results.set(key, result);
    while (this.results.size > this.capacity) this.results.delete(this.results.keys().next().value as string);
  }

  hashOf(stamp: FileStamp): string | undefined {
    return this.hashes.get(stampKey(stamp));
  }

  rememberHash(stamp: FileStamp, sha256: string): void {
    this.hashes.set(stampKey(stamp), sha256);
    if (this.hashes.size > 4 * this.capacity) this.hashes.delete(this.hashes.keys().next().value as string);
  }
}

function stampKey(stamp: FileStamp): string {
  return `${stamp.path}\n${stamp.size}\n${stamp.modified}`;
}
