/**
 * Gaussian classification with the fitted discriminant: pooled covariance Σ = S_W/(n − K) (the
 * shrunk S_W with the shrinkage solver) and the solution's priors. In the whitened discriminant
 * scores z (wᵀΣw = 1) this is δ_c(z) = −½‖z − z̄_c‖² + log π_c, posteriors by softmax: the same
 * rule as −½(x − m_c)ᵀΣ⁻¹(x − m_c) + log π_c on all features, because class means differ only
 * within the span of the discriminant directions (Hastie, Tibshirani & Friedman, The Elements of
 * Statistical Learning, 2nd ed., §4.3.3).
 *
 * Leave-one-out is exact and needs no refit: without row x of class c the fit has n_c − 1 rows
 * in class c, mean m_c' = (n_c m_c − x)/(n_c − 1), within scatter
 *   S_W' = S_W − ζ a v vᵀ − ε I,  v = x − m_c, a = n_c/(n_c − 1),
 * covariance Σ' = S_W'/(n − 1 − K), priors re-estimated from the remaining rows when empirical.
 * Exact solver: ζ = 1, ε = 0. Shrinkage solver: the left-out fit keeps the full fit's intensity α
 * and re-estimates the rest — S_W' = (1 − α) S_raw' + α tr(S_raw')/r I with S_raw' the downdated
 * raw scatter — which is ζ = 1 − α, ε = α a ‖v‖²/r. The row is classified with the full-rank Σ'
 * by Sherman–Morrison in whitened coordinates y = B⁻¹(x − m) (S_W = B Bᵀ): there
 * S_W' = Q diag(h) Qᵀ − ζ a u uᵀ (u = y − ȳ_c; Q Γ Qᵀ the eigendecomposition of B⁻¹B⁻ᵀ, computed
 * once, h = 1 − εΓ; Q = I when ε = 0), so each row costs O(r²) and each class O(r).
 * The left-out fit keeps the full fit's features. If the left-out S_W' is not positive definite
 * (the row alone carried some direction's variance) the row is classified by the full fit.
 * A class of one row disappears from its left-out fit (posterior 0; K − 1 classes remain).
 */
import { scoreRow, type LdaSolution } from './lda';
import { solveLower, symmetricEigen } from './linalg';
import type { Moments } from './moments';

export { FoldMomentsAccumulator, foldClassifiers } from './foldModels';

export interface Classifier {
  /** Writes the K posteriors (solution order) and returns the predicted class index. */
  predict(x: Float64Array, out: Float64Array): number;
}

/** Softmax of the scores in place (entries set to −Infinity get 0); returns the argmax (ties: lowest). */
export function softmaxInPlace(scores: Float64Array): number {
  let best = 0;
  for (let i = 1; i < scores.length; i++) if (scores[i] > scores[best]) best = i;
  const top = scores[best];
  let sum = 0;
  for (let i = 0; i < scores.length; i++) {
    const e = scores[i] === -Infinity ? 0 : Math.exp(scores[i] - top);
    scores[i] = e;
    sum += e;
  }
  for (let i = 0; i < scores.length; i++) scores[i] /= sum;
  return best;
}

export function createClassifier(s: LdaSolution): Classifier {
  const K = s.labels.length;
  const k = s.eigenvalues.length;
  const logPriors = Float64Array.from(s.priors, Math.log);
  const z = new Float64Array(k);
  return {
    predict(x: Float64Array, out: Float64Array): number {
      scoreRow(s, x, z);
      for (let c = 0; c < K; c++) {
        let distance = 0;
        for (let j = 0; j < k; j++) {
          const t = z[j] - s.centroids[c * k + j];
          distance += t * t;
        }
        out[c] = -0.5 * distance + logPriors[c];
      }
      return softmaxInPlace(out.subarray(0, K));
    },
  };
}

/** Exact leave-one-out predictions by downdating (see the module comment). */
export function createLeaveOneOut(s: LdaSolution, m: Moments): { predict(x: Float64Array, trueClass: number, out: Float64Array): number } {
  const K = s.labels.length;
  const labelsOfMoments = new Set(m.classes.map((c) => c.label));
  if (m.classes.length !== K || !s.labels.every((l) => labelsOfMoments.has(l))) {
    throw new Error('internal: the leave-one-out moments are not those of the solution');
  }
  const full = createClassifier(s);
  const r = s.kept.length;
  const n = s.n;
  const counts = s.classCounts;
  const { order, factor, scale } = s.whitening;
  const shrunk = s.solver === 'shrinkage' && s.shrinkage > 0;
  const alpha = shrunk ? s.shrinkage : 0;
  // Coordinates: y = L⁻¹ D^{-1/2} (x − m) in pivot order, then (shrinkage) Qᵀy.
  let basis: Float64Array | null = null; // r × r, column j = eigenvector j of B⁻¹B⁻ᵀ
  let gamma: Float64Array = new Float64Array(r);
  if (shrunk) {
    // B⁻¹B⁻ᵀ = L⁻¹ D⁻¹ L⁻ᵀ: columns of L⁻¹ by solving L X = I.
    const inverse = new Float64Array(r * r);
    const column = new Float64Array(r);
    for (let j = 0; j < r; j++) {
      column.fill(0);
      column[j] = 1;
      solveLower(factor, r, column);
      for (let i = 0; i < r; i++) inverse[i * r + j] = column[i];
    }
    const g = new Float64Array(r * r);
    for (let i = 0; i < r; i++) {
      for (let j = 0; j <= i; j++) {
        let sum = 0;
        for (let t = 0; t <= j; t++) sum += (inverse[i * r + t] * inverse[j * r + t]) / (scale[t] * scale[t]);
        g[i * r + j] = sum;
        g[j * r + i] = sum;
      }
    }
    const eigen = symmetricEigen(g, r);
    basis = eigen.vectors;
    gamma = eigen.values;
  }
  const work = new Float64Array(r);
  const rotated = new Float64Array(r);
  const coordinates = (x: Float64Array, centre: Float64Array, out: Float64Array): void => {
    for (let q = 0; q < r; q++) work[q] = (x[q] - centre[q]) / scale[q];
    solveLower(factor, r, work);
    if (basis) {
      rotated.fill(0);
      for (let i = 0; i < r; i++) {
        const yi = work[i];
        const row = i * r;
        for (let j = 0; j < r; j++) rotated[j] += basis[row + j] * yi;
      }
      out.set(rotated);
    } else {
      out.set(work);
    }
  };
  // Kept features in pivot order, for the row, the overall mean and the class means.
  const pivotFeature = Int32Array.from(order, (p) => s.kept[p]);
  const overall = Float64Array.from(order, (p) => s.overallMean[p]);
  const classMeans: Float64Array[] = Array.from({ length: K }, (_, c) => Float64Array.from(order, (p) => s.classMeans[c * r + p]));
  const classCoordinates = classMeans.map((mean) => {
    const out = new Float64Array(r);
    coordinates(mean, overall, out);
    return out;
  });
  const inPivotOrder = new Float64Array(r);
  const y = new Float64Array(r);
  const u = new Float64Array(r);
  const h = new Float64Array(r).fill(1);
  const logPrior = new Float64Array(K);
  return {
    predict(x: Float64Array, trueClass: number, out: Float64Array): number {
      for (let q = 0; q < r; q++) inPivotOrder[q] = x[pivotFeature[q]];
      coordinates(inPivotOrder, overall, y);
      const c = trueClass;
      const nc = counts[c];
      const vanishes = nc < 2;
      const a = vanishes ? 0 : nc / (nc - 1);
      let vv = 0;
      for (let q = 0; q < r; q++) {
        const t = inPivotOrder[q] - classMeans[c][q];
        vv += t * t;
      }
      const epsilon = shrunk && !vanishes ? (alpha * a * vv) / r : 0;
      const c1 = (shrunk ? 1 - alpha : 1) * a;
      for (let i = 0; i < r; i++) {
        u[i] = y[i] - classCoordinates[c][i];
        h[i] = 1 - epsilon * gamma[i];
      }
      let uHu = 0;
      let positive = true;
      for (let i = 0; i < r; i++) {
        if (!(h[i] > 0)) positive = false;
        uHu += (u[i] * u[i]) / h[i];
      }
      const denominator = 1 - c1 * uHu;
      const remainingClasses = vanishes ? K - 1 : K;
      const divisor = n - 1 - remainingClasses;
      if (!positive || !(denominator > 64 * Number.EPSILON * Math.max(1, r)) || !(divisor > 0)) return full.predict(x, out);
      for (let i = 0; i < K; i++) {
        const remaining = i === c ? nc - 1 : counts[i];
        logPrior[i] = remaining > 0 ? Math.log(priorWithout(s, remaining, remainingClasses)) : -Infinity;
      }
      for (let i = 0; i < K; i++) {
        if (logPrior[i] === -Infinity) {
          out[i] = -Infinity;
          continue;
        }
        // t = y − ȳ_i' (for i = c: a·u).
        let tt = 0;
        let tu = 0;
        for (let j = 0; j < r; j++) {
          const t = i === c ? a * u[j] : y[j] - classCoordinates[i][j];
          tt += (t * t) / h[j];
          tu += (t * u[j]) / h[j];
        }
        const quadratic = tt + (c1 * tu * tu) / denominator;
        out[i] = -0.5 * divisor * quadratic + logPrior[i];
      }
      return softmaxInPlace(out.subarray(0, K));
    },
  };
}

/** The prior of class i in a fit without one row: empirical = remaining/(n − 1), uniform = 1/(classes left). */
function priorWithout(s: LdaSolution, remaining: number, classes: number): number {
  return s.priorsRule === 'uniform' ? 1 / classes : remaining / (s.n - 1);
}
