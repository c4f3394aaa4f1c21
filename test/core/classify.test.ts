import * as assert from 'node:assert/strict';
import { inverse, Matrix } from 'ml-matrix';
import { createClassifier, createLeaveOneOut, FoldMomentsAccumulator, foldClassifier, foldClassifiers, solveFoldModels } from '../../src/core/classify';
import { FoldAssigner } from '../../src/core/folds';
import { solveLda, type LdaOptions, type LdaSolution } from '../../src/core/lda';
import { MomentsAccumulator, subtractMoments, type Moments } from '../../src/core/moments';
import { accumulate, flatten, generateRows, referenceMoments, relativeDifference, type LabelledRows } from './numericData';

function rowOf(rows: LabelledRows, r: number): Float64Array {
  return rows.values.subarray(r * rows.d, (r + 1) * rows.d);
}

function momentsOfRow(rows: LabelledRows, r: number): Moments {
  const acc = new MomentsAccumulator(rows.features);
  acc.add(Float64Array.from(rowOf(rows, r)), Int32Array.of(rows.classIds[r]), 1, rows.labels);
  return acc.result();
}

/**
 * The Gaussian rule written out on raw rows: class means and pooled covariance S_W/(n − K) of the
 * rows in `subset`, inverted by ml-matrix, δ_c = −½ (x − m_c)ᵀ Σ⁻¹ (x − m_c) + log π_c, softmax.
 * Posteriors in the order of `labels`.
 */
function gaussianPosteriors(rows: LabelledRows, subset: number[], labels: string[], priors: 'empirical' | 'uniform', x: Float64Array): number[] {
  const reference = referenceMoments(rows, subset);
  const d = rows.d;
  const n = subset.length;
  const present = labels.filter((l) => reference.has(l));
  const K = present.length;
  const within = new Array<number>(d * d).fill(0);
  for (const l of present) flatten(reference.get(l)!.scatter).forEach((v, k) => (within[k] += v));
  const precision = inverse(new Matrix(Array.from({ length: d }, (_, i) => within.slice(i * d, (i + 1) * d).map((v) => v / (n - K)))));
  const scores = labels.map((l) => {
    const c = reference.get(l);
    if (!c) return -Infinity;
    const t = c.mean.map((m, i) => x[i] - m);
    let q = 0;
    for (let i = 0; i < d; i++) for (let j = 0; j < d; j++) q += t[i] * precision.get(i, j) * t[j];
    const prior = priors === 'uniform' ? 1 / K : c.count / n;
    return -0.5 * q + Math.log(prior);
  });
  const top = Math.max(...scores);
  const e = scores.map((s) => (s === -Infinity ? 0 : Math.exp(s - top)));
  const sum = e.reduce((a, b) => a + b, 0);
  return e.map((v) => v / sum);
}

function assertClose(a: ArrayLike<number>, b: ArrayLike<number>, tolerance: number, what: string): void {
  for (let i = 0; i < b.length; i++) assert.ok(Math.abs(a[i] - b[i]) < tolerance, `${what}: ${Array.from(a)} vs ${Array.from(b)}`);
}

describe('classify', () => {
  const rows = generateRows({ seed: 17, counts: [14, 11, 16], d: 4, separation: 1.2 });
  const all = Array.from({ length: rows.n }, (_, i) => i);
  const moments = accumulate(rows);

  for (const priors of ['empirical', 'uniform'] as const) {
    it(`training predictions equal the Gaussian rule on all features (exact, ${priors} priors)`, () => {
      const s = solveLda(moments, { solver: 'exact', priors });
      const classifier = createClassifier(s);
      const out = new Float64Array(s.labels.length);
      for (let r = 0; r < rows.n; r++) {
        const predicted = classifier.predict(rowOf(rows, r), out);
        const expected = gaussianPosteriors(rows, all, s.labels, priors, rowOf(rows, r));
        assertClose(out, expected, 1e-10, `row ${r}`);
        assert.equal(predicted, expected.indexOf(Math.max(...expected)));
      }
    });
  }

  it('with shrinkage, classifies with the shrunk covariance n·Σ_s/(n − K) on all features', () => {
    const s = solveLda(moments, { solver: 'shrinkage', priors: 'empirical' });
    assert.ok(s.shrinkage > 0);
    const classifier = createClassifier(s);
    const r = s.kept.length;
    const K = s.labels.length;
    const precision = inverse(new Matrix(Array.from({ length: r }, (_, i) => Array.from(s.withinScatter.subarray(i * r, (i + 1) * r), (v) => v / (s.n - K)))));
    const out = new Float64Array(K);
    for (let row = 0; row < rows.n; row += 3) {
      const x = rowOf(rows, row);
      classifier.predict(x, out);
      const scores = s.labels.map((_, c) => {
        let q = 0;
        for (let i = 0; i < r; i++) for (let j = 0; j < r; j++) q += (x[i] - s.classMeans[c * r + i]) * precision.get(i, j) * (x[j] - s.classMeans[c * r + j]);
        return -0.5 * q + Math.log(s.priors[c]);
      });
      const top = Math.max(...scores);
      const e = scores.map((v) => Math.exp(v - top));
      const sum = e.reduce((a, b) => a + b, 0);
      assertClose(out, e.map((v) => v / sum), 1e-10, `row ${row}`);
    }
  });

  describe('leave-one-out by downdating', () => {
    for (const priors of ['empirical', 'uniform'] as const) {
      it(`exact, ${priors} priors: equals the Gaussian rule refitted on the raw rows without the row, for every row`, () => {
        const s = solveLda(moments, { solver: 'exact', priors });
        const loo = createLeaveOneOut(s, moments);
        const out = new Float64Array(s.labels.length);
        for (let r = 0; r < rows.n; r++) {
          const truth = s.labels.indexOf(rows.labels[rows.classIds[r]]);
          const predicted = loo.predict(rowOf(rows, r), truth, out);
          const expected = gaussianPosteriors(
            rows,
            all.filter((t) => t !== r),
            s.labels,
            priors,
            rowOf(rows, r),
          );
          assertClose(out, expected, 1e-9, `row ${r}`);
          assert.equal(predicted, expected.indexOf(Math.max(...expected)));
        }
      });
    }

    for (const priors of ['empirical', 'uniform'] as const) {
      it(`shrinkage, ${priors} priors: equals solveLda on (moments − row) with the full fit's intensity, for every row`, () => {
        const s = solveLda(moments, { solver: 'shrinkage', priors });
        assert.ok(s.shrinkage > 0);
        const loo = createLeaveOneOut(s, moments);
        const out = new Float64Array(s.labels.length);
        const brute = new Float64Array(s.labels.length);
        for (let r = 0; r < rows.n; r++) {
          const truth = s.labels.indexOf(rows.labels[rows.classIds[r]]);
          const predicted = loo.predict(rowOf(rows, r), truth, out);
          const refit = solveLda(subtractMoments(moments, momentsOfRow(rows, r)), { solver: 'shrinkage', priors, shrinkageIntensity: s.shrinkage });
          const expected = createClassifier(refit).predict(rowOf(rows, r), brute);
          assertClose(out, brute, 1e-9, `row ${r}`);
          assert.equal(predicted, expected);
        }
      });
    }

    it('a class of one row disappears from its left-out fit (posterior 0), the others as in a refit', () => {
      const lonely = generateRows({ seed: 23, counts: [12, 1, 13], d: 3 });
      const m = accumulate(lonely);
      const s = solveLda(m, { solver: 'exact', priors: 'empirical' });
      const loo = createLeaveOneOut(s, m);
      const r = Array.from(lonely.classIds).indexOf(1);
      const truth = s.labels.indexOf(lonely.labels[1]);
      const out = new Float64Array(3);
      loo.predict(rowOf(lonely, r), truth, out);
      assert.equal(out[truth], 0);
      const expected = gaussianPosteriors(
        lonely,
        Array.from({ length: lonely.n }, (_, i) => i).filter((t) => t !== r),
        s.labels,
        'empirical',
        rowOf(lonely, r),
      );
      assertClose(out, expected, 1e-9, 'lonely row');
    });
  });

  describe('k-fold', () => {
    const k = 4;
    const assigner = new FoldAssigner(k, 7);
    const appearance: number[] = [];
    const folds = Int32Array.from(rows.classIds, (c) => {
      if (!appearance.includes(c)) appearance.push(c);
      return assigner.foldOf(appearance.indexOf(c));
    });
    const accumulator = new FoldMomentsAccumulator(rows.features, k);
    for (let start = 0; start < rows.n; start += 9) {
      const end = Math.min(rows.n, start + 9);
      accumulator.add(rows.values.slice(start * rows.d, end * rows.d), rows.classIds.slice(start, end), end - start, rows.labels, folds.slice(start, end));
    }

    it('keeps per fold the pooled within-class scatter and the class counts and means of its rows', () => {
      const parts = accumulator.parts();
      parts.forEach((part, f) => {
        const members = all.filter((r) => folds[r] === f);
        const reference = referenceMoments(rows, members);
        const pooled = new Array<number>(rows.d * rows.d).fill(0);
        for (const [label, c] of reference) {
          flatten(c.scatter).forEach((v, i) => (pooled[i] += v));
          assert.equal(part.counts.get(label), c.count);
          assert.ok(relativeDifference(part.means.get(label)!, c.mean) < 1e-13);
        }
        assert.ok(relativeDifference(part.withinScatter, pooled) < 1e-12);
      });
    });

    for (const options of [
      { solver: 'exact', priors: 'empirical' },
      { solver: 'exact', priors: 'uniform' },
      { solver: 'shrinkage', priors: 'empirical' },
    ] as LdaOptions[]) {
      it(`each fold's classifier equals a brute-force fit on total − fold (${options.solver}, ${options.priors})`, () => {
        const full: LdaSolution = solveLda(moments, options);
        const classifiers = foldClassifiers(moments, accumulator, options, full);
        assert.equal(classifiers.length, k);
        const out = new Float64Array(full.labels.length);
        const brute = new Float64Array(full.labels.length);
        for (let f = 0; f < k; f++) {
          const members = all.filter((r) => folds[r] === f);
          const training = all.filter((r) => folds[r] !== f);
          const refit = solveLda(subtractMoments(moments, accumulate(rows, 5, members)), {
            solver: full.solver,
            priors: options.priors,
            ...(full.solver === 'shrinkage' ? { shrinkageIntensity: full.shrinkage } : {}),
          });
          const reference = createClassifier(refit);
          for (const r of members) {
            const predicted = classifiers[f].predict(rowOf(rows, r), out);
            assert.equal(predicted, reference.predict(rowOf(rows, r), brute));
            assertClose(out, brute, 1e-9, `fold ${f} row ${r}`);
            if (options.solver === 'exact') {
              assertClose(out, gaussianPosteriors(rows, training, full.labels, options.priors, rowOf(rows, r)), 1e-9, `raw fold ${f} row ${r}`);
            }
          }
        }
      });
    }

    it('the fold models a parallel pass posts to its threads hold no d × d matrix and classify as the fold classifiers do', () => {
      const options: LdaOptions = { solver: 'exact', priors: 'empirical' };
      const full = solveLda(moments, options);
      const models = structuredClone(solveFoldModels(moments, accumulator, options, full));
      const largest = Math.max(...models.flatMap((m) => Object.values(m.model).map((v: { length?: number }) => v.length ?? 0)));
      assert.ok(largest < rows.d * rows.d, `largest array ${largest} for d = ${rows.d}`);
      const direct = foldClassifiers(moments, accumulator, options, full);
      const posted = models.map(foldClassifier);
      const a = new Float64Array(full.labels.length);
      const b = new Float64Array(full.labels.length);
      for (let f = 0; f < k; f++) {
        for (const r of all.filter((row) => folds[row] === f)) {
          assert.equal(posted[f].predict(rowOf(rows, r), b), direct[f].predict(rowOf(rows, r), a));
          assert.deepEqual(b, a);
        }
      }
    });
  });
});
