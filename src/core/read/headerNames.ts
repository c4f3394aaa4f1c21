/**
 * Column names from the first record. Names must be unique: a blank name becomes `column_N`
 * (N = 1-based position) and a repeated name gets the suffix `_2`, `_3`, … (the first free one),
 * each with a note, so the file can still be analysed and the rename is visible.
 */
import type { ReaderNote } from './types';

export function headerNames(first: readonly string[], header: boolean): { names: string[]; notes: ReaderNote[] } {
  if (!header) return { names: first.map((_, i) => `column_${i + 1}`), notes: [] };
  const trimmed = first.map((cell) => cell.replace(/^ +| +$/g, ''));
  const taken = new Set(trimmed.filter((name) => name !== ''));
  const used = new Set<string>();
  const names: string[] = [];
  const renamed: string[] = [];
  const repeated = new Set<string>();
  const blank: string[] = [];
  trimmed.forEach((name, i) => {
    let final = name;
    if (name === '') {
      final = freeName(`column_${i + 1}`, taken, used);
      blank.push(final);
    } else if (used.has(name)) {
      final = freeName(name, taken, used);
      const firstPosition = names.indexOf(name) + 1;
      renamed.push(`"${name}" at positions ${firstPosition} and ${i + 1} (the second is now "${final}")`);
      repeated.add(name);
    }
    used.add(final);
    names.push(final);
  });
  const notes: ReaderNote[] = [];
  if (renamed.length > 0) {
    notes.push({ code: 'duplicate-column-names', severity: 'warning', message: `Repeated column names were made unique: ${renamed.join('; ')}.`, columns: [...repeated] });
  }
  if (blank.length > 0) {
    notes.push({ code: 'blank-column-names', severity: 'info', message: `Columns without a name were named ${blank.join(', ')}.`, columns: blank });
  }
  return { names, notes };
}

/** `base` when free, else `base_2`, `base_3`, … (free = not written in the header and not yet used). */
function freeName(base: string, taken: Set<string>, used: Set<string>): string {
  if (!taken.has(base) && !used.has(base)) return base;
  for (let suffix = 2; ; suffix++) {
    const candidate = `${base}_${suffix}`;
    if (!taken.has(candidate) && !used.has(candidate)) return candidate;
  }
}
