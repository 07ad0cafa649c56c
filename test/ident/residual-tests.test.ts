import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { fitStatistics, residualTests } from '../../src/ident/index.js';
import { chiSquareCdf, chiSquareQuantile } from '../../src/num/index.js';

// Reference values from numpy/SciPy: test/fixtures/reference/residual-tests.py (re-run it there).
const ref = JSON.parse(readFileSync('test/fixtures/reference/residual-tests.json', 'utf8')) as {
  N: number;
  M: number;
  u: number[];
  series: Record<string, { e: number[]; autocorrelation: number[]; crossCorrelation: number[]; corrcoefLag0: number; corrcoefLag1: number; whiteness: number; independence: number }>;
  threshold95: number;
  chi2: { p: number; k: number; x: number }[];
  fit: { y: number[]; model: number[]; rmse: number; nrmse: number; r2: number; r2corrcoef: number; maxError: number; maxErrorIndex: number };
};

describe('chi-square quantile against scipy.stats.chi2.ppf', () => {
  it('matches to 1e-9 relative over p = 0.05..0.99, k = 1..57', () => {
    for (const c of ref.chi2) {
      expect(Math.abs(chiSquareQuantile(c.p, c.k) / c.x - 1)).toBeLessThan(1e-9);
      expect(chiSquareCdf(c.x, c.k)).toBeCloseTo(c.p, 10);
    }
  });
});

describe('residual tests against their definitions (Ljung 1999 section 16.6) computed with numpy', () => {
  for (const [name, s] of Object.entries(ref.series)) {
    it(`${name} residuals: correlations, statistics and verdicts`, () => {
      const t = residualTests(s.e, ref.u, ref.M);
      for (let i = 0; i < ref.M; i++) {
        expect(t.autocorrelation[i]).toBeCloseTo(s.autocorrelation[i], 12);
        expect(t.crossCorrelation[i]).toBeCloseTo(s.crossCorrelation[i], 12);
      }
      // Lag 0 of the normalised cross-correlation is the sample correlation coefficient.
      expect(t.crossCorrelation[0]).toBeCloseTo(s.corrcoefLag0, 12);
      // Lag 1 differs from numpy.corrcoef(e[1:], e[:-1]) by the normalisation only: O(1/N).
      expect(Math.abs(t.autocorrelation[0] - s.corrcoefLag1)).toBeLessThan(5 / ref.N);
      expect(t.whiteness.statistic / s.whiteness).toBeCloseTo(1, 10);
      expect(t.inputIndependence!.statistic / s.independence).toBeCloseTo(1, 8);
      expect(t.whiteness.threshold).toBeCloseTo(ref.threshold95, 9);
      expect(t.whiteness.passed).toBe(s.whiteness <= ref.threshold95);
      expect(t.inputIndependence!.passed).toBe(s.independence <= ref.threshold95);
    });
  }
  it('the verdicts say what the series are: white passes both, coloured fails whiteness, leaky fails both', () => {
    const v = (n: string) => residualTests(ref.series[n].e, ref.u, ref.M);
    expect([v('white').whiteness.passed, v('white').inputIndependence!.passed]).toEqual([true, true]);
    expect(v('coloured').whiteness.passed).toBe(false);
    expect([v('leaky').whiteness.passed, v('leaky').inputIndependence!.passed]).toEqual([false, false]);
  });
});

describe('fit statistics against numpy', () => {
  it('RMSE, NRMSE (of the range), R² = 1 − SSE/SST, largest error and where', () => {
    const s = fitStatistics(ref.fit.y, ref.fit.model);
    expect(s.rmse).toBeCloseTo(ref.fit.rmse, 12);
    expect(s.nrmse).toBeCloseTo(ref.fit.nrmse, 12);
    expect(s.r2).toBeCloseTo(ref.fit.r2, 12);
    expect(s.maxError).toBeCloseTo(ref.fit.maxError, 12);
    expect(s.maxErrorIndex).toBe(ref.fit.maxErrorIndex);
    // For a model that is nearly the least-squares one, R² is close to numpy.corrcoef(y, ŷ)² (equal for an exact linear regression).
    expect(Math.abs(s.r2 - ref.fit.r2corrcoef)).toBeLessThan(1e-3);
  });
});
