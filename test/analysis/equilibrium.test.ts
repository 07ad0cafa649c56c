import { describe, it, expect } from 'vitest';
import { findEquilibrium, steadyStateAtInput } from '../../src/analysis/equilibrium.js';
import { linearise } from '../../src/analysis/linearise.js';
import { poleZeroSummary } from '../../src/analysis/poles-zeros.js';
import { plantFromFunctions, tank } from './plant-fn.js';
import { expectClose } from '../helpers/expect-close.js';

describe('operating point and linearisation', () => {
  it('gravity-drained tank: equilibrium and linearised K, T match the analytic linearisation', () => {
    // A dh/dt = qmax u − c √h. Steady state: u0 = c √h0 / qmax. Linearising at h0:
    // ∂f/∂h = −c/(2 A √h0), ∂f/∂u = qmax/A, so G(s) = K/(T s + 1) with
    // T = 2 A √h0 / c and K = (qmax/A)·T = 2 √h0 qmax / c  (= 2 √h0 / c · dq/du, dq/du = qmax). Math, no outside source.
    const A = 1.5;
    const qmax = 0.008;
    const c = 0.004;
    for (const h0 of [0.3, 1.3, 3]) {
      const plant = tank(A, qmax, c, 1);
      const eq = findEquilibrium(plant, h0, { uMin: 0, uMax: 1 });
      expect(eq.ok).toBe(true);
      if (!eq.ok) return;
      expectClose(eq.x[0], h0, { rel: 1e-9 });
      expectClose(eq.u, (c * Math.sqrt(h0)) / qmax, { rel: 1e-9 });
      const lin = linearise(plant, eq.x, eq.u, { inputScale: 1 });
      expect(lin.ok).toBe(true);
      if (!lin.ok) return;
      const s = poleZeroSummary(lin.model);
      const T = (2 * A * Math.sqrt(h0)) / c;
      const K = (2 * Math.sqrt(h0) * qmax) / c;
      // Central differences with step ∛eps: relative error O(eps^(2/3)) ≈ 1e-10 times curvature terms.
      expectClose(-1 / s.poles[0].re, T, { rel: 1e-7 });
      expectClose(s.staticGain, K, { rel: 1e-7 });
    }
  });

  it('an unreachable setpoint is reported with the steady outputs at the actuator limits', () => {
    // Highest steady level: u = 1 gives √h = qmax/c = 2, h = 4 m. Asking for 5 m cannot work.
    const eq = findEquilibrium(tank(), 5, { uMin: 0, uMax: 1 });
    expect(eq.ok).toBe(false);
    if (eq.ok) return;
    expect(eq.reason).toBe('unreachable');
    expectClose(eq.reachable[1]!, 4, { rel: 1e-9 });
    // With the valve shut any level ≤ 0 is a steady state of the model as written (max(h, 0) in the
    // drain term), so the lower reachable output is some value ≤ 0.
    expect(eq.reachable[0]!).toBeLessThanOrEqual(1e-9);
    expect(eq.message).toMatch(/actuator range/);
  });

  it('an output that the input cannot move gives a singular/no-equilibrium finding, not a crash', () => {
    // x0' = −x0 + u (driven), x1' = −x1 (not driven), y = x1: only y = 0 is a steady output.
    const plant = plantFromFunctions(
      [0, 0],
      [],
      (x, u, _d, _p, dx) => {
        dx[0] = -x[0] + u;
        dx[1] = -x[1];
      },
      (x) => x[1],
    );
    const eq = findEquilibrium(plant, 1, { uMin: -10, uMax: 10 });
    expect(eq.ok).toBe(false);
    if (eq.ok) return;
    expect(['singular', 'unreachable', 'no_convergence']).toContain(eq.reason);
    expect(eq.message.length).toBeGreaterThan(10);
  });

  it('a NaN in the linearisation is reported with the entry named', () => {
    // f = −sqrt(x − 1) + u has an infinite slope at x = 1: the central difference hits sqrt(<0) = NaN.
    const plant = plantFromFunctions([1], [], (x, u, _d, _p, dx) => {
      dx[0] = -Math.sqrt(x[0] - 1) + u;
    }, (x) => x[0]);
    const lin = linearise(plant, Float64Array.from([1]), 0);
    expect(lin.ok).toBe(false);
    if (lin.ok) return;
    expect(lin.message).toMatch(/A\[x0, x0\]/);
  });

  it('a model that returns NaN everywhere is reported as non-finite', () => {
    const plant = plantFromFunctions([1], [], (_x, _u, _d, _p, dx) => {
      dx[0] = NaN;
    }, (x) => x[0]);
    const eq = findEquilibrium(plant, 1, { uMin: 0, uMax: 1 });
    expect(eq.ok).toBe(false);
    if (!eq.ok) expect(eq.reason).toBe('non_finite');
  });

  it('steadyStateAtInput: an integrating plant has no steady state away from balance', () => {
    const plant = plantFromFunctions([0], [], (_x, u, _d, _p, dx) => {
      dx[0] = u - 0.5;
    }, (x) => x[0]);
    expect(steadyStateAtInput(plant, 1, { uMin: 0, uMax: 1 })).toBeNull();
    // ... but the operating-point problem (x, u) is regular: u = 0.5, x = target.
    const eq = findEquilibrium(plant, 2, { uMin: 0, uMax: 1 });
    expect(eq.ok).toBe(true);
    if (eq.ok) {
      expectClose(eq.u, 0.5, { abs: 1e-12 });
      expectClose(eq.x[0], 2, { abs: 1e-12 });
    }
  });
});
