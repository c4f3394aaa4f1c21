/**
 * The scatter kernel (S += XᵀX over a row-major block, S·v from the upper triangle, the flush's
 * passes), WebAssembly SIMD and plain JavaScript, against plain loops written here, for sizes that
 * exercise every tile edge (d below, at and above multiples of 4; row counts up to the capacity).
 */
import { strict as assert } from 'node:assert';
import { createScatterKernel, simdAvailable } from '../../src/core/crossProductKernel';
import { uniform } from './generatedTables';

describe('row-major scatter kernel (S += XᵀX, S·v from the upper triangle)', () => {
  it('runs as WebAssembly SIMD on this Node', () => {
    assert.ok(simdAvailable(), 'Node 20 has WebAssembly SIMD');
  });

  for (const plain of [false, true]) {
    it(`${plain ? 'plain JavaScript' : 'WebAssembly SIMD'}: equals the triple loop on the upper triangle, keeps the padding zero, multiplies by the symmetric S as it was`, () => {
      const draw = uniform(12);
      for (const d of [1, 2, 3, 4, 5, 7, 8, 9, 13, 16, 23]) {
        for (const rows of [1, 2, 3, 8, 64, 65]) {
          const kernel = createScatterKernel(d, 65, plain);
          const size = kernel.size;
          assert.ok(size >= d && size % 4 === 0, `size ${size} for d=${d}`);
          const expected = new Float64Array(d * d);
          let scale = 1;
          for (let round = 0; round < 3; round++) {
            for (let t = 0; t < rows; t++) for (let i = 0; i < d; i++) kernel.block[t * size + i] = draw() * 2 - 1;
            // From the second round on, the update also gives product = S v with S the symmetric
            // matrix whose upper triangle is `expected` before the update; the kernel's lower
            // entries (left undefined) must not be read: fill them with garbage.
            const multiply = round > 0;
            const v = Array.from({ length: d }, () => draw() * 2 - 1);
            const before = expected.slice();
            if (multiply) {
              for (let i = 0; i < d; i++) for (let j = 0; j < i; j++) kernel.scatter[i * size + j] = round === 1 ? 1e300 : NaN;
              kernel.vector.set(v);
              kernel.product.fill(7); // overwritten, not added to
            }
            for (let i = 0; i < d; i++) {
              for (let j = i; j < d; j++) {
                let sum = 0;
                for (let t = 0; t < rows; t++) sum += kernel.block[t * size + i]! * kernel.block[t * size + j]!;
                expected[i * d + j]! += sum;
              }
            }
            kernel.update(rows, multiply);
            for (const value of expected) scale = Math.max(scale, Math.abs(value));
            // Sums of up to 3·65 products, in a different order: a few ulps of the largest entry.
            const tolerance = 4 * 3 * rows * Number.EPSILON * scale;
            for (let i = 0; i < size; i++) {
              for (let j = 0; j < size; j++) {
                const got = kernel.scatter[i * size + j]!;
                if (i >= d || j >= d) assert.equal(got, 0, `d=${d} rows=${rows}: padding entry (${i}, ${j}) written`);
                else if (j >= i) assert.ok(Math.abs(got - expected[i * d + j]!) <= tolerance, `d=${d} rows=${rows} (${i}, ${j}): ${got} vs ${expected[i * d + j]}`);
              }
            }
            if (!multiply) continue;
            for (let i = 0; i < size; i++) {
              let sum = 0;
              for (let j = 0; j < d; j++) sum += i < d ? before[Math.min(i, j) * d + Math.max(i, j)]! * v[j]! : 0;
              assert.ok(Math.abs(kernel.product[i]! - sum) <= tolerance * 2 * d, `d=${d} rows=${rows} round ${round}: (S v)[${i}] ${kernel.product[i]} vs ${sum}`);
            }
          }
        }
      }
    });
  }

  it('shiftRows and centreRows: WebAssembly SIMD equals the plain JavaScript passes (padding columns left at zero)', () => {
    const draw = uniform(13);
    for (const d of [1, 3, 4, 6, 13]) {
      for (const rows of [1, 2, 5, 64]) {
        const [simd, plain] = [createScatterKernel(d, 64), createScatterKernel(d, 64, true)];
        for (const kernel of [simd, plain]) {
          kernel.min.fill(Infinity);
          kernel.max.fill(-Infinity);
        }
        const values = Array.from({ length: rows * d }, () => draw() * 4 - 2);
        const vectors = Array.from({ length: 3 * d }, () => draw() - 0.5);
        for (const kernel of [simd, plain]) {
          for (let t = 0; t < rows; t++) for (let i = 0; i < d; i++) kernel.block[t * kernel.size + i] = values[t * d + i]!;
          for (let i = 0; i < d; i++) [kernel.shift[i], kernel.mean[i], kernel.delta[i]] = [vectors[i]!, vectors[d + i]!, vectors[2 * d + i]!];
          kernel.shiftRows(rows);
          kernel.centreRows(rows);
        }
        const close = (a: number, b: number, scale: number): boolean => Math.abs(a - b) <= 8 * d * rows * Number.EPSILON * Math.max(1, scale);
        for (let i = 0; i < d; i++) {
          assert.equal(simd.min[i], plain.min[i]);
          assert.equal(simd.max[i], plain.max[i]);
          assert.equal(simd.sums[i], plain.sums[i], `d=${d} rows=${rows}: sums[${i}]`);
          assert.ok(close(simd.cubic[i]!, plain.cubic[i]!, Math.abs(plain.cubic[i]!)), `d=${d} rows=${rows}: cubic[${i}] ${simd.cubic[i]} vs ${plain.cubic[i]}`);
          assert.ok(close(simd.timesDelta[i]!, plain.timesDelta[i]!, Math.abs(plain.timesDelta[i]!)), `d=${d} rows=${rows}: timesDelta[${i}]`);
        }
        for (let t = 0; t < rows; t++) {
          assert.ok(close(simd.rowNorms[t]!, plain.rowNorms[t]!, plain.rowNorms[t]!), `d=${d} rows=${rows}: rowNorms[${t}]`);
          assert.ok(close(simd.projections[t]!, plain.projections[t]!, Math.abs(plain.projections[t]!)), `d=${d} rows=${rows}: projections[${t}]`);
          for (let i = 0; i < simd.size; i++) {
            if (i < d) assert.equal(simd.block[t * simd.size + i], plain.block[t * plain.size + i]);
            else assert.equal(simd.block[t * simd.size + i], 0, `d=${d}: padding column ${i} written`);
          }
        }
      }
    }
  });
});
