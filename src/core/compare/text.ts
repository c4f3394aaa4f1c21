/**
 * A comparison for the terminal, and as JSON for tools. The text has the same content as the
 * Markdown: gates first, then per file the changes in words, the figures side by side and the gates.
 */
import { CAUTIONS } from '../format/markdown';
import { printable, textTable } from '../format/table';
import { verdict } from '../format/verdict';
import type { ComparisonSet, FileComparison } from './comparison';
import { classRows, figureRows } from './figures';

function fileText(file: FileComparison): string[] {
  const out: string[] = [];
  const name = file.status === 'removed' ? file.base.name : file.head.name;
  out.push(`${printable(name)}${file.status === 'added' ? ' (new file)' : file.status === 'removed' ? ' (removed)' : ''}: gates ${file.gates.passed ? 'pass' : 'FAIL'}`);
  if (file.status === 'compared') out.push(`  base ${printable(file.base.name)}${file.base.commit ? ` (${file.base.commit.slice(0, 12)})` : ''} → head ${printable(file.head.name)}`);
  out.push('');
  out.push('  What changed');
  if (file.changes.length === 0) out.push('    nothing notable: the fits agree');
  for (const change of file.changes) out.push(`    - ${printable(change.text)}`);
  out.push('');
  if (file.status === 'compared') {
    out.push(`  Before: ${printable(verdict(file.baseReport))}`);
    out.push(`  Now:    ${printable(verdict(file.headReport))}`);
    out.push('');
    out.push(textTable(['', 'base', 'head', 'change'], figureRows(file.baseReport, file.headReport, file.deltas).map((r) => [r.name, r.base, r.head, r.change]), ['left', 'right', 'right', 'right']));
    out.push('');
    out.push(
      textTable(
        ['class', 'base rows', 'head rows', 'change', 'base recall', 'head recall', 'change'],
        classRows(file.deltas).map((c) => [c.label, c.baseRows, c.headRows, c.rowChange, c.baseRecall, c.headRecall, c.recallChange]),
        ['left', 'right', 'right', 'right', 'right', 'right', 'right'],
      ),
    );
    out.push('');
    for (const [title, list] of [['New findings', file.deltas.findings.added], ['Resolved findings', file.deltas.findings.resolved]] as const) {
      if (list.length === 0) continue;
      out.push(`  ${title} (${list.length})`);
      for (const f of list) out.push(`    ${f.severity.padEnd(7)} ${f.code}: ${printable(f.message)}`);
      out.push('');
    }
  } else {
    out.push(`  ${printable(verdict(file.status === 'added' ? file.headReport : file.baseReport))}`);
    out.push('');
  }
  out.push('  Gates');
  if (file.gates.outcomes.length === 0) out.push('    none applies');
  for (const o of file.gates.outcomes) out.push(`    ${o.passed ? 'pass' : 'FAIL'}  ${o.rule}: ${printable(o.detail)}`);
  out.push('');
  return out;
}

export function comparisonToText(set: ComparisonSet): string {
  const out: string[] = [];
  const failed = set.files.filter((f) => !f.gates.passed).length;
  out.push(
    set.files.length === 0
      ? 'Scatterwise comparison: no configured data file changed.'
      : `Scatterwise comparison of ${set.files.length} data file${set.files.length > 1 ? 's' : ''}: ${failed === 0 ? 'all gates pass' : `gates FAIL for ${failed}`}`,
  );
  out.push('');
  for (const file of set.files) out.push(...fileText(file));
  out.push('Cautions');
  for (const caution of CAUTIONS) out.push(`  - ${caution}`);
  return `${out.join('\n')}\n`;
}

/** The JSON form: everything but the two full reports (run `scatterwise fit` for those). */
export function comparisonToJson(set: ComparisonSet): string {
  const files = set.files.map((file) => {
    const common = { status: file.status, changes: file.changes, gates: file.gates };
    if (file.status === 'compared') return { ...common, base: file.base, head: file.head, deltas: file.deltas };
    if (file.status === 'added') return { ...common, head: file.head, verdict: verdict(file.headReport) };
    return { ...common, base: file.base, verdict: verdict(file.baseReport) };
  });
  return `${JSON.stringify({ version: 1, passed: set.passed, files, cautions: CAUTIONS }, null, 2)}\n`;
}
