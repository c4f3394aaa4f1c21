/**
 * `scatterwise report` end to end (the real dist/cli.js in a child process): the HTML page is
 * self-contained and escapes names from the data, `--plots` writes well-formed SVG files the
 * Markdown links, JSON holds the reports, the project config decides the options (and a wrong one
 * stops the run naming the key), and no data file is ever written.
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { cpSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import type { FitReport } from '../../src/core/types';
import { buildCli, REPOSITORY_ROOT, runCli, type CliRun } from './cliProcess';

const root = REPOSITORY_ROOT;

/**
 * Checks that `text` is well-formed XML as our SVG writes it: balanced tags, quoted attributes,
 * only the five predefined entities or numeric ones. Returns the element names in document order.
 */
function wellFormedXml(text: string): string[] {
  const names: string[] = [];
  const open: string[] = [];
  const token = /<(\/?)([A-Za-z][\w:-]*)((?:\s+[\w:-]+="[^"<]*")*)\s*(\/?)>|<!--[\s\S]*?-->|<!DOCTYPE[^>]*>|([^<]+)/g;
  let at = 0;
  for (const match of text.matchAll(token)) {
    assert.equal(match.index, at, `unexpected markup at ${at}: ${text.slice(at, at + 60)}`);
    at = match.index! + match[0].length;
    const [, closing, name, , selfClosing, body] = match;
    if (body !== undefined) {
      for (const entity of body.match(/&[^;\s]*;?/g) ?? []) assert.match(entity, /^&(amp|lt|gt|quot|apos|#\d+|#x[0-9a-fA-F]+);$/, `bad entity ${entity}`);
      continue;
    }
    if (!name) continue;
    if (closing) assert.equal(open.pop(), name, `</${name}> closes the wrong element`);
    else {
      names.push(name);
      if (!selfClosing) open.push(name);
    }
  }
  assert.equal(at, text.length, 'text after the last token');
  assert.deepEqual(open, [], 'every element is closed');
  return names;
}

function sha256(file: string): string {
  return createHash('sha256').update(readFileSync(file)).digest('hex');
}

describe('scatterwise report (the real dist/cli.js)', function () {
  this.timeout(300_000);
  let folder: string;

  function run(args: readonly string[], cwd = folder): CliRun {
    return runCli(args, { cwd, timeout: 120_000 });
  }

  before(() => {
    buildCli();
    folder = mkdtempSync(path.join(os.tmpdir(), 'scatterwise-report-'));
    cpSync(path.join(root, 'sample-workspace', 'data'), path.join(folder, 'data'), { recursive: true });
    cpSync(path.join(root, 'sample-workspace', 'scatterwise.config.json'), path.join(folder, 'scatterwise.config.json'));
  });

  after(() => rmSync(folder, { recursive: true, force: true }));

  it('--plots writes well-formed SVG files that the Markdown links, and leaves the data file alone', () => {
    const data = path.join(folder, 'data', 'pump-faults.csv');
    const before = sha256(data);
    const result = run(['report', 'data/pump-faults.csv', 'data/seal-leak.csv', '--plots', 'figures']);
    assert.equal(result.status, 0, result.stderr);
    const written = readdirSync(path.join(folder, 'figures')).sort();
    assert.deepEqual(written, [
      'pump-faults-components.svg', 'pump-faults-confusion.svg', 'pump-faults-discriminants.svg',
      'seal-leak-components.svg', 'seal-leak-confusion.svg', 'seal-leak-discriminants.svg',
    ]);
    for (const name of written) {
      const svg = readFileSync(path.join(folder, 'figures', name), 'utf8');
      const elements = wellFormedXml(svg);
      assert.equal(elements[0], 'svg', name);
      assert.ok(result.stdout.includes(`](figures/${name})`), `the Markdown links ${name}`);
    }
    // Four classes, four colours of points, and the 1,500 rows of the sample all drawn.
    const ld = readFileSync(path.join(folder, 'figures', 'pump-faults-discriminants.svg'), 'utf8');
    assert.match(ld, /1,500 of 1,500 rows shown/);
    assert.equal((ld.match(/<g fill="#[0-9A-F]{6}"[^>]*fill-opacity="0\.75">/g) ?? []).length, 4);
    // One discriminant (two classes): densities along LD1 instead of a scatter.
    assert.match(readFileSync(path.join(folder, 'figures', 'seal-leak-discriminants.svg'), 'utf8'), />density</);
    assert.equal(sha256(data), before);
  });

  it('--format html is one self-contained page: no script, no fetch, inline SVG, the cautions', () => {
    const result = run(['report', 'data/pump-faults.csv', '--format', 'html']);
    assert.equal(result.status, 0, result.stderr);
    const html = result.stdout;
    assert.match(html, /^<!DOCTYPE html>\n<html lang="en">/);
    assert.match(html, /<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">/);
    assert.doesNotMatch(html, /<script/i);
    assert.doesNotMatch(html, /\b(src|href)=/i);
    const urls = (html.match(/https?:\/\/[^\s"'<>)]+/g) ?? []).filter((u) => u !== 'http://www.w3.org/2000/svg');
    assert.deepEqual(urls, []);
    assert.equal((html.match(/<svg /g) ?? []).length, 3);
    assert.match(html, /class="verdict">3 of 3 discriminants matter/);
    assert.match(html, /qualified person review/);
    wellFormedXml(html.replace(/^<!DOCTYPE html>\n/, '').replace(/<meta [^>]*>/g, ''));
  });

  it('names from the data are text in HTML and Markdown, never markup', () => {
    const hostile = '<img src=x onerror=alert(1)>';
    const rows = ['a,b,"label"', ...Array.from({ length: 40 }, (_, i) => `${i % 7},${(i * 3) % 11},${i % 2 ? `"${hostile}"` : 'plain'}`)];
    writeFileSync(path.join(folder, 'hostile.csv'), `${rows.join('\n')}\n`);
    const html = run(['report', 'hostile.csv', '--format', 'html', '--no-config']);
    assert.equal(html.status, 0, html.stderr);
    assert.ok(!html.stdout.includes('<img'), 'no img element');
    assert.ok(html.stdout.includes('&lt;img src=x onerror=alert(1)&gt;'));
    const markdown = run(['report', 'hostile.csv', '--no-config']);
    assert.equal(markdown.status, 0, markdown.stderr);
    assert.ok(markdown.stdout.includes('\\<img src=x onerror=alert(1)\\>'), 'the Markdown shows the name, escaped');
    assert.doesNotMatch(markdown.stdout, /(?<!\\)<img/, 'no unescaped tag in the Markdown');
  });

  it('--format json holds every report, named as given; the config decides the options', () => {
    const result = run(['report', 'data/seal-leak.csv', 'data/pump-faults.csv', '--format', 'json']);
    assert.equal(result.status, 0, result.stderr);
    const page = JSON.parse(result.stdout) as { version: number; reports: FitReport[] };
    assert.equal(page.version, 1);
    assert.deepEqual(page.reports.map((r) => r.source.name), ['data/seal-leak.csv', 'data/pump-faults.csv']);
    // scatterwise.config.json: seal-leak uses cv loo; pump-faults excludes pump_id and uses cv auto.
    assert.equal(page.reports[0]!.options.cv, 'loo');
    assert.deepEqual(page.reports[1]!.options.exclude, ['pump_id']);
    // The command line wins over the config.
    const overridden = JSON.parse(run(['report', 'data/seal-leak.csv', '--format', 'json', '--cv', 'kfold:5']).stdout) as { reports: FitReport[] };
    assert.equal(overridden.reports[0]!.options.cv, 'kfold:5');
    assert.equal(overridden.reports[0]!.accuracy.crossValidated?.method, 'kfold:5');
  });

  it('a wrong config stops the run with exit 2, naming the key and line', () => {
    writeFileSync(path.join(folder, 'wrong.json'), '{\n  "datasets": [\n    { "files": ["data/*.csv"], "solver": "fastest" }\n  ]\n}\n');
    const result = run(['report', 'data/seal-leak.csv', '--config', 'wrong.json']);
    assert.equal(result.status, 2);
    assert.match(result.stderr, /wrong\.json is not a valid Scatterwise config:\n {2}- line 3, column 32: datasets\[0\]\.solver must be one of "auto", "exact", "shrinkage" \(got "fastest"\)/);
    assert.equal(result.stdout, '');
  });

  it('refuses to write the report over a data file', () => {
    const data = path.join(folder, 'data', 'seal-leak.csv');
    const before = sha256(data);
    const result = run(['report', 'data/seal-leak.csv', '--out', 'data/seal-leak.csv']);
    assert.equal(result.status, 2);
    assert.match(result.stderr, /never writes to a data file/);
    assert.equal(sha256(data), before);
  });
});
