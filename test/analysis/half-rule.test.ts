import { describe, it, expect } from 'vitest';
import { halfRule } from '../../src/analysis/half-rule.js';
import { poleZeroSummary } from '../../src/analysis/poles-zeros.js';
import { tfModel, polyProduct } from './tf-model.js';
import { expectClose } from '../helpers/expect-close.js';

const real = (...xs: number[]) => xs.map((re) => ({ re, im: 0 }));

describe("Skogestad's half rule", () => {
  it('E1: 1/((s+1)(0.2s+1)) -> k = 1, tau1 = 1.1, theta = 0.1; second order exact (Skogestad, JPC 13 (2003), worked example [mem]; sheet section 3)', () => {
    const r = halfRule({ gain: 1, poles: real(-1, -5), zeros: [], delay: 0 });
    expectClose(r.firstOrder!.gain, 1);
    expectClose(r.firstOrder!.timeConstant, 1.1, { abs: 1e-12 });
    expectClose(r.firstOrder!.delay, 0.1, { abs: 1e-12 });
    expectClose(r.secondOrder!.timeConstants[0], 1, { abs: 1e-12 });
    expectClose(r.secondOrder!.timeConstants[1], 0.2, { abs: 1e-12 });
    expectClose(r.secondOrder!.delay, 0, { abs: 1e-12 });
  });

  const e2num = polyProduct([-0.3, 1], [0.08, 1]);
  const e2den = polyProduct([2, 1], [1, 1], [0.4, 1], [0.2, 1], [0.05, 1], [0.05, 1], [0.05, 1]);
  it('E2 from exact roots: first order tau1 = 2.5, theta = 1.47; second order 2, 1.2, theta 0.77 (Skogestad 2003 [mem]; sheet section 3)', () => {
    const r = halfRule({
      gain: 1,
      poles: real(-0.5, -1, -2.5, -5, -20, -20, -20),
      zeros: real(1 / 0.3, -1 / 0.08),
      delay: 0,
    });
    expectClose(r.firstOrder!.gain, 1, { abs: 1e-12 });
    expectClose(r.firstOrder!.timeConstant, 2.5, { abs: 1e-12 });
    expectClose(r.firstOrder!.delay, 1.47, { abs: 1e-12 });
    expectClose(r.secondOrder!.timeConstants[0], 2, { abs: 1e-12 });
    expectClose(r.secondOrder!.timeConstants[1], 1.2, { abs: 1e-12 });
    expectClose(r.secondOrder!.delay, 0.77, { abs: 1e-12 });
    // Of θ = 1.47, the inverse-response part is the RHP zero's T = 0.3 (sheet section 3: Σ T_j).
    expectClose(r.inverseResponseDelay, 0.3, { abs: 1e-12 });
    expect(r.secondOrder!.delay - r.inverseResponseDelay).toBeCloseTo(0.47, 12); // lags: 0.2 + 0.12 + 0.15
  });

  it('E2 from its state-space realisation (poles and zeros computed): same reductions', () => {
    const s = poleZeroSummary(tfModel(e2num, e2den));
    const r = halfRule({ gain: s.staticGain, poles: s.poles, zeros: s.zeros, delay: 0 });
    // The triple pole at −20 is computed to ~eps^(1/3)·20 ≈ 1e-4 and may split into a pair;
    // the pair keeps the sum of its time constants, so the delay is still right to ~1e-9.
    expectClose(r.firstOrder!.gain, 1, { abs: 1e-9 });
    expectClose(r.firstOrder!.timeConstant, 2.5, { abs: 1e-9 });
    expectClose(r.firstOrder!.delay, 1.47, { abs: 1e-6 });
    expectClose(r.secondOrder!.timeConstants[1], 1.2, { abs: 1e-9 });
    expectClose(r.secondOrder!.delay, 0.77, { abs: 1e-6 });
  });

  it('sample time adds h/2 and plant delay adds in full (the rule as stated in the sheet)', () => {
    const r = halfRule({ gain: 2, poles: real(-0.1), zeros: [], delay: 3, sampleTime: 1 });
    expectClose(r.firstOrder!.timeConstant, 10, { abs: 1e-12 });
    expectClose(r.firstOrder!.delay, 3.5, { abs: 1e-12 });
    expectClose(r.firstOrder!.gain, 2);
  });

  it('integrating plant k/(s(2s+1)(0.5s+1)): integrator kept, tau10 = ∞ reading', () => {
    const r = halfRule({ gain: 0.4, poles: real(0, -0.5, -2), zeros: [], delay: 1 });
    expect(r.integrating).toBe(true);
    expect(r.firstOrder!.timeConstant).toBe(Infinity);
    expectClose(r.firstOrder!.delay, 1 + 1 + 0.5, { abs: 1e-12 });
    expectClose(r.secondOrder!.timeConstants[1], 2 + 0.25, { abs: 1e-12 });
    expectClose(r.secondOrder!.delay, 1.25, { abs: 1e-12 });
  });

  it('refuses unstable plants and explains why', () => {
    const r = halfRule({ gain: 1, poles: real(1, -2), zeros: [], delay: 0 });
    expect(r.firstOrder).toBeNull();
    expect(r.notes.join(' ')).toMatch(/unstable/);
  });
});
