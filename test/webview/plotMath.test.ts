/**
 * The numbers behind the panel's pictures, in plain Node: coverage ellipses, kernel densities and
 * their bandwidth, axis ticks, the point index used for hovering, and the stored-state reader.
 */
import assert from 'node:assert/strict';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { niceTicks } from '../../webview/plots/axes';
import { classDensities, kernelDensityAt, silvermanBandwidth } from '../../webview/plots/density';
import { CHI_SQUARE_2DF_95, classSpreads, coverageEllipse } from '../../webview/plots/ellipse';
import { PointIndex } from '../../webview/plots/pointIndex';
import { escapeXml } from '../../webview/plots/xml';
import { rowLookup } from '../../webview/sample';
import { readState } from '../../webview/state';

/** A seeded generator (mulberry32) and standard normals by Box–Muller, for property tests. */
function generator(seed: number): { uniform: () => number; normal: () => number } {
  let state = seed >>> 0;
  const uniform = (): number => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const normal = (): number => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform());
  return { uniform, normal };
}

const close = (actual: number, expected: number, relative: number, what: string): void =>
  assert.ok(Math.abs(actual - expected) <= relative * Math.abs(expected), `${what}: ${actual} vs ${expected}`);

describe('95% ellipses', () => {
  it('use the χ² quantile with 2 degrees of freedom', () => {
    // scipy.stats.chi2.ppf(0.95, 2) in Debian's SciPy 1.10.1: 5.991464547107979.
    close(CHI_SQUARE_2DF_95, 5.991464547107979, 1e-15, 'χ²₂(0.95)');
  });

  it('have the eigenvectors and eigenvalues of the class covariance as axes', () => {
    const spread = { count: 100, meanX: 1, meanY: -2, varianceX: 4, varianceY: 1, covariance: 1.5 };
    const ellipse = coverageEllipse(spread);
    assert.ok(ellipse);
    // Independent implementation: ml-matrix's general eigendecomposition.
    const decomposition = new EigenvalueDecomposition(new Matrix([[4, 1.5], [1.5, 1]]));
    const values = decomposition.realEigenvalues;
    const major = values[0] > values[1] ? 0 : 1;
    close(ellipse.radiusMajor, Math.sqrt(CHI_SQUARE_2DF_95 * values[major]), 1e-12, 'major radius');
    close(ellipse.radiusMinor, Math.sqrt(CHI_SQUARE_2DF_95 * values[1 - major]), 1e-12, 'minor radius');
    const vector = decomposition.eigenvectorMatrix.getColumn(major);
    const cross = Math.cos(ellipse.angle) * vector[1] - Math.sin(ellipse.angle) * vector[0];
    assert.ok(Math.abs(cross) < 1e-12, 'the major axis is parallel to the leading eigenvector');
  });

  it('hold about 95% of a large bivariate normal sample', () => {
    const { normal } = generator(7);
    const n = 40_000;
    const x = new Float64Array(n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const a = normal();
      const b = normal();
      x[i] = 3 + 2 * a;
      y[i] = -1 + 0.8 * a + 0.6 * b;
    }
    const [spread] = classSpreads(x, y, new Int32Array(n), 1);
    const ellipse = coverageEllipse(spread);
    assert.ok(ellipse);
    let inside = 0;
    const cos = Math.cos(ellipse.angle);
    const sin = Math.sin(ellipse.angle);
    for (let i = 0; i < n; i++) {
      const dx = x[i] - ellipse.centreX;
      const dy = y[i] - ellipse.centreY;
      const u = (dx * cos + dy * sin) / ellipse.radiusMajor;
      const v = (-dx * sin + dy * cos) / ellipse.radiusMinor;
      if (u * u + v * v <= 1) inside++;
    }
    // Binomial standard error at n = 40 000 is 0.0011; allow four of them.
    assert.ok(Math.abs(inside / n - 0.95) < 0.0045, `share inside ${inside / n}`);
  });

  it('are skipped for fewer than three points and for a degenerate class', () => {
    assert.equal(coverageEllipse({ count: 2, meanX: 0, meanY: 0, varianceX: 1, varianceY: 1, covariance: 0 }), null);
    assert.equal(coverageEllipse({ count: 9, meanX: 0, meanY: 0, varianceX: 0, varianceY: 0, covariance: 0 }), null);
  });
});

describe('kernel densities', () => {
  const values = Float64Array.from([0, 1, 1.5, 4, 4.2, 7]);

  it('equal SciPy’s gaussian_kde for the same bandwidth', () => {
    // Debian SciPy 1.10.1: gaussian_kde(x, bw_method=0.8 / x.std(ddof=1))([-1, 0.5, 2, 4.1, 6]).
    const expected = [0.04233325947890556, 0.17479331102331086, 0.11561671223794312, 0.16551733431199364, 0.04831606099267284];
    const actual = kernelDensityAt(values, 0.8, Float64Array.from([-1, 0.5, 2, 4.1, 6]));
    expected.forEach((e, i) => close(actual[i], e, 1e-12, `density at point ${i}`));
  });

  it('choose the bandwidth by Silverman’s rule as R’s bw.nrd0 does', () => {
    // R 4.2.2: sprintf("%.17g", bw.nrd0(c(0, 1, 1.5, 4, 4.2, 7, 2.2, 3.3))) = 1.1853415280543815.
    const sorted = Float64Array.from([0, 1, 1.5, 4, 4.2, 7, 2.2, 3.3]).sort();
    close(silvermanBandwidth(sorted, 1), 1.1853415280543815, 1e-14, 'bandwidth');
  });

  it('integrate to one per class, with and without binning', () => {
    const { normal } = generator(11);
    for (const n of [500, 20_000]) {
      const data = new Float64Array(n);
      const classes = new Int32Array(n);
      for (let i = 0; i < n; i++) {
        classes[i] = i % 3;
        data[i] = classes[i] * 2 + normal();
      }
      const curves = classDensities(data, classes, 3);
      for (const curve of curves) {
        let area = 0;
        for (let g = 1; g < curve.x.length; g++) area += ((curve.y[g] + curve.y[g - 1]) / 2) * (curve.x[g] - curve.x[g - 1]);
        assert.ok(Math.abs(area - 1) < 2e-3, `n = ${n}: area ${area}`);
      }
    }
  });

  it('bin large samples without moving the curve', () => {
    const { normal } = generator(5);
    const n = 10_000;
    const data = new Float64Array(n);
    for (let i = 0; i < n; i++) data[i] = normal() * 3;
    const [binned] = classDensities(data, new Int32Array(n), 1);
    const direct = kernelDensityAt(data, binned.bandwidth, binned.x);
    let peak = 0;
    let worst = 0;
    for (let g = 0; g < direct.length; g++) {
      peak = Math.max(peak, direct[g]);
      worst = Math.max(worst, Math.abs(direct[g] - binned.y[g]));
    }
    // Linear binning on 1024 nodes: the error is second order in the bin width (Wand & Jones, Kernel Smoothing, 1995, appendix D; from memory).
    assert.ok(worst < 1e-3 * peak, `largest difference ${worst} of peak ${peak}`);
  });
});

describe('axis ticks', () => {
  it('fall on 1, 2 or 5 times a power of ten and cover the range', () => {
    const { uniform } = generator(3);
    for (let trial = 0; trial < 500; trial++) {
      const low = (uniform() - 0.5) * 10 ** Math.floor(uniform() * 8 - 3);
      const high = low + uniform() * 10 ** Math.floor(uniform() * 8 - 3) + 1e-6;
      const { values } = niceTicks(low, high, 6);
      assert.ok(values.length >= 2 && values.length <= 16, `${values.length} ticks for [${low}, ${high}]`);
      const step = values[1] - values[0];
      const mantissa = step / 10 ** Math.floor(Math.log10(step) + 1e-9);
      assert.ok([1, 2, 5, 10].some((m) => Math.abs(mantissa - m) < 1e-6), `step ${step}`);
      assert.ok(values[0] >= low - step * 1e-6 && values[values.length - 1] <= high + step * 1e-6);
      assert.ok(values[0] - step < low && values[values.length - 1] + step > high, 'no tick missing at either end');
    }
  });
});

describe('point index', () => {
  it('finds the same nearest point as a full search', () => {
    const { uniform, normal } = generator(9);
    const n = 5_000;
    const x = new Float64Array(n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      x[i] = normal() * 10;
      y[i] = normal() * 0.01;
    }
    const index = new PointIndex(x, y);
    const scaleX = 20;
    const scaleY = 20_000;
    for (let query = 0; query < 300; query++) {
      const px = (uniform() - 0.5) * 60;
      const py = (uniform() - 0.5) * 0.06;
      let best = -1;
      let bestDistance = 8 * 8;
      for (let i = 0; i < n; i++) {
        const d = ((x[i] - px) * scaleX) ** 2 + ((y[i] - py) * scaleY) ** 2;
        if (d <= bestDistance) {
          best = i;
          bestDistance = d;
        }
      }
      const found = index.nearest(px, py, 8, scaleX, scaleY);
      if (best < 0) assert.equal(found, -1);
      else {
        const foundDistance = ((x[found] - px) * scaleX) ** 2 + ((y[found] - py) * scaleY) ** 2;
        assert.equal(foundDistance, bestDistance);
      }
    }
  });
});

describe('row lookup in the plot sample', () => {
  it('finds every sampled row and no other, in file order or not', () => {
    const { uniform } = generator(13);
    const rows: number[] = [];
    for (let row = 0; rows.length < 2_000; row++) if (uniform() < 0.3) rows.push(row);
    const shuffled = [...rows].sort(() => uniform() - 0.5);
    for (const list of [rows, shuffled]) {
      const find = rowLookup(list);
      list.forEach((row, i) => assert.equal(find(row), i));
      const present = new Set(list);
      for (let row = -5; row < rows[rows.length - 1] + 5; row++) if (!present.has(row)) assert.equal(find(row), undefined);
    }
    assert.equal(rowLookup([])(0), undefined);
  });
});

describe('stored panel state', () => {
  it('keeps what is well formed and defaults the rest', () => {
    const state = readState({
      tab: 'features',
      discriminantAxes: [2, 0],
      views: { good: { x0: 0, x1: 1, y0: -1, y1: 1 }, flipped: { x0: 1, x1: 0, y0: 0, y1: 1 }, junk: 'x' },
      confusion: 'training',
      selectedFinding: 3,
      roleEdits: { solver: 'exact', priors: 'uniform', cv: 'kfold:5', missing: 'drop-rows', features: ['a'] },
    });
    assert.equal(state.tab, 'features');
    assert.deepEqual(state.discriminantAxes, [2, 0]);
    assert.deepEqual(Object.keys(state.views), ['good']);
    assert.equal(state.confusion, 'training');
    assert.equal(state.selectedFinding, 3);
    assert.equal(state.roleEdits?.cv, 'kfold:5');
    const junk = readState({ tab: 'nope', discriminantAxes: [1, 1], selectedFinding: -1, roleEdits: { solver: 'fast' } });
    assert.equal(junk.tab, 'projections');
    assert.deepEqual(junk.discriminantAxes, [0, 1]);
    assert.equal(junk.selectedFinding, null);
    assert.equal(junk.roleEdits, null);
    assert.equal(readState(undefined).tab, 'projections');
  });
});

describe('SVG text escaping', () => {
  it('escapes every character that could end an attribute or start markup', () => {
    assert.equal(escapeXml(`<img src=x onerror="alert('1')">&`), '&lt;img src=x onerror=&quot;alert(&apos;1&apos;)&quot;&gt;&amp;');
  });
});
