/**
 * Accuracy of the generated integrators against analytic solutions and published test problems.
 */
import { describe, it, expect } from 'vitest';
import { generateStepper, runTrial, type LoopConfig, type PlantDynamics } from '../../src/sim/index.js';
import type { IntegratorName } from '../../src/model/types.js';
import { expectClose } from '../helpers/expect-close.js';
import * as H from './hand-plants.js';
import { ConstantController } from './controllers.js';

const EMPTY = new Float64Array(0);

/** Integrate open loop with u = 0 from t = 0 to tEnd in steps of h; returns the final state. */
function integrate(plant: PlantDynamics, integrator: IntegratorName, h: number, tEnd: number, u = 0): Float64Array {
  const x = Float64Array.from(plant.x0);
  generateStepper(plant, integrator)(x, plant.params, plant.d0, u, EMPTY, 0, EMPTY, 0, 0, h, Math.round(tEnd / h));
  return x;
}

const QUIET_SENSOR = { delay: 0, noiseStd: 0, filterTime: 0, resolution: 0, seed: 1, span: null };
const loop = (sampleTime: number, step: number, integrator: IntegratorName = 'rk4'): LoopConfig => ({
  actuator: { min: -Infinity, max: Infinity, rateLimit: Infinity },
  sensor: QUIET_SENSOR,
  sampleTime,
  step,
  integrator,
});

describe('open-loop step responses vs analytic solutions', () => {
  it('first-order lag: y = K (1 − exp(−t/T)), 63.2 % of K at t = T', () => {
    // Ogata, Modern Control Engineering, 5th ed. 2010, sec. 5-3 (first-order unit-step response).
    const K = 2;
    const T = 5;
    // start: 'rest': the plant at its zero state while the output is 1 from t = 0 (a unit step).
    const res = runTrial(H.firstOrder(K, T), new ConstantController(1), loop(0.1, 0.1), {
      duration: 30,
      initialSetpoint: 0,
      initialOutput: 1,
      events: [],
      start: 'rest',
    });
    expect(res.status).toBe('ok');
    expect(res.trace.length).toBe(301);
    let worst = 0;
    for (let i = 0; i < res.trace.length; i++) {
      const t = res.trace.t[i];
      worst = Math.max(worst, Math.abs(res.trace.y[i] - K * (1 - Math.exp(-t / T))));
    }
    // RK4 local error on y' = −y/T is z^5/120 of the decaying part with z = h/T = 0.02. The
    // errors add up linearly while the mode decays, so the global error is about
    // (t/h)(z^5/120) K e^(−t/T), largest at t = T: (T/h)(z^5/120) K/e = 9.8e-10 (measured 1.0e-9).
    expect(worst).toBeLessThan(2e-9);
    expectClose(res.trace.y[50], K * (1 - Math.exp(-1)), { abs: 1e-9 }); // t = T: 63.2 %
  });

  it('second-order, zeta = 0.5, wn = 1: analytic step response, Mp = 16.30 %, tp = 3.6276 s', () => {
    // Ogata 2010, sec. 5-3, eq. (5-18): y = 1 − e^(−ζωn t)(cos ωd t + ζ/√(1−ζ²) sin ωd t).
    // Peak values: published-checks.md section 11 (computed table, zeta = 0.5).
    const zeta = 0.5;
    const wd = Math.sqrt(1 - zeta * zeta);
    const res = runTrial(H.secondOrder(1, 1, zeta), new ConstantController(1), loop(0.01, 0.01), {
      duration: 20,
      initialSetpoint: 0,
      initialOutput: 1,
      events: [],
      start: 'rest',
    });
    let worst = 0;
    let peak = 0;
    let tPeak = 0;
    for (let i = 0; i < res.trace.length; i++) {
      const t = res.trace.t[i];
      const exact = 1 - Math.exp(-zeta * t) * (Math.cos(wd * t) + (zeta / wd) * Math.sin(wd * t));
      worst = Math.max(worst, Math.abs(res.trace.y[i] - exact));
      if (res.trace.y[i] > peak) {
        peak = res.trace.y[i];
        tPeak = t;
      }
    }
    // RK4 with h·|λ| = 0.01: local error ~ 1e-10/120 per step, global well below 1e-10.
    expect(worst).toBeLessThan(1e-10);
    expectClose(100 * (peak - 1), 16.30, { abs: 0.005 }); // sheet gives 2 decimals
    expectClose(tPeak, 3.6276, { abs: 0.005 }); // sampled every 0.01 s: nearest sample within h/2
  });
});

describe('order of convergence (Butcher, Numerical Methods for ODEs, 3rd ed. 2016, sec. 2)', () => {
  // Smooth nonlinear problem: the logistic equation (DETEST A4) on [0, 20], exact solution
  // y = 20/(1 + 19 e^(−t/4)) (published-checks.md section 12). The global error of an order-p
  // method falls by 2^p when h halves; measured over three halvings.
  const exact = 17.73016648131484;
  const ratios = (integrator: IntegratorName, h0: number): number[] => {
    const err: number[] = [];
    for (let k = 0; k < 4; k++) err.push(Math.abs(integrate(H.detestA4(), integrator, h0 / 2 ** k, 20)[0] - exact));
    return err.slice(1).map((e, i) => err[i] / e);
  };

  it('rk4: global error falls ~16x per halving (14..18)', () => {
    // h = 0.2 ... 0.025: errors 1.7e-7 ... 4.1e-11, far above rounding (~1e-13 here).
    for (const r of ratios('rk4', 0.2)) {
      expect(r).toBeGreaterThan(14);
      expect(r).toBeLessThan(18);
    }
  });

  it('heun: ~4x per halving (3.6..4.4)', () => {
    for (const r of ratios('heun', 0.05)) {
      expect(r).toBeGreaterThan(3.6);
      expect(r).toBeLessThan(4.4);
    }
  });

  it('euler: ~2x per halving (1.8..2.2)', () => {
    for (const r of ratios('euler', 0.01)) {
      expect(r).toBeGreaterThan(1.8);
      expect(r).toBeLessThan(2.2);
    }
  });

  it('rk4 on y\u2032 = y cos t (time-varying): ~16x per halving, so stage times are right', () => {
    // DETEST A3, y = exp(sin t). A wrong stage time (e.g. t instead of t + h/2) drops the order.
    const ex = Math.exp(Math.sin(20));
    const err = [0.05, 0.025, 0.0125].map((h) => Math.abs(integrate(H.detestA3(), 'rk4', h, 20)[0] - ex));
    for (let i = 1; i < err.length; i++) {
      expect(err[i - 1] / err[i]).toBeGreaterThan(14);
      expect(err[i - 1] / err[i]).toBeLessThan(19);
    }
  });
});

describe('DETEST non-stiff problems (Hull, Enright, Fellen & Sedgwick, SIAM J. Numer. Anal. 9 (1972) 603-637)', () => {
  // End values y(20): published-checks.md section 12 (analytic for A2-A4; computed reference for
  // B1 and D1, given there to 13 digits). RK4 with h = 0.005 (4000 steps); requirement 1e-8
  // absolute (the h = 0.005 errors measured here are 1e-12 ... 6e-9).
  const cases: [string, () => PlantDynamics, number[]][] = [
    ['A2', H.detestA2, [1 / Math.sqrt(21)]],
    ['A3', H.detestA3, [Math.exp(Math.sin(20))]],
    ['A4', H.detestA4, [20 / (1 + 19 * Math.exp(-5))]],
    ['B1', H.detestB1, [0.6761876008579, 0.186081609964]],
    ['D1', () => H.detestD(0.1), [0.2198835352008, 0.9427076846342, -0.9787659841058, 0.3287977990962]],
  ];
  for (const [name, make, ref] of cases) {
    it(`${name}: y(20) to 1e-8 with rk4, h = 0.005`, () => {
      const x = integrate(make(), 'rk4', 0.005, 20);
      for (let i = 0; i < ref.length; i++) expectClose(x[i], ref[i], { abs: 1e-8 });
    });
  }

  it('the sheet values agree with the closed forms (A2, A4) to 1e-15', () => {
    expectClose(1 / Math.sqrt(21), 0.2182178902359924, { abs: 1e-15 });
    expectClose(20 / (1 + 19 * Math.exp(-5)), 17.73016648131484, { abs: 1e-13 });
  });

  it('D1 matches the Kepler solution E − e sin E = t at t = 20', () => {
    // Closed form in published-checks.md section 12; E by Newton iteration.
    const e = 0.1;
    let E = 20;
    for (let k = 0; k < 50; k++) E -= (E - e * Math.sin(E) - 20) / (1 - e * Math.cos(E));
    const x = integrate(H.detestD(e), 'rk4', 0.005, 20);
    const den = 1 - e * Math.cos(E);
    const exact = [Math.cos(E) - e, Math.sqrt(1 - e * e) * Math.sin(E), -Math.sin(E) / den, (Math.sqrt(1 - e * e) * Math.cos(E)) / den];
    for (let i = 0; i < 4; i++) expectClose(x[i], exact[i], { abs: 1e-8 });
  });
});
