/**
 * A comparison as Markdown, for a pull-request comment: the gate result first, then per data file
 * what changed in words, the figures side by side, the classes, the findings new and resolved,
 * the gates with by how much each missed, and the cautions.
 */
import { CAUTIONS } from '../format/markdown';
import { markdownTable, markdownText, printable } from '../format/table';
import { verdict } from '../format/verdict';
import type { Finding } from '../types';
import type { ComparisonSet, FileComparison } from './comparison';
import { classRows, figureRows } from './figures';
import { ruleText } from './gates';
import type { GateVerdict } from './gates';

function code(text: string): string {
  return `\`${printable(text).replace(/`/g, "'")}\``;
}

function fileTitle(file: FileComparison): string {
  if (file.status === 'added') return `${code(file.head.name)} (new file)`;
  if (file.status === 'removed') return `${code(file.base.name)} (removed)`;
  return `${code(file.head.name)}`;
}

function findingLine(f: Finding): string {
  return `- **${f.severity}** \`${f.code}\`: ${markdownText(f.message)}`;
}

function gateLines(gates: GateVerdict): string[] {
  if (gates.outcomes.length === 0) return ['No gate applies.'];
  const rules = gates.defaults ? ` (default rules: ${ruleText({ classDisappears: true, newFindingAtOrAbove: 'error' }).join(', ')})` : '';
  return [
    `Gates${rules}:`,
    '',
    markdownTable(['gate', 'result', 'detail'], gates.outcomes.map((o) => [o.rule, o.passed ? 'pass' : 'FAIL', o.detail]), ['left', 'left', 'left']),
  ];
}

function fileSection(file: FileComparison): string[] {
  const out: string[] = [];
  out.push(`### ${fileTitle(file)}: ${file.gates.passed ? 'gates pass' : '**gates FAIL**'}`);
  out.push('');
  if (file.status === 'compared') {
    out.push(`Base ${code(file.base.name)}${file.base.commit ? ` (${file.base.commit.slice(0, 12)})` : ''} → head ${code(file.head.name)}${file.head.commit ? ` (${file.head.commit.slice(0, 12)})` : ''}.`);
    out.push('');
  }
  out.push('**What changed**');
  out.push('');
  if (file.changes.length === 0) out.push('- Nothing notable: the fits agree.');
  for (const change of file.changes) out.push(`- ${markdownText(change.text)}`);
  out.push('');
  if (file.status === 'compared') {
    out.push(`Before: ${markdownText(verdict(file.baseReport))}`);
    out.push('');
    out.push(`Now: ${markdownText(verdict(file.headReport))}`);
    out.push('');
    out.push(markdownTable(['', 'base', 'head', 'change'], figureRows(file.baseReport, file.headReport, file.deltas).map((r) => [r.name, r.base, r.head, r.change]), ['left', 'right', 'right', 'right']));
    out.push('');
    const classes = classRows(file.deltas);
    const recallKind = file.deltas.perClassRecall[0]?.kind === 'cross-validated' ? 'CV recall' : 'recall';
    out.push(
      markdownTable(
        ['class', 'base rows', 'head rows', 'change', `base ${recallKind}`, `head ${recallKind}`, 'change'],
        classes.map((c) => [c.label, c.baseRows, c.headRows, c.rowChange, c.baseRecall, c.headRecall, c.recallChange]),
        ['left', 'right', 'right', 'right', 'right', 'right', 'right'],
      ),
    );
    out.push('');
    const { added, resolved } = file.deltas.findings;
    if (added.length > 0) {
      out.push(`New findings (${added.length}):`);
      out.push('');
      out.push(...added.map(findingLine));
      out.push('');
    }
    if (resolved.length > 0) {
      out.push(`Resolved findings (${resolved.length}):`);
      out.push('');
      out.push(...resolved.map(findingLine));
      out.push('');
    }
  } else {
    const report = file.status === 'added' ? file.headReport : file.baseReport;
    out.push(markdownText(verdict(report)));
    out.push('');
    if (file.status === 'added' && report.findings.length > 0) {
      out.push(`Findings (${report.findings.length}):`);
      out.push('');
      out.push(...report.findings.map(findingLine));
      out.push('');
    }
  }
  out.push(...gateLines(file.gates));
  out.push('');
  return out;
}

export function comparisonToMarkdown(set: ComparisonSet): string {
  const out: string[] = [];
  const failed = set.files.filter((f) => !f.gates.passed);
  out.push('## Scatterwise comparison');
  out.push('');
  if (set.files.length === 0) {
    out.push('No configured data file changed.');
  } else if (failed.length === 0) {
    out.push(`**All gates pass** for ${set.files.length} data file${set.files.length > 1 ? 's' : ''}.`);
  } else {
    out.push(`**Gates FAIL** for ${failed.length} of ${set.files.length} data file${set.files.length > 1 ? 's' : ''}:`);
    out.push('');
    for (const file of failed) {
      const name = file.status === 'removed' ? file.base.name : file.head.name;
      for (const o of file.gates.outcomes.filter((x) => !x.passed)) out.push(`- ${code(name)}: ${o.rule}: ${markdownText(o.detail)}`);
    }
  }
  out.push('');
  for (const file of set.files) out.push(...fileSection(file));
  out.push('### Cautions');
  out.push('');
  for (const caution of CAUTIONS) out.push(`- ${caution}`);
  return `${out.join('\n')}\n`;
}
