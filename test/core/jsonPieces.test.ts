import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyze } from '../../src/core/analyze';
import { jsonPieces } from '../../src/core/format/jsonPieces';
import { memorySource } from '../../src/core/source';

/** Park–Miller, so the generated values are the same on every run. */
function generator(seed: number): () => number {
  let state = seed;
  return () => {
    state = (state * 48271) % 2147483647;
    return state / 2147483647;
  };
}

/** A random JSON-ish value with large arrays inside, and the awkward cases JSON.stringify maps. */
function randomValue(draw: () => number, depth: number): unknown {
  const pick = draw();
  if (depth > 3 || pick < 0.3) {
    const leaves = [0, -0, 1.5e-300, NaN, Infinity, -Infinity, 'a\nb"c', '', true, false, null, undefined, 12345678901234567890];
    return leaves[Math.floor(draw() * leaves.length)];
  }
  if (pick < 0.55) {
    // Large arrays of leaves (or of small arrays, as the plot sample's columns), small ones of anything.
    if (draw() < 0.3) return Array.from({ length: 300 + Math.floor(draw() * 400) }, () => (draw() < 0.2 ? [draw(), undefined] : randomValue(draw, 9)));
    return Array.from({ length: Math.floor(draw() * 4) }, () => randomValue(draw, depth + 1));
  }
  const object: Record<string, unknown> = {};
  const keys = Math.floor(draw() * 5);
  for (let k = 0; k < keys; k++) object[`key ${k} "${depth}"`] = randomValue(draw, depth + 1);
  if (draw() < 0.3) object.big = Array.from({ length: 500 }, (_, i) => (i % 7 === 0 ? undefined : i * 0.1));
  return object;
}

describe('jsonPieces', () => {
  it('joins to exactly JSON.stringify(value, null, 2) on generated values with large arrays (property test)', () => {
    const draw = generator(99);
    for (let trial = 0; trial < 300; trial++) {
      const value = { trial, value: randomValue(draw, 0) };
      assert.equal([...jsonPieces(value)].join(''), JSON.stringify(value, null, 2), `trial ${trial}`);
    }
  });

  it('joins to exactly the JSON of a real report with its plot sample, in many pieces', async () => {
    const csv = readFileSync(join(__dirname, '../../../sample-workspace/data/pump-faults.csv'));
    const { report } = await analyze(memorySource('pump-faults.csv', csv), { label: 'fault' });
    const pieces = [...jsonPieces(report)];
    assert.equal(pieces.join(''), JSON.stringify(report, null, 2));
    const largest = Math.max(...pieces.map((p) => p.length));
    assert.ok(pieces.length > 1000, `${pieces.length} pieces`);
    assert.ok(largest < JSON.stringify(report.sample).length / 10, `largest piece ${largest} characters`);
  });
});
