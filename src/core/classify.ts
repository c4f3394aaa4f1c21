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
import { scoreRow, type LdaSolution, type ScoringModel } from './lda';
import { solveLower, symmetricEigen } from './linalg';
import type { Moments } from './moments';

export { FoldMomentsAccumulator, foldClassifier, foldClassifiers, solveFoldModels, type FoldModel } from './foldModels';

export interface Classifier {
  /** Writes the K posteriors (solution order) and returns the predicted class index. */
  predict(x: Float64Array, out: Float64Array): number;
  /**
   * The same prediction from the row's discriminant scores (scoreRow), writing the K log scores
   * whose softmax is the posterior (softmaxInPlace(out, K) makes them posteriors): for a pass that
   * has the scores already and needs a posterior only now and then.
   */
  predictFromScores?(z: Float64Array, out: Float64Array): number;
}

/** Argmax of the first `length` scores (ties: lowest), as softmaxInPlace picks it. */
export function argmax(scores: Float64Array, length: number): number {
  let best = 0;
  for (let i = 1; i < length; i++) if (scores[i] > scores[best]) best = i;
  return best;
}

/**
 * Softmax of the first `length` scores in place (entries set to −Infinity get 0); returns the
 * argmax (ties: lowest). A length rather than a subarray: no view is made per row.
 */
export function softmaxInPlace(scores: Float64Array, length: number = scores.length): number {
  let best = 0;
  for (let i = 1; i < length; i++) if (scores[i] > scores[best]) best = i;
  const top = scores[best];
  let sum = 0;
  for (let i = 0; i < length; i++) {
    const e = scores[i] === -Infinity ? 0 : Math.exp(scores[i] - top);
    scores[i] = e;
    sum += e;
  }
  const inverse = 1 / sum;
  for (let i = 0; i < length; i++) scores[i] *= inverse;
  return best;
}

export function createClassifier(s: ScoringModel): Classifier {
  const K = s.labels.length;
  const k = s.eigenvalues.length;
  const logPriors = Float64Array.from(s.priors, Math.log);
  const centroids = s.centroids;
  const z = new Float64Array(k);
  const logScores = (scores: Float64Array, out: Float64Array): number => {
    for (let c = 0; c < K; c++) {
      let distance = 0;
      for (let j = 0; j < k; j++) {
        const t = scores[j] - centroids[c * k + j];
        distance += t * t;
      }
      out[c] = -0.5 * distance + logPriors[c];
    }
    return argmax(out, K);
  };
  return {
    predict(x: Float64Array, out: Float64Array): number {
      scoreRow(s, x, z);
      logScores(z, out);
      return softmaxInPlace(out, K);
    },
    predictFromScores: logScores,
  };
}

/** Exact leave-one-out predictions by downdating (see the module comment). */
/** Leave-one-out predictions: `predict` writes posteriors; `logScores` the log scores whose softmax they are. */
export interface LeaveOneOut {
  predict(x: Float64Array, trueClass: number, out: Float64Array): number;
  logScores?(x: Float64Array, trueClass: number, out: Float64Array): number;
}

export function createLeaveOneOut(s: LdaSolution, m: Moments): LeaveOneOut {
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
  // y = W (x − m) with W = [Qᵀ] L⁻¹ D^{-1/2} (r × r, pivot order), formed once: a product per
  // row instead of a triangular solve with r divisions.
  const whiten = new Float64Array(r * r);
  const column = new Float64Array(r);
  for (let j = 0; j < r; j++) {
    column.fill(0);
    column[j] = 1 / scale[j];
    solveLower(factor, r, column);
    if (basis) {
      for (let i = 0; i < r; i++) {
        let sum = 0;
        for (let t = 0; t < r; t++) sum += basis[t * r + i] * column[t];
        whiten[i * r + j] = sum;
      }
    } else for (let i = 0; i < r; i++) whiten[i * r + j] = column[i];
  }
  // Without the rotation W is lower triangular: row i needs columns 0..i only.
  const triangular = basis === null;
  const coordinates = (x: Float64Array, centre: Float64Array, out: Float64Array): void => {
    for (let q = 0; q < r; q++) column[q] = x[q] - centre[q];
    for (let i = 0; i < r; i++) {
      const row = i * r;
      const last = triangular ? i + 1 : r;
      let sum = 0;
      for (let j = 0; j < last; j++) sum += whiten[row + j] * column[j];
      out[i] = sum;
    }
  };
  // Kept features in pivot order, for the row, the overall mean and the class means.
  const pivotFeature = Int32Array.from(order, (p) => s.kept[p]);
  const overall = Float64Array.from(order, (p) => s.overallMean[p]);
  const classMeans: Float64Array[] = Array.from({ length: K }, (_, c) => Float64Array.from(order, (p) => s.classMeans[c * r + p]));
  const classCoordinates = new Float64Array(K * r);
  const one = new Float64Array(r);
  classMeans.forEach((mean, c) => {
    coordinates(mean, overall, one);
    classCoordinates.set(one, c * r);
  });
  // log of each class's prior in the fit without one row of class c: K × K, row c.
  const logPriorWithout = new Float64Array(K * K);
  for (let c = 0; c < K; c++) {
    const remainingClasses = counts[c] < 2 ? K - 1 : K;
    for (let i = 0; i < K; i++) {
      const remaining = i === c ? counts[c] - 1 : counts[i];
      logPriorWithout[c * K + i] = remaining > 0 ? Math.log(priorWithout(s, remaining, remainingClasses)) : -Infinity;
    }
  }
  // Without shrinkage (H = I) the class terms expand into inner products with the class
  // coordinates g_i: |y − g_i|² = |y|² − 2 y·g_i + g_i·g_i, one product per class instead of a
  // difference, a square and two sums (y is centred: the overall mean has coordinates 0).
  const gram = new Float64Array(K * K);
  for (let i = 0; i < K; i++) {
    for (let j = 0; j < K; j++) {
      let sum = 0;
      for (let q = 0; q < r; q++) sum += classCoordinates[i * r + q] * classCoordinates[j * r + q];
      gram[i * K + j] = sum;
    }
  }
  const yg = new Float64Array(K);
  const inPivotOrder = new Float64Array(r);
  const fullScores = new Float64Array(s.eigenvalues.length);
  const y = new Float64Array(r);
  const u = new Float64Array(r);
  const inverseH = new Float64Array(r).fill(1);
  const logScores = (x: Float64Array, trueClass: number, out: Float64Array): number => {
    // y = W (x − m), inline: this runs for every row of a pass.
    const w = whiten;
    const v = column;
    for (let q = 0; q < r; q++) {
      const value = x[pivotFeature[q]];
      inPivotOrder[q] = value;
      v[q] = value - overall[q];
    }
    for (let i = 0; i < r; i++) {
      const row = i * r;
      const last = triangular ? i + 1 : r;
      let sum = 0;
      for (let j = 0; j < last; j++) sum += w[row + j] * v[j];
      y[i] = sum;
    }
    const c = trueClass;
    const nc = counts[c];
    const vanishes = nc < 2;
    const a = vanishes ? 0 : nc / (nc - 1);
    const c1 = (shrunk ? 1 - alpha : 1) * a;
    if (!shrunk) return unshrunkScores(x, c, a, c1, out);
    const own = c * r;
    for (let i = 0; i < r; i++) u[i] = y[i] - classCoordinates[own + i];
    let uHu = 0;
    let positive = true;
    if (shrunk) {
      // H = I − ε diag(γ): the shrinkage target moves with the left-out row.
      let vv = 0;
      const mean = classMeans[c];
      for (let q = 0; q < r; q++) {
        const t = inPivotOrder[q] - mean[q];
        vv += t * t;
      }
      const epsilon = vanishes ? 0 : (alpha * a * vv) / r;
      for (let i = 0; i < r; i++) {
        const h = 1 - epsilon * gamma[i];
        if (!(h > 0)) positive = false;
        inverseH[i] = 1 / h;
        uHu += u[i] * u[i] * inverseH[i];
      }
    }
    const denominator = 1 - c1 * uHu;
    const remainingClasses = vanishes ? K - 1 : K;
    const divisor = n - 1 - remainingClasses;
    if (!positive || !(denominator > 64 * Number.EPSILON * Math.max(1, r)) || !(divisor > 0)) {
      // The refit is degenerate: the full fit's prediction, as log scores.
      scoreRow(s, x, fullScores);
      return full.predictFromScores!(fullScores, out);
    }
    for (let i = 0; i < K; i++) {
      const logPrior = logPriorWithout[c * K + i];
      if (logPrior === -Infinity) {
        out[i] = -Infinity;
        continue;
      }
      // t = y − ȳ_i' (for i = c: a·u).
      let tt = 0;
      let tu = 0;
      if (i === c) {
        for (let j = 0; j < r; j++) {
          const t = a * u[j] * inverseH[j];
          tt += t * a * u[j];
          tu += t * u[j];
        }
      } else {
        const centre = i * r;
        for (let j = 0; j < r; j++) {
          const t = y[j] - classCoordinates[centre + j];
          const th = t * inverseH[j];
          tt += th * t;
          tu += th * u[j];
        }
      }
      const quadratic = tt + (c1 * tu * tu) / denominator;
      out[i] = -0.5 * divisor * quadratic + logPrior;
    }
    return argmax(out, K);
  };
  /** The scores with H = I from y (already computed) by the expansion above. */
  const unshrunkScores = (x: Float64Array, c: number, a: number, c1: number, out: Float64Array): number => {
    let yy = 0;
    for (let q = 0; q < r; q++) yy += y[q] * y[q];
    for (let i = 0; i < K; i++) {
      let sum = 0;
      const centre = i * r;
      for (let q = 0; q < r; q++) sum += y[q] * classCoordinates[centre + q];
      yg[i] = sum;
    }
    const uu = yy - 2 * yg[c] + gram[c * K + c]; // |u|², u = y − g_c
    const denominator = 1 - c1 * uu;
    const divisor = n - 1 - (counts[c] < 2 ? K - 1 : K);
    if (!(denominator > 64 * Number.EPSILON * Math.max(1, r)) || !(divisor > 0)) {
      scoreRow(s, x, fullScores);
      return full.predictFromScores!(fullScores, out);
    }
    for (let i = 0; i < K; i++) {
      const logPrior = logPriorWithout[c * K + i];
      if (logPrior === -Infinity) {
        out[i] = -Infinity;
        continue;
      }
      // t = y − g_i, or a·u for the row's own class.
      const tt = i === c ? a * a * uu : yy - 2 * yg[i] + gram[i * K + i];
      const tu = i === c ? a * uu : yy - yg[i] - yg[c] + gram[i * K + c];
      out[i] = -0.5 * divisor * (tt + (c1 * tu * tu) / denominator) + logPrior;
    }
    return argmax(out, K);
  };
  return {
    predict(x: Float64Array, trueClass: number, out: Float64Array): number {
      logScores(x, trueClass, out);
      return softmaxInPlace(out, K);
    },
    logScores,
  };
}

/** The prior of class i in a fit without one row: empirical = remaining/(n − 1), uniform = 1/(classes left). */
function priorWithout(s: LdaSolution, remaining: number, classes: number): number {
  return s.priorsRule === 'uniform' ? 1 / classes : remaining / (s.n - 1);
}
