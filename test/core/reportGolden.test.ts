/**
 * The reviewer Markdown of `report` and `compare` renders as intended: its structure (sections in
 * order, well-formed tables, the cautions last) and, case by case, the same text as the golden copy
 * in test/fixtures/golden/ (regenerate with `node scripts/make-golden.mjs` and review the diff).
 */
import { strict as assert } from 'node:assert';
import { existsSync, readFileSync } from 'node:fs';
import * as path from 'node:path';
import { buildCli, REPOSITORY_ROOT } from './cliProcess';
import { GOLDEN_CASES, goldenFile, renderGoldenCases, type GoldenOutput } from './goldenCases';

const root = REPOSITORY_ROOT;

/** Cells of a Markdown table row: split at pipes not escaped by a backslash. */
function cells(line: string): string[] {
  return line
    .slice(1, -1)
    .split(/(?<!\\)\|/)
    .map((cell) => cell.trim());
}

/** Every pipe table in the text: header, rule and rows with the same number of cells. */
function checkTables(name: string, text: string): number {
  const lines = text.split('\n');
  let tables = 0;
  for (let i = 0; i < lines.length; i++) {
    if (!lines[i]!.startsWith('|') || (i > 0 && lines[i - 1]!.startsWith('|'))) continue;
    tables++;
    const width = cells(lines[i]!).length;
    assert.match(lines[i + 1] ?? '', /^\|(:---|---:)(\|(:---|---:))*\|$/, `${name}: the line after a table header is its rule`);
    assert.equal(cells(lines[i + 1]!).length, width, `${name}: rule width`);
    for (let j = i + 2; j < lines.length && lines[j]!.startsWith('|'); j++) {
      assert.ok(lines[j]!.endsWith('|'), `${name}: table row ends with a pipe: ${lines[j]}`);
      assert.equal(cells(lines[j]!).length, width, `${name}: row has ${width} cells: ${lines[j]}`);
    }
  }
  return tables;
}

/** Headings in the order they appear. */
function headings(text: string): string[] {
  return text.split('\n').filter((line) => /^#{1,3} /.test(line));
}

describe('reviewer Markdown (report and compare) against the golden copies', function () {
  this.timeout(600_000);
  let outputs: GoldenOutput[];

  before(() => {
    outputs = renderGoldenCases(buildCli(), root);
  });

  it('every case ends with its exit code', () => {
    for (const c of GOLDEN_CASES) {
      const output = outputs.find((o) => o.name === c.name)!;
      assert.equal(output.exit, c.exit, `${c.name}: ${output.stderr}`);
    }
  });

  it('a report: verdict first, then classes, key statistics, top features, confusion, findings, cautions last', () => {
    for (const output of outputs.filter((o) => o.name.startsWith('report-'))) {
      const text = output.stdout;
      const heads = headings(text);
      const files = heads.filter((h) => h.startsWith('## Separability of ')).length;
      assert.ok(files >= 1, output.name);
      const expectedPerFile = ['## Separability of', '### Classes', '### Key statistics', '### Top features', '### Confusion matrix', '### Findings'];
      const perFile = heads.filter((h) => !h.startsWith('# ') && !h.startsWith('### Plots') && h !== '### Cautions');
      perFile.forEach((h, i) => assert.ok(h.startsWith(expectedPerFile[i % expectedPerFile.length]!), `${output.name}: heading ${i} is '${h}'`));
      assert.equal(perFile.length, files * expectedPerFile.length);
      assert.equal(heads[heads.length - 1], '### Cautions', `${output.name}: the cautions close the report`);
      assert.equal(heads.filter((h) => h === '### Cautions').length, 1, `${output.name}: the cautions are stated once`);
      // The verdict is the first paragraph after each file's heading, in bold.
      for (const match of text.matchAll(/^## Separability of .*\n\n(.*)$/gm)) assert.match(match[1]!, /^\*\*.*(discriminant|Cross-validated accuracy).*\*\*$/);
      assert.match(text, /not the same as how a model will do on new data/);
      assert.match(text, /possible-leakage findings/);
      assert.match(text, /qualified person review/);
      assert.ok(checkTables(output.name, text) >= 5 * files);
    }
  });

  it('a comparison: the gate result first, then per file what changed, the figures side by side, the gates, cautions last', () => {
    for (const output of outputs.filter((o) => o.name.startsWith('compare-'))) {
      const text = output.stdout;
      const lines = text.split('\n');
      assert.equal(lines[0], '## Scatterwise comparison');
      assert.match(lines[2]!, output.exit === 0 ? /^\*\*All gates pass\*\*/ : /^\*\*Gates FAIL\*\* for \d+ of \d+ data files?:$/);
      const sections = text.split(/^### /m).slice(1);
      assert.equal(sections[sections.length - 1]!.split('\n')[0], 'Cautions');
      for (const section of sections.slice(0, -1)) {
        assert.match(section, /^`[^`]+`( \((new file|removed)\))?: (gates pass|\*\*gates FAIL\*\*)\n/);
        assert.ok(section.indexOf('**What changed**') < section.indexOf('Gates'), 'changes before gates');
        assert.match(section, /\| gate \| result \| detail \|/);
      }
      checkTables(output.name, text);
    }
  });

  for (const c of GOLDEN_CASES) {
    it(`${c.name} matches its golden copy`, () => {
      const file = goldenFile(root, c.name);
      assert.ok(existsSync(file), `missing ${path.relative(root, file)}: run node scripts/make-golden.mjs`);
      const output = outputs.find((o) => o.name === c.name)!;
      assert.equal(output.stdout, readFileSync(file, 'utf8'), `${c.name} differs from ${path.relative(root, file)}; if the change is intended, regenerate with node scripts/make-golden.mjs and review the diff`);
    });
  }
});
