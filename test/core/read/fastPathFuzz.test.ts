/**
 * Property test: thousands of generated delimited files (random delimiters, quoting, line endings,
 * byte-order marks, comments, blank lines, missing tokens, numbers in every form, labels with
 * delimiters/quotes/line breaks/non-ASCII, ragged rows, tiny chunk sizes) read by our scanner and
 * by a pure csv-parse path (referenceTable.ts) must give identical tables: values bit for bit
 * (NaN positions and the sign of zero included), labels and their ids, row and line numbers,
 * non-numeric counts, ragged-row counts. Invented data (property test).
 */
import { strict as assert } from 'node:assert';
import { DataError } from '../../../src/core/errors';
import { inspectTable } from '../../../src/core/read/index';
import { scanDelimitedText } from '../../../src/core/read/textScan';
import { DEFAULT_TEXT_TUNING } from '../../../src/core/read/textOptions';
import { DEFAULT_MISSING_TOKENS } from '../../../src/core/read/types';
import { memorySource } from '../../../src/core/source';
import { firstDifference, referenceTable, TableCollector, type ReferenceDialect } from './referenceTable';

/** Park–Miller minimal standard generator (deterministic across runs). */
function randomGenerator(seed: number): () => number {
  let state = seed % 2147483647 || 1;
  return () => {
    state = (state * 48271) % 2147483647;
    return (state - 1) / 2147483646;
  };
}

interface GeneratedFile {
  text: string;
  dialect: ReferenceDialect;
  skipRaggedRows: boolean;
  chunkBytes: number;
}

function generateFile(seed: number): GeneratedFile {
  const random = randomGenerator(seed * 7919 + 17);
  const pick = <T>(items: readonly T[]): T => items[Math.floor(random() * items.length)];
  const chance = (p: number): boolean => random() < p;
  const delimiter = pick([',', '\t', ';', '|']);
  const decimalComma = delimiter !== ',' && chance(0.2);
  const thousandsSeparator = chance(0.15) ? pick(decimalComma ? ['.', '_', "'"] : ['_', "'"]) : undefined;
  const comment = chance(0.3) ? pick(['#', '//']) : undefined;
  const missingTokens = chance(0.8) ? DEFAULT_MISSING_TOKENS : ['-999', 'missing', ''];
  const columns = 2 + Math.floor(random() * 5);
  const label = Math.floor(random() * columns);
  const features = [...Array(columns).keys()].filter((c) => c !== label && chance(0.85));
  const header = chance(0.7);
  const skipRaggedRows = chance(0.7);
  const crlf = chance(0.4);
  const mixedEndings = chance(0.15);
  const decimal = decimalComma ? ',' : '.';

  const quote = (text: string): string => `"${text.replace(/"/g, '""')}"`;
  /** A cell that needs quoting gets it; others sometimes. */
  const cellText = (text: string): string => {
    const needs = text.includes(delimiter) || text.includes('"') || text.includes('\n') || text.includes('\r') || (comment !== undefined && text.startsWith(comment));
    return needs || chance(0.08) ? quote(text) : text;
  };
  const digits = (n: number): string => Array.from({ length: n }, () => String(Math.floor(random() * 10))).join('');
  const numberText = (): string => {
    const sign = pick(['', '', '', '-', '+']);
    const form = Math.floor(random() * 14);
    let integer = digits(1 + Math.floor(random() * 6));
    if (thousandsSeparator && chance(0.5)) integer = `${digits(1 + Math.floor(random() * 3))}${thousandsSeparator}${digits(3)}${thousandsSeparator}${digits(3)}`;
    switch (form) {
      case 0:
        return sign + integer;
      case 1:
        return `${sign}${integer}${decimal}${digits(1 + Math.floor(random() * 8))}`;
      case 2:
        return `${sign}${decimal}${digits(1 + Math.floor(random() * 6))}`;
      case 3:
        return `${sign}${integer}${decimal}`;
      case 4:
        return `${sign}${digits(1)}${decimal}${digits(5)}${pick(['e', 'E'])}${pick(['', '+', '-'])}${Math.floor(random() * 30)}`;
      case 5:
        return `${sign}${digits(1 + Math.floor(random() * 3))}e${pick(['-', ''])}${300 + Math.floor(random() * 30)}`; // subnormal, overflow
      case 6:
        return `${sign}${digits(16 + Math.floor(random() * 10))}${decimal}${digits(Math.floor(random() * 10))}`; // beyond 2^53
      case 7:
        return `${sign}0${decimal}${'0'.repeat(Math.floor(random() * 25))}${digits(1 + Math.floor(random() * 17))}`;
      case 8:
        return pick(['-0', '0', '+0', `-0${decimal}0`, '0e5', '-0e-5']);
      case 9:
        return pick(['Inf', '-Inf', 'inf', '+inf', 'Infinity', '-Infinity', 'INF', 'infinite']);
      case 10:
        return pick(missingTokens);
      case 11:
        return pick(['abc', '1.2.3', '0x10', '1e', '--1', '.', 'e5', '1_000', '١٢', 'é', '12abc', '0b11', '1,5', '1.5']);
      case 12:
        return ` ${sign}${integer}${decimal}${digits(2)}  `;
      default:
        return `${sign}${digits(17)}`;
    }
  };
  const labelText = (): string =>
    pick(['ok', 'bearing', 'bearing, outer', 'cavitation', 'imbalance', 'a"b', 'multi\nline', 'crlf\r\nline', 'é', '中文', ' spaced ', 'NA', '', '7', 'tab\there', 'pipe|semi;']);
  const cell = (column: number): string => (column === label ? labelText() : chance(0.1) ? labelText() : numberText());

  const lines: string[] = [];
  if (comment !== undefined && chance(0.5)) lines.push(`${comment} written by the fuzz test, "unbalanced quote`);
  if (header) lines.push([...Array(columns).keys()].map((c) => cellText(`col ${c}`)).join(delimiter));
  const rows = 1 + Math.floor(random() * 40);
  for (let r = 0; r < rows; r++) {
    if (chance(0.05)) lines.push('');
    if (comment !== undefined && chance(0.08)) lines.push(`${comment}comment ${r}`);
    let width = columns;
    if (chance(0.05) && (header || r > 0)) width = Math.max(1, columns + pick([-1, 1, 2]));
    lines.push([...Array(width).keys()].map((c) => cellText(cell(c % columns))).join(delimiter));
  }
  const ending = (): string => (mixedEndings ? pick(['\n', '\r\n']) : crlf ? '\r\n' : '\n');
  let text = chance(0.2) ? '\uFEFF' : '';
  lines.forEach((line, i) => {
    text += line;
    if (i < lines.length - 1 || chance(0.7)) text += ending();
  });
  if (chance(0.2)) text += ending() + ending();
  return {
    text,
    dialect: { delimiter, header, comment, missingTokens, decimalComma, thousandsSeparator, label, features },
    skipRaggedRows,
    chunkBytes: pick([16, 17, 31, 64, 100, 257, 1024, 65536]),
  };
}

async function scanGenerated(file: GeneratedFile) {
  const { dialect } = file;
  const source = memorySource('fuzz.csv', new TextEncoder().encode(file.text));
  const inspection = await inspectTable(source, {
    delimiter: dialect.delimiter,
    header: dialect.header,
    comment: dialect.comment,
    missingTokens: dialect.missingTokens,
    decimalComma: dialect.decimalComma,
    thousandsSeparator: dialect.thousandsSeparator,
    skipRaggedRows: file.skipRaggedRows,
  });
  const collector = new TableCollector();
  const summary = await scanDelimitedText(
    { source, inspection, plan: { label: dialect.label, features: dialect.features }, onBatch: collector.onBatch },
    { ...DEFAULT_TEXT_TUNING, chunkBytes: file.chunkBytes, batchRows: 7 },
  );
  return collector.finish(summary);
}

describe('delimited text: fast path against a pure csv-parse path', function () {
  // Real I/O and long generated inputs on a shared 2-core machine: mocha's 2 s default is too tight.
  this.timeout(120_000);

  const FILES = 3000;

  it(`reads ${FILES} generated files exactly as csv-parse does`, async function () {
    this.timeout(120_000);
    let withRagged = 0;
    let withQuotes = 0;
    for (let seed = 1; seed <= FILES; seed++) {
      const file = generateFile(seed);
      const where = `seed ${seed}: ${JSON.stringify(file.text.slice(0, 300))}`;
      const expected = referenceTable(file.text, file.dialect);
      if (file.text.includes('"')) withQuotes++;
      if (expected.raggedRows > 0 && !file.skipRaggedRows) {
        withRagged++;
        await assert.rejects(scanGenerated(file), (error: unknown) => error instanceof DataError && error.code === 'ragged-row', where);
        continue;
      }
      const actual = await scanGenerated(file);
      assert.deepEqual(actual.rows, expected.rows, `rows, ${where}`);
      assert.deepEqual(actual.lines, expected.lines, `lines, ${where}`);
      assert.deepEqual(actual.labels, expected.labels, `label dictionary, ${where}`);
      assert.deepEqual(actual.labelIds, expected.labelIds, `label ids, ${where}`);
      const differs = firstDifference(actual.values, expected.values);
      assert.equal(differs, -1, `value ${differs}: ${actual.values[differs]} vs ${expected.values[differs]}, ${where}`);
      assert.deepEqual(actual.nonNumeric, expected.nonNumeric, `non-numeric counts, ${where}`);
      assert.equal(actual.rowsSeen, expected.rowsSeen, `rows seen, ${where}`);
      assert.equal(actual.raggedRows, expected.raggedRows, `ragged rows, ${where}`);
    }
    // The generator must actually exercise the odd paths.
    assert.ok(withRagged > 50, `only ${withRagged} files with ragged rows`);
    assert.ok(withQuotes > FILES / 2, `only ${withQuotes} files with quotes`);
  });
});
