/**
 * The records of plain text split without csv-parse (simpleCsvRecords, the inspection's fast path)
 * must be exactly csv-parse's: property test over generated texts, as strings and as UTF-8 bytes.
 * Texts the fast path declines go to csv-parse, so parseCsvRecords gives csv-parse's answer or
 * its error for every text. Invented data (property test).
 */
import { strict as assert } from 'node:assert';
import { DataError } from '../../../src/core/errors';
import { csvParseRecords, parseCsvRecords, simpleCsvRecords, type CsvDialect } from '../../../src/core/read/csvRecords';

/** Park–Miller minimal standard generator (deterministic across runs). */
function randomGenerator(seed: number): () => number {
  let state = seed % 2147483647 || 1;
  return () => {
    state = (state * 48271) % 2147483647;
    return (state - 1) / 2147483646;
  };
}

/** A text of a few records: mostly well-formed (whole quoted fields, some empty lines), sometimes broken. */
function generateText(seed: number, delimiter: string): string {
  const random = randomGenerator(seed * 7919 + 3);
  const pick = <T>(items: readonly T[]): T => items[Math.floor(random() * items.length)]!;
  const chance = (p: number): boolean => random() < p;
  const pieces = ['a', 'b7', '1.5e-3', ' ', '', 'é', 'Ω', '-', 'x y', delimiter === ',' ? ';' : ','];
  const odd = ['"', '""', '\r', '\r\n', '\n', delimiter, '\ufeff', ' "', '" '];
  const records = 1 + Math.floor(random() * 8);
  let text = chance(0.1) ? '\ufeff' : '';
  for (let r = 0; r < records; r++) {
    if (chance(0.1)) text += '\n';
    const fields = 1 + Math.floor(random() * 5);
    const cells: string[] = [];
    for (let f = 0; f < fields; f++) {
      let cell = '';
      for (let k = Math.floor(random() * 3); k > 0; k--) cell += pick(pieces);
      if (chance(0.25)) cell = `"${cell}${chance(0.3) ? delimiter : ''}"`;
      if (chance(0.04)) cell += pick(odd);
      cells.push(cell);
    }
    text += cells.join(delimiter);
    if (r < records - 1 || chance(0.6)) text += chance(0.03) ? '\r\n' : '\n';
  }
  return text;
}

/** A result as comparable data: the records, or the DataError's code and place. */
function outcome(parse: () => string[][]): unknown {
  try {
    return { records: parse() };
  } catch (error) {
    if (!(error instanceof DataError)) throw error;
    return { code: error.code, where: error.where };
  }
}

describe('CSV records without csv-parse (simpleCsvRecords)', () => {
  it('gives csv-parse\'s records for every text it takes, and parseCsvRecords csv-parse\'s answer for all', function () {
    this.timeout(120_000);
    let taken = 0;
    let declined = 0;
    for (let seed = 1; seed <= 2000; seed++) {
      const delimiter = [',', '\t', ';', '|'][seed % 4]!;
      const dialect: CsvDialect = { delimiter };
      const text = generateText(seed, delimiter);
      const lines = text.split('\n').map((_, i) => i + 1);
      const expected = outcome(() => csvParseRecords(text, dialect, 'generated.csv', lines));
      for (const input of [text, new TextEncoder().encode(text)]) {
        const simple = simpleCsvRecords(input, dialect);
        if (simple) {
          taken++;
          assert.deepEqual({ records: simple }, expected, `seed ${seed}: ${JSON.stringify(text)}`);
        } else declined++;
        assert.deepEqual(outcome(() => parseCsvRecords(input, dialect, 'generated.csv', lines)), expected, `seed ${seed}: ${JSON.stringify(text)}`);
      }
    }
    // Both branches ran often enough for the comparison to mean something.
    assert.ok(taken > 1000 && declined > 500, `taken ${taken}, declined ${declined}`);
  });

  it('leaves comments, carriage returns, doubled quotes and quotes inside fields to csv-parse', () => {
    assert.equal(simpleCsvRecords('a,b\n#c\n', { delimiter: ',', comment: '#' }), undefined);
    assert.equal(simpleCsvRecords('a,b\r\n1,2\r\n', { delimiter: ',' }), undefined);
    assert.equal(simpleCsvRecords('a,"b ""c"""\n', { delimiter: ',' }), undefined);
    assert.equal(simpleCsvRecords('a,b"c\n', { delimiter: ',' }), undefined);
    assert.equal(simpleCsvRecords('a,"b\nc"\n', { delimiter: ',' }), undefined);
    assert.equal(simpleCsvRecords('a,"b" \n', { delimiter: ',' }), undefined);
  });

  it('reads whole quoted fields, empty lines and a last line without a line feed as csv-parse does', () => {
    const text = '\ufefflabel,x\n\n"bearing, outer race",1.5\n"",2\nhealthy,';
    assert.deepEqual(simpleCsvRecords(text, { delimiter: ',' }), [['\ufefflabel', 'x'], ['bearing, outer race', '1.5'], ['', '2'], ['healthy', '']]);
    assert.deepEqual(simpleCsvRecords(text, { delimiter: ',' }), csvParseRecords(text, { delimiter: ',' }, 'f.csv', []));
  });
});
