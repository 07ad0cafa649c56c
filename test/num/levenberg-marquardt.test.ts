import { describe, it, expect } from 'vitest';
import { levenbergMarquardt, leastSquaresCovariance, Rng } from '../../src/num/index.js';
import { expectClose } from '../helpers/expect-close.js';

describe('levenbergMarquardt', () => {
  it('fits an exponential decay y = a exp(−b t) exactly from noise-free data', () => {
    const t = Array.from({ length: 30 }, (_, i) => i * 0.2);
    const y = t.map((ti) => 3 * Math.exp(-0.7 * ti));
    const res = levenbergMarquardt(
      (p, r) => {
        for (let i = 0; i < t.length; i++) r[i] = p[0] * Math.exp(-p[1] * t[i]) - y[i];
      },
      [1, 0.1],
      t.length,
    );
    expectClose(res.x[0], 3, { abs: 1e-6 });
    expectClose(res.x[1], 0.7, { abs: 1e-6 });
    expect(res.converged).toBe(true);
  });

  it('solves Rosenbrock written as residuals (10 (y − x²), 1 − x)', () => {
    // Moré, Garbow & Hillstrom, ACM TOMS 7 (1981) 17-41, problem 1: minimum at (1, 1), start (−1.2, 1).
    const res = levenbergMarquardt(
      (p, r) => {
        r[0] = 10 * (p[1] - p[0] * p[0]);
        r[1] = 1 - p[0];
      },
      [-1.2, 1],
      2,
    );
    expectClose(res.x[0], 1, { abs: 1e-6 });
    expectClose(res.x[1], 1, { abs: 1e-6 });
  });

  it('linear regression: covariance equals the textbook s²(XᵀX)⁻¹ for a straight line', () => {
    // For y = a + b x, var(b) = s²/Σ(x − x̄)², var(a) = s² Σx²/(n Σ(x − x̄)²) (any regression text,
    // e.g. Draper & Smith, Applied Regression Analysis, 1998, ch. 1).
    const rng = new Rng(3);
    const n = 50;
    const x = Array.from({ length: n }, (_, i) => i / 10);
    const y = x.map((xi) => 1 + 2 * xi + 0.1 * rng.nextGaussian());
    const res = levenbergMarquardt(
      (p, r) => {
        for (let i = 0; i < n; i++) r[i] = p[0] + p[1] * x[i] - y[i];
      },
      [0, 0],
      n,
    );
    const cov = leastSquaresCovariance(res.jacobian, n, 2, res.sse);
    expect(cov).not.toBeNull();
    const xm = x.reduce((a, b) => a + b, 0) / n;
    const sxx = x.reduce((a, b) => a + (b - xm) ** 2, 0);
    const s2 = res.sse / (n - 2);
    expectClose(cov![3], s2 / sxx, { rel: 1e-5 });
    expectClose(cov![0], (s2 * x.reduce((a, b) => a + b * b, 0)) / (n * sxx), { rel: 1e-5 });
  });

  it('keeps parameters inside the box and stops at an active bound', () => {
    // Unconstrained optimum b = −1 is outside [0, 10]; the constrained optimum is b = 0.
    const t = [0, 1, 2, 3];
    const res = levenbergMarquardt(
      (p, r) => {
        for (let i = 0; i < 4; i++) r[i] = p[0] * t[i] - -1 * t[i];
      },
      [5],
      4,
      { lower: [0], upper: [10] },
    );
    expect(res.x[0]).toBeGreaterThanOrEqual(0);
    expectClose(res.x[0], 0, { abs: 1e-9 });
  });

  it('rejects fewer residuals than parameters', () => {
    expect(() => levenbergMarquardt(() => {}, [1, 2], 1)).toThrow(RangeError);
  });
});
